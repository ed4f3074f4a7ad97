package series

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"sagitta/core/analyze"
	"sagitta/core/optics"
)

// EqualSE is how many standard errors of their difference two stops may
// differ by and still be called equally sharp (about a 95 % two-sided
// interval; common practice).
const EqualSE = 2.0

// Aperture is an aperture series: one lens at one focal length, photographed
// at several f-numbers, and the answer to "at which stop is it sharpest".
type Aperture struct {
	// Lens and FocalMM identify the series (from Exif; empty or 0 when the
	// photos do not say).
	Lens    string  `json:"lens"`
	FocalMM float64 `json:"focal_mm"`
	// FreqsLPMM are the field frequencies of every MTF list.
	FreqsLPMM []float64 `json:"freqs_lp_mm"`
	// Zones names the zones of every per-zone list.
	Zones []string `json:"zones"`
	// Stops are the photos, by ascending f-number.
	Stops []Stop `json:"stops"`
	// Sharpest names the sharpest stop in each zone, by MTF50.
	Sharpest []Sharpest `json:"sharpest"`
	// Text is the answer in words; Caution goes with it.
	Text    string `json:"text"`
	Caution string `json:"caution"`
}

// Stop is one photo of a series.
type Stop struct {
	File    string  `json:"file"`
	FNumber float64 `json:"f_number"`
	ZoneFigures
	// Reference is a perfect lens at this f-number on the same sensor
	// (core/optics: diffraction of a circular pupil at optics.WavelengthUM
	// times the pixel aperture). PerfectMTF50LPMM is its MTF50 and PerfectMTF its MTF at
	// each field frequency.
	PerfectMTF50LPMM Number   `json:"perfect_mtf50_lp_mm"`
	PerfectMTF       []Number `json:"perfect_mtf"`
}

// Sharpest is the sharpest stop in one zone.
type Sharpest struct {
	Zone string `json:"zone"`
	// FNumber is the stop with the highest MTF50 (0 when no stop measured
	// the zone).
	FNumber float64 `json:"f_number"`
	// MTF50LPMM is its MTF50.
	MTF50LPMM Number `json:"mtf50_lp_mm"`
	// AsSharp lists the other f-numbers whose MTF50 is within EqualSE
	// standard errors of the difference: the data cannot tell them apart.
	AsSharp []float64 `json:"as_sharp"`
	Text    string    `json:"text"`
}

// focusCaution goes with every aperture series.
const focusCaution = "Many lenses shift focus as they are stopped down: focus again at every stop (common practice), or the stops focused last look sharpest. Use a tripod and a delayed shutter, and keep the light the same for every photo."

// Series errors are one sentence each.
type Error string

func (e Error) Error() string { return "series: " + string(e) }

func errorf(format string, a ...any) error { return Error(fmt.Sprintf(format, a...)) }

// ApertureSeries makes an aperture series from measured photos of one lens
// at one focal length. fNumbers, when not nil, gives each photo's f-number
// (else Exif's). It refuses photos of different lenses or focal lengths
// (by Exif), different pixel pitches or field frequencies, a photo without
// an f-number, and two photos at the same f-number.
func ApertureSeries(images []*analyze.Image, fNumbers []float64) (*Aperture, error) {
	if len(images) < 2 {
		return nil, errorf("an aperture series needs at least two photos")
	}
	if fNumbers != nil && len(fNumbers) != len(images) {
		return nil, errorf("%d f-numbers given for %d photos", len(fNumbers), len(images))
	}
	a := &Aperture{Zones: append([]string{}, Zones...), Caution: focusCaution}
	first := images[0]
	a.Lens, a.FocalMM = first.Exif.LensModel, first.Exif.FocalLengthMM
	seen := map[float64]string{}
	for i, img := range images {
		s, err := summaryOf(img)
		if err != nil {
			return nil, err
		}
		if i == 0 {
			a.FreqsLPMM = append([]float64{}, s.FreqsLPMM...)
		}
		if err := sameSeries(first, img); err != nil {
			return nil, err
		}
		if !sameFloats(s.FreqsLPMM, a.FreqsLPMM) {
			return nil, errorf("%s was summarised at other field frequencies than %s", img.File, first.File)
		}
		n := img.Exif.FNumber
		if fNumbers != nil {
			n = fNumbers[i]
		}
		if !(n > 0) || math.IsInf(n, 0) {
			return nil, errorf("%s has no f-number (its Exif does not say; give the f-numbers)", img.File)
		}
		if other, ok := seen[n]; ok {
			return nil, errorf("%s and %s are both at f/%s: a series needs one photo per stop", other, img.File, fmtF(n))
		}
		seen[n] = img.File
		zf, err := zoneFigures(s)
		if err != nil {
			return nil, err
		}
		st := Stop{File: img.File, FNumber: n, ZoneFigures: zf}
		mm := img.PitchUM / 1000
		f50, err := optics.PerfectLensMTF50(n, img.PitchUM, optics.WavelengthUM)
		if err != nil {
			return nil, errorf("%s: %v", img.File, err)
		}
		st.PerfectMTF50LPMM = Number(f50 / mm)
		cy := make([]float64, len(s.FreqsLPMM))
		for k, f := range s.FreqsLPMM {
			cy[k] = f * mm
		}
		at, _ := optics.PerfectLens(n, img.PitchUM, optics.WavelengthUM, cy) // checked by PerfectLensMTF50
		for _, v := range at {
			st.PerfectMTF = append(st.PerfectMTF, Number(v))
		}
		a.Stops = append(a.Stops, st)
	}
	sort.Slice(a.Stops, func(i, j int) bool { return a.Stops[i].FNumber < a.Stops[j].FNumber })
	var lines []string
	for z, name := range Zones {
		sh := sharpest(a.Stops, z)
		sh.Zone = name
		a.Sharpest = append(a.Sharpest, sh)
		lines = append(lines, sh.Text)
	}
	a.Text = strings.Join(lines, " ")
	return a, nil
}

// sameSeries refuses a photo whose Exif names another lens or focal length,
// or whose pixel pitch differs, from the first photo's.
func sameSeries(first, img *analyze.Image) error {
	fe, ie := first.Exif, img.Exif
	if fe.LensModel != "" && ie.LensModel != "" && fe.LensModel != ie.LensModel {
		return errorf("%s was taken with another lens (%q) than %s (%q): a series is one lens", img.File, ie.LensModel, first.File, fe.LensModel)
	}
	if fe.FocalLengthMM > 0 && ie.FocalLengthMM > 0 && math.Abs(fe.FocalLengthMM-ie.FocalLengthMM) > 0.05*fe.FocalLengthMM {
		return errorf("%s is at %g mm and %s at %g mm: a series is one focal length", img.File, ie.FocalLengthMM, first.File, fe.FocalLengthMM)
	}
	if math.Abs(first.PitchUM-img.PitchUM) > 1e-6*first.PitchUM {
		return errorf("%s has another pixel size (%g um) than %s (%g um): a series is one camera", img.File, img.PitchUM, first.File, first.PitchUM)
	}
	return nil
}

// sharpest finds the stop with the highest MTF50 in zone z and the stops
// that the uncertainty cannot tell from it.
func sharpest(stops []Stop, z int) Sharpest {
	best := -1
	for i, st := range stops {
		v := float64(st.MTF50LPMM[z].Value)
		if finite(v) && (best < 0 || v > float64(stops[best].MTF50LPMM[z].Value)) {
			best = i
		}
	}
	sh := Sharpest{MTF50LPMM: Number(math.NaN()), AsSharp: []float64{}}
	if best < 0 {
		sh.Text = fmt.Sprintf("%s: not measured at any stop.", capital(Zones[z]))
		return sh
	}
	b := stops[best].MTF50LPMM[z]
	sh.FNumber, sh.MTF50LPMM = stops[best].FNumber, b.Value
	for i, st := range stops {
		v := st.MTF50LPMM[z]
		if i == best || !finite(float64(v.Value)) {
			continue
		}
		se := math.Hypot(seOrZero(b.SE), seOrZero(v.SE))
		if float64(b.Value)-float64(v.Value) <= EqualSE*se {
			sh.AsSharp = append(sh.AsSharp, st.FNumber)
		}
	}
	where := map[string]string{ZoneCentre: "In the centre", ZoneMiddle: "In the middle of the field", ZoneCorner: "In the corners"}[Zones[z]]
	sh.Text = fmt.Sprintf("%s the lens is sharpest at f/%s (MTF50 %.0f lp/mm).", where, fmtF(sh.FNumber), float64(b.Value))
	if len(sh.AsSharp) > 0 {
		fs := make([]string, len(sh.AsSharp))
		for i, f := range sh.AsSharp {
			fs[i] = "f/" + fmtF(f)
		}
		verb := "is"
		if len(fs) > 1 {
			verb = "are"
		}
		sh.Text += fmt.Sprintf(" %s %s as sharp within the uncertainty.", joinAnd(fs), verb)
	}
	return sh
}

func seOrZero(n Number) float64 {
	if v := float64(n); finite(v) {
		return v
	}
	return 0
}

// fmtF formats an f-number as photographers write it (2.8, 4, 5.6, 11).
func fmtF(n float64) string {
	if math.Abs(n-math.Round(n)) < 0.05 && n >= 10 || math.Abs(n-math.Round(n)) < 0.01 {
		return fmt.Sprintf("%.0f", n)
	}
	return fmt.Sprintf("%.1f", n)
}

func joinAnd(s []string) string {
	if len(s) < 2 {
		return strings.Join(s, "")
	}
	return strings.Join(s[:len(s)-1], ", ") + " and " + s[len(s)-1]
}

func capital(s string) string {
	if s == "" {
		return s
	}
	return strings.ToUpper(s[:1]) + s[1:]
}

func sameFloats(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Abs(a[i]-b[i]) > 1e-9 {
			return false
		}
	}
	return true
}
