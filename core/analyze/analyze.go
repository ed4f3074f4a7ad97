// Package analyze runs Sagitta's one pipeline for one photo:
//
//	bytes + Settings -> decode -> find -> measure -> field -> Image
//
// The command-line tool and the WebAssembly glue both call Run and nothing
// else of the pipeline, so the browser and the native build give the same
// numbers. Resummarise applies a new pixel pitch, optical centre or field
// frequencies to an existing Image without the photo (resummarise.go); Run
// ends with the same step, so both give the same numbers.
package analyze

import (
	"context"
	"errors"
	"fmt"
	"math"
	"strings"

	"sagitta/core/decode"
	"sagitta/core/edge"
	"sagitta/core/exif"
	"sagitta/core/field"
	"sagitta/core/note"
)

// DefaultFreqsLPMM are the field frequencies used when none are given:
// 10 and 30 lp/mm, the usual pair for full-frame lenses (common practice).
var DefaultFreqsLPMM = []float64{10, 30}

// Stages named in progress reports, in order.
const (
	StageReading   = "reading"
	StageFinding   = "finding targets"
	StageMeasuring = "measuring"
	StageSumming   = "summarising"
)

// Progress receives the current stage and the fraction (0..1) of the whole
// analysis done. It is called from the goroutine that called Run.
type Progress func(stage string, fraction float64)

// Run analyses one photo: its three stages (stages.go) in one process. It
// never panics: an internal failure comes back as an error. It stops early
// with ctx.Err() when ctx is cancelled.
func Run(ctx context.Context, name string, data []byte, s Settings, progress Progress) (*Image, error) {
	if progress == nil {
		progress = func(string, float64) {}
	}
	f, err := Find(ctx, Photo{Name: name, Data: data}, s, progress)
	if err != nil {
		return nil, err
	}
	n := f.Targets()
	progress(StageMeasuring, 0.3)
	// The comparison of edges with the diffraction limit depends on the
	// pitch, so it is made when the records are placed (place), not here.
	parts, err := measureSafely(ctx, &f.Measurer, 0, n, func(done int) {
		progress(StageMeasuring, 0.3+0.6*float64(done)/float64(max(n, 1)))
	})
	if err != nil {
		return nil, err
	}
	return f.Finish(ctx, parts, progress)
}

// measureSafely is Measure with a panic turned into an error.
func measureSafely(ctx context.Context, m *Measurer, lo, hi int, done func(int)) (parts []Part, err error) {
	defer func() {
		if r := recover(); r != nil {
			parts, err = nil, fmt.Errorf("analyze: internal error: %v", r)
		}
	}()
	return m.Measure(ctx, lo, hi, done)
}

// checked holds the settings Run and Resummarise read before using them.
type checked struct {
	method edge.Method
	tone   decode.Tone
	freqs  []float64 // field frequencies, lp/mm
}

// check parses the estimator and the tone and validates the field
// frequencies (DefaultFreqsLPMM when none are given).
func (s Settings) check() (checked, error) {
	var c checked
	var err error
	if c.method, err = edge.ParseMethod(s.Method); err != nil {
		return c, err
	}
	if c.tone, err = decode.ParseTone(s.Tone); err != nil {
		return c, err
	}
	c.freqs = s.FreqsLPMM
	if len(c.freqs) == 0 {
		c.freqs = DefaultFreqsLPMM
	}
	for _, f := range c.freqs {
		if !(f > 0) || f > 1000 {
			return c, fmt.Errorf("analyze: field frequency %g lp/mm is outside (0, 1000]", f)
		}
	}
	return c, nil
}

// placeFrame sets the image's pixel pitch and its source, optical centre,
// corner height and field frequencies from the settings, and returns the
// field geometry they make. Run and Resummarise both place the frame with
// it.
func placeFrame(img *Image, s Settings, freqs []float64) (field.Geometry, error) {
	var err error
	var from note.Code
	img.PitchUM, img.PitchSource, from, err = pitch(s, img.Width, img.Exif.tags())
	img.PitchFrom = string(from)
	if err != nil {
		return field.Geometry{}, err
	}
	if img.PitchSource == "sensor size" && img.PitchUM > MaxPitchUM {
		return field.Geometry{}, fmt.Errorf("analyze: the sensor format over this photo's %d px width makes pixels of %.0f um, more than %d um: enter the pixel pitch, or measure the photo at its full size", img.Width, img.PitchUM, MaxPitchUM)
	}
	_, fromExif := exifPitch(img.Exif.tags())
	img.PitchAssumed = !(s.PitchUM > 0 || s.SensorMM[0] > 0 || fromExif)
	geo := field.NewGeometry(img.Width, img.Height, img.PitchUM)
	if s.CentrePx != nil {
		geo.CentreX, geo.CentreY = s.CentrePx[0], s.CentrePx[1]
	}
	if err := geo.Validate(); err != nil {
		return field.Geometry{}, err
	}
	img.CentrePx = [2]float64{geo.CentreX, geo.CentreY}
	img.CornerMM = geo.CornerMM()
	img.FreqsLPMM = append([]float64(nil), freqs...)
	return geo, nil
}

// ErrNoTargets is returned (wrapped) when a photo holds nothing measurable.
var ErrNoTargets = errors.New("no measurable edge found")

// noTargets explains an empty result in one line: what was set aside, and
// why, most common reason first.
func noTargets(rej []Rejected) error {
	if len(rej) == 0 {
		return fmt.Errorf("analyze: %w: the photo shows no straight boundary between dark and light areas", ErrNoTargets)
	}
	count := map[string]int{}
	for _, r := range rej {
		count[r.Reason]++
	}
	best, n := "", 0
	for reason, c := range count {
		if c > n || c == n && reason < best {
			best, n = reason, c
		}
	}
	if strings.HasPrefix(best, clippedReason) {
		return fmt.Errorf("analyze: %w: %d candidates set aside, most often because: %s. %s", ErrNoTargets, len(rej), best,
			exposureAdvice(&Image{Rejected: rej}).Text)
	}
	return fmt.Errorf("analyze: %w: %d candidates set aside, most often because: %s", ErrNoTargets, len(rej), best)
}

// pitch chooses the pixel pitch of an image widthPx wide: the user's value,
// else the sensor width over the image width, else the Exif focal-plane
// resolution, else the fallback sensor's width over the image width.
func pitch(s Settings, widthPx int, tags exif.Tags) (float64, string, note.Code, error) {
	switch {
	case s.PitchUM > 0:
		return s.PitchUM, "user", note.PitchUser, nil
	case s.SensorMM[0] > 0:
		return s.SensorMM[0] * 1000 / float64(widthPx), "sensor size", note.PitchSensor, nil
	}
	if p, ok := exifPitch(tags); ok {
		return p, "Exif focal-plane resolution", note.PitchExif, nil
	}
	if s.FallbackSensorMM[0] > 0 {
		return s.FallbackSensorMM[0] * 1000 / float64(widthPx), "sensor size", note.PitchSensor, nil
	}
	return 0, "", "", errors.New("analyze: the pixel pitch is unknown: give it in um, or the sensor size in mm")
}

// exifPitch returns the pixel pitch the Exif focal-plane resolution gives,
// if it is usable.
func exifPitch(tags exif.Tags) (float64, bool) {
	p, ok := tags.PixelPitchUM()
	return p, ok && p > 0.3 && p < 50
}

// measureOne measures one region, turning a panic into an error so one bad
// target cannot take the photo's analysis down.
func measureOne(dec *decode.Image, r edge.Region, opt measureOptions) (o outcome) {
	defer func() {
		if p := recover(); p != nil {
			o = outcome{err: fmt.Errorf("internal error: %v", p)}
		}
	}()
	if dec.Raw != nil && dec.Raw.CFA {
		m, chans, err := measureRaw(dec, r, opt.Method)
		o = outcome{m: m, chans: chans, err: err}
		if err == nil {
			o.colour = rawColourOf(dec.Raw, m)
		}
		return o
	}
	if dec.Raw != nil {
		m, chans, err := measureRaw(dec, r, opt.Method)
		o = outcome{m: m, chans: chans, err: err}
		if err == nil {
			o.colour, _ = colourOf(dec, m, r, false, nil)
		}
		return o
	}
	m, err := edge.Measure(dec.Lum, r, opt.Options)
	if err != nil {
		return outcome{err: err}
	}
	o = outcome{m: m}
	o.colour, o.chans = colourOf(dec, m, r, opt.channels, opt.toneMap)
	return o
}

// Measurements with these flags are set aside rather than reported: their
// numbers would mislead (common practice for the slanted-edge method).
func unusable(m *edge.Measurement) (note.Note, bool) {
	for _, f := range m.Flags {
		switch f {
		case edge.FlagClippedDark, edge.FlagClippedLight:
			return note.New(note.Clipped, clippedReason+"the "+map[edge.Flag]string{edge.FlagClippedDark: "dark", edge.FlagClippedLight: "light"}[f]+" side reaches the limit of the file's values"), true
		}
	}
	if m.BowPx > maxBowPx {
		return note.New(note.Curved, fmt.Sprintf("curved: bows by %.1f px", m.BowPx)), true
	}
	return note.Note{}, false
}

// clippedReason begins the reason of an edge set aside for clipping.
const clippedReason = "clipped: "

// maxBowPx is the bow beyond which an edge is not taken as straight.
const maxBowPx = 2.0

func rejectOf(r edge.Region, why note.Note) Rejected {
	tx, ty := math.Cos(r.AngleDeg*math.Pi/180), math.Sin(r.AngleDeg*math.Pi/180)
	return Rejected{r.X - r.HalfLen*tx, r.Y - r.HalfLen*ty, r.X + r.HalfLen*tx, r.Y + r.HalfLen*ty, why.Text, string(why.Code)}
}

func plainError(err error) string {
	msg := err.Error()
	const p = "edge: "
	if len(msg) > len(p) && msg[:len(p)] == p {
		return msg[len(p):]
	}
	return msg
}

// record turns an edge measurement into the contract's record, but for
// what depends on the settings' geometry and field frequencies (see place).
func record(m *edge.Measurement, r edge.Region) Measurement {
	rec := Measurement{
		Kind: "edge", XPx: m.X, YPx: m.Y,
		NormalDeg:  m.NormalDeg,
		Freq:       m.Curve.Freq,
		MTF:        m.Curve.Value,
		Warnings:   []string{},
		Flags:      []string{},
		Region:     r.Corners(),
		LengthPx:   m.LengthPx,
		SlantDeg:   m.SlantDeg,
		SNR:        Number(m.SNR),
		Overshoot:  m.Overshoot,
		ESF:        profileOf(m.ESF),
		LSF:        profileOf(m.LSF),
		StdErr:     m.SE,
		DarkLinear: m.Dark, LightLinear: m.Light,
	}
	sh := Sharpening(m.Sharpening)
	rec.Sharpening = &sh
	if m.Dark > 0 {
		rec.Contrast = Number(m.Light / m.Dark)
	} else {
		rec.Contrast = Number(math.Inf(1))
	}
	for _, f := range m.Flags {
		text := flagText[f]
		if f == edge.FlagSharpened {
			text = sharpenedText(sh.MTF50Lift)
		}
		rec.Warnings = append(rec.Warnings, text)
		rec.Flags = append(rec.Flags, string(f))
	}
	return rec
}

// sharpenedText is the warning of a sharpened edge, with the estimated
// lift of MTF50 when there is one.
func sharpenedText(lift float64) string {
	if lift > 0 {
		return flagText[edge.FlagSharpened] + fmt.Sprintf(" (MTF50 lifted by about %.0f %%)", 100*lift)
	}
	return flagText[edge.FlagSharpened]
}

// flagText words each quality flag for people.
var flagText = map[edge.Flag]string{
	edge.FlagClippedDark:  "the dark side is clipped",
	edge.FlagClippedLight: "the light side is clipped",
	edge.FlagAtLimit:      "a side sits at the limit of the file's values (measured, but there is no room left above or below it)",
	edge.FlagLowContrast:  "low contrast",
	edge.FlagShortEdge:    "short edge",
	edge.FlagCurved:       "the edge is curved",
	edge.FlagCritical:     "the slant samples the edge coarsely (near a critical angle)",
	edge.FlagNoisy:        "noisy",
	edge.FlagSharpened:    "signs of in-camera sharpening beyond the noise (the edge's profile dips below its plateaus, or its MTF exceeds what optics can transfer; very strong JPEG compression can also ring): sharpening inflates this MTF",
}
