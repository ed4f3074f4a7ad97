// Package plan is Sagitta's shooting planner: for a lens, a camera and a
// printed chart it gives the distance at which the chart fills the frame,
// the magnification, what the field frequencies on the sensor are on paper,
// and whether the print itself would limit the measurement.
//
// Optics: the thin-lens equation 1/u + 1/v = 1/f with magnification m = v/u
// (any optics text, e.g. E. Hecht, Optics, 4th ed. (2002), section 5.2.3)
// gives the object distance u = f (1 + 1/m) and the image distance
// v = f (1 + m). The chart fills the frame when m = sensor size / chart size
// along the side that limits (the smaller of the two ratios). A frequency F
// on the sensor is F m on paper. Real lenses have two principal planes some
// way apart, so the distance from the sensor to the chart differs from
// u + v by that separation; focus on the chart, not on the number.
//
// Print model: the printer lays dots on a grid of pitch p = 25.4 / dpi mm
// and ink spreads into the paper. The print's MTF at F cycles/mm on paper is
// modelled as |sinc(F p)| exp(-2 pi^2 s^2 F^2): the dot's box aperture
// (G. D. Boreman, Modulation Transfer Function in Optical and
// Electro-Optical Systems, SPIE Press (2001), ch. 2) times a Gaussian ink
// spread of standard deviation s (its transform, Goodman ch. 2). The spread
// s is from memory: about 10 um on coated photo paper and 25 um on plain
// paper; halftoning of greys, paper texture and the printer's own dot
// placement are not modelled. The print's blur (standard deviation
// sqrt(p^2/12 + s^2) on paper, the box's and the Gaussian's variances added)
// reaches the sensor multiplied by m.
package plan

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"sagitta/core/chart"
)

// Options are the planner's inputs. Every field has a JSON name for the web
// page.
type Options struct {
	// FocalMM is the lens's focal length, mm.
	FocalMM float64 `json:"focal_mm"`
	// Sensor is the sensor's size "WxH" in mm (e.g. "36x24") or a format
	// name: "full-frame", "aps-c", "four-thirds", "1-inch".
	Sensor string `json:"sensor"`
	// PitchUM is the pixel pitch, um; or give Pixels, the image size, and
	// the pitch is the sensor width over the image width. Without either,
	// the check at the sensor's Nyquist frequency is skipped.
	PitchUM float64 `json:"pitch_um,omitempty"`
	Pixels  [2]int  `json:"pixels,omitempty"`
	// Chart is the printed chart (sheet, orientation, margins, printer
	// resolution). An empty Chart.Aspect takes the sensor's.
	Chart chart.Options `json:"chart"`
	// ChartMM, if set, is the printed chart frame's width and height in mm,
	// overriding the size the layout would give (for a chart printed
	// elsewhere).
	ChartMM [2]float64 `json:"chart_mm,omitempty"`
	// Surface is the paper's surface: "photo" (coated, the default) or
	// "plain". InkSpreadUM, if set, replaces the surface's ink spread (um,
	// standard deviation on paper).
	Surface     string  `json:"surface,omitempty"`
	InkSpreadUM float64 `json:"ink_spread_um,omitempty"`
	// FreqsLPMM are the field frequencies on the sensor, lp/mm (default 10
	// and 30: the usual pair for full frame, common practice).
	FreqsLPMM []float64 `json:"freqs_lp_mm,omitempty"`
}

// Freq is one sensor frequency and what it is on paper.
type Freq struct {
	SensorLPMM float64 `json:"sensor_lp_mm"`
	PaperLPMM  float64 `json:"paper_lp_mm"`
	// PrintMTF is the print's own MTF there (the print model above): the
	// factor by which the print lowers what the camera can show.
	PrintMTF float64 `json:"print_mtf"`
}

// Verdicts of the chart-limit check.
const (
	VerdictFine       = "fine"          // the print keeps at least MinPrintMTF up to Nyquist
	VerdictBorderline = "borderline"    // fine at the field frequencies, not up to Nyquist
	VerdictLimited    = "chart-limited" // below MinPrintMTF at a field frequency
)

// MinPrintMTF is the least print MTF at which the print counts as sharp
// enough: it then lowers a measured MTF by at most 5 %, less than the spread
// between repeated home measurements (Sagitta's own threshold).
const MinPrintMTF = 0.95

// MinFocalLengths is the distance, in focal lengths, below which the
// planner warns that the lens works at close range (common practice: about
// 25 focal lengths).
const MinFocalLengths = 25

// Plan is the planner's answer.
type Plan struct {
	SensorMM [2]float64 `json:"sensor_mm"`
	PitchUM  float64    `json:"pitch_um,omitempty"`
	Paper    string     `json:"paper"`
	DPI      float64    `json:"dpi"`
	Aspect   string     `json:"aspect"`
	ChartMM  [2]float64 `json:"chart_mm"` // printed chart frame, mm
	// Limit is the chart side that limits the framing: "height" or "width".
	Limit string `json:"limited_by"`
	// Magnification m = sensor side / chart side along Limit.
	Magnification float64 `json:"magnification"`
	// ObjectDistanceMM u = f (1 + 1/m); ImageDistanceMM v = f (1 + m);
	// SensorToChartMM u + v, all for a thin lens.
	ObjectDistanceMM float64 `json:"object_distance_mm"`
	ImageDistanceMM  float64 `json:"image_distance_mm"`
	SensorToChartMM  float64 `json:"sensor_to_chart_mm"`
	FocalLengths     float64 `json:"distance_focal_lengths"` // u / f
	// Freqs are the field frequencies; Nyquist, when the pitch is known,
	// the sensor's Nyquist frequency 1 / (2 pitch).
	Freqs   []Freq `json:"frequencies"`
	Nyquist *Freq  `json:"nyquist,omitempty"`
	// InkSpreadUM is the ink spread used; PrintBlurUM the print's blur on
	// paper and PrintBlurSensorUM on the sensor (standard deviations), and
	// BlurOverPitch the latter over the pixel pitch.
	InkSpreadUM       float64 `json:"ink_spread_um"`
	PrintBlurUM       float64 `json:"print_blur_um"`
	PrintBlurSensorUM float64 `json:"print_blur_sensor_um"`
	BlurOverPitch     float64 `json:"blur_over_pitch,omitempty"`
	Verdict           string  `json:"verdict"`
	// Summary says the verdict in words; Advice what to change; Warnings
	// other cautions, with their codes aligned in WarningCodes (core/note).
	Summary string   `json:"summary"`
	Advice  []string `json:"advice"`
	// Tiling, when one sheet limits the measurement (verdict not "fine")
	// and the chart is on one sheet, is the chart across 2 x 2 or 3 x 3
	// sheets of the same paper that would serve (tiling.go).
	Tiling       *Tiling  `json:"tiling,omitempty"`
	Warnings     []string `json:"warnings"`
	WarningCodes []string `json:"warning_codes"`

	limitLong bool // the chart's long side limits the framing
}

// Error reports planner inputs that make no plan, in plain words.
type Error string

func (e Error) Error() string { return "plan: " + string(e) }

func errf(format string, a ...any) error { return Error(fmt.Sprintf(format, a...)) }

// SensorFormat is a named sensor size: the one table of sensor names used
// by "sagitta plan --sensor", "sagitta analyze --sensor" and the page's
// sensor presets (site/index.html; sensor_test.go checks they agree).
type SensorFormat struct {
	// Name is the name accepted on the command line, e.g. "full-frame".
	Name string
	// Label is the page's word for it, e.g. "Full frame".
	Label string
	// WMM, HMM are the size, mm.
	WMM, HMM float64
	// Typical marks a size that varies by maker ("about").
	Typical bool
}

// Sensors lists the sensor formats by name. Full frame 36 x 24 mm is common
// practice; the others are from memory (APS-C varies by maker).
var Sensors = []SensorFormat{
	{"full-frame", "Full frame", 36, 24, false},
	{"aps-c", "APS-C", 23.5, 15.6, true},
	{"four-thirds", "Four Thirds", 17.3, 13.0, false},
	{"1-inch", "1-inch type", 13.2, 8.8, false},
}

// SensorNames lists the names of Sensors, comma separated.
func SensorNames() string {
	names := make([]string, len(Sensors))
	for i, f := range Sensors {
		names[i] = f.Name
	}
	return strings.Join(names, ", ")
}

// Ink spread (standard deviation on paper, um) by paper surface, from
// memory.
var inkSpreadUM = map[string]float64{"photo": 10, "plain": 25}

// InkSpreadUM returns the ink spread (standard deviation on paper, um) the
// planner assumes for a paper surface ("photo" or "plain"; from memory, see
// the package doc), and whether the surface is known.
func InkSpreadUM(surface string) (float64, bool) {
	s, ok := inkSpreadUM[surface]
	return s, ok
}

// Compute makes the plan. Errors are of type Error, or chart.OptionError for
// the chart's options, in plain words.
func Compute(opt Options) (Plan, error) {
	var p Plan
	if !(opt.FocalMM > 0 && opt.FocalMM <= 5000) {
		return p, errf("focal length %g mm is not between 0 and 5000 mm", opt.FocalMM)
	}
	sensor, err := ParseSensor(opt.Sensor)
	if err != nil {
		return p, err
	}
	p.SensorMM = sensor
	switch {
	case opt.PitchUM > 0:
		p.PitchUM = opt.PitchUM
	case opt.Pixels[0] > 0:
		p.PitchUM = sensor[0] * 1000 / float64(opt.Pixels[0])
	}
	if p.PitchUM != 0 && !(p.PitchUM >= 0.3 && p.PitchUM <= 50) {
		return p, errf("pixel pitch %.3g um is outside 0.3 to 50 um", p.PitchUM)
	}
	co := opt.Chart
	if co.Aspect == "" {
		co.Aspect = nearestAspect(sensor)
	}
	layout, err := chart.NewLayout(co)
	if err != nil {
		return p, err
	}
	p.Paper, p.DPI, p.Aspect = layout.Paper, layout.DPI, co.Aspect
	if layout.Portrait {
		p.Paper += " portrait"
	}
	cw, ch := layout.ChartMM()
	if opt.ChartMM[0] > 0 || opt.ChartMM[1] > 0 {
		if !(opt.ChartMM[0] > 0 && opt.ChartMM[1] > 0) {
			return p, errf("a chart size needs both width and height in mm")
		}
		cw, ch = opt.ChartMM[0], opt.ChartMM[1]
	}
	p.ChartMM = [2]float64{cw, ch}
	// The sensor's long side lies along the chart's long side.
	sl, ss := math.Max(sensor[0], sensor[1]), math.Min(sensor[0], sensor[1])
	cl, cs := math.Max(cw, ch), math.Min(cw, ch)
	p.Magnification = ss / cs
	if sl/cl < p.Magnification {
		p.Magnification, p.limitLong = sl/cl, true
	}
	// Name the limiting side as the chart is seen: its long side is its
	// width unless the chart is upright.
	if p.limitLong == (cw >= ch) {
		p.Limit = "width"
	} else {
		p.Limit = "height"
	}
	m, f := p.Magnification, opt.FocalMM
	p.ObjectDistanceMM = f * (1 + 1/m)
	p.ImageDistanceMM = f * (1 + m)
	p.SensorToChartMM = p.ObjectDistanceMM + p.ImageDistanceMM
	p.FocalLengths = p.ObjectDistanceMM / f

	surface := strings.ToLower(strings.TrimSpace(opt.Surface))
	if surface == "" {
		surface = "photo"
	}
	spread, ok := inkSpreadUM[surface]
	if !ok {
		return p, errf("unknown paper surface %q (choose photo or plain)", opt.Surface)
	}
	if opt.InkSpreadUM != 0 {
		if !(opt.InkSpreadUM > 0 && opt.InkSpreadUM <= 500) {
			return p, errf("ink spread %g um is outside 0 to 500 um", opt.InkSpreadUM)
		}
		spread = opt.InkSpreadUM
	}
	p.InkSpreadUM = spread
	pr := printer{dotMM: 25.4 / p.DPI, spreadMM: spread / 1000}
	p.PrintBlurUM = 1000 * pr.sigmaMM()
	p.PrintBlurSensorUM = p.PrintBlurUM * m
	if p.PitchUM > 0 {
		p.BlurOverPitch = p.PrintBlurSensorUM / p.PitchUM
	}
	freqs := opt.FreqsLPMM
	if len(freqs) == 0 {
		freqs = []float64{10, 30}
	}
	for _, fr := range freqs {
		if !(fr > 0 && fr <= 1000) {
			return p, errf("field frequency %g lp/mm is outside 0 to 1000", fr)
		}
		p.Freqs = append(p.Freqs, Freq{fr, fr * m, pr.mtf(fr * m)})
	}
	if p.PitchUM > 0 {
		ny := 1000 / (2 * p.PitchUM)
		p.Nyquist = &Freq{ny, ny * m, pr.mtf(ny * m)}
	}
	p.verdict(opt, co, pr)
	return p, nil
}

// printer is the print model of the package doc.
type printer struct{ dotMM, spreadMM float64 }

// mtf returns the print's MTF at F cycles/mm on paper.
func (pr printer) mtf(f float64) float64 {
	x := f * pr.dotMM
	s := 1.0
	if x != 0 {
		s = math.Abs(math.Sin(math.Pi*x) / (math.Pi * x))
	}
	return s * math.Exp(-2*math.Pi*math.Pi*pr.spreadMM*pr.spreadMM*f*f)
}

// sigmaMM is the print's blur on paper: the box's variance p^2/12 plus the
// spread's, square-rooted.
func (pr printer) sigmaMM() float64 { return math.Sqrt(pr.dotMM*pr.dotMM/12 + pr.spreadMM*pr.spreadMM) }

// maxPaperLPMM returns the highest paper frequency at which the print keeps
// MinPrintMTF (bisection; the model falls monotonically up to the dot's
// first zero).
func (pr printer) maxPaperLPMM() float64 {
	lo, hi := 0.0, 1/pr.dotMM
	for range 60 {
		mid := (lo + hi) / 2
		if pr.mtf(mid) >= MinPrintMTF {
			lo = mid
		} else {
			hi = mid
		}
	}
	return lo
}

// nearestAspect returns the chart aspect closest to the sensor's shape.
func nearestAspect(s [2]float64) string {
	r := math.Max(s[0], s[1]) / math.Min(s[0], s[1])
	best, name := math.Inf(1), "3:2"
	for _, a := range []struct {
		n string
		r float64
	}{{"3:2", 1.5}, {"4:3", 4.0 / 3}, {"16:9", 16.0 / 9}, {"1:1", 1}} {
		if d := math.Abs(math.Log(r / a.r)); d < best {
			best, name = d, a.n
		}
	}
	return name
}

// SensorByName returns the size (mm) of the named format of Sensors, any
// case, spaces around ignored.
func SensorByName(name string) ([2]float64, bool) {
	key := strings.ToLower(strings.TrimSpace(name))
	for _, f := range Sensors {
		if key == f.Name {
			return [2]float64{f.WMM, f.HMM}, true
		}
	}
	return [2]float64{}, false
}

// ParseSensor reads a sensor size: "WxH" in mm (each side 1 to 200 mm) or
// a name from Sensors.
func ParseSensor(s string) ([2]float64, error) {
	if v, ok := SensorByName(s); ok {
		return v, nil
	}
	key := strings.ToLower(strings.TrimSpace(s))
	parts := strings.Split(strings.ReplaceAll(key, " ", ""), "x")
	if len(parts) == 2 {
		w, e1 := strconv.ParseFloat(parts[0], 64)
		h, e2 := strconv.ParseFloat(parts[1], 64)
		if e1 == nil && e2 == nil && w >= 1 && h >= 1 && w <= 200 && h <= 200 {
			return [2]float64{w, h}, nil
		}
	}
	return [2]float64{}, errf("sensor %q is not a size in mm like 36x24 (each side 1 to 200 mm) or one of %s", s, SensorNames())
}
