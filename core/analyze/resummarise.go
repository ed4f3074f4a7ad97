package analyze

import (
	"fmt"
	"sagitta/core/chart"
	"slices"
	"strings"

	"sagitta/core/decode"
	"sagitta/core/note"
	"sagitta/core/sine"
)

// Resummarise returns a new Image: img with the pixel pitch, optical
// centre and field frequencies of s (PitchUM, SensorMM, the Exif kept in
// img, FallbackSensorMM; CentrePx; FreqsLPMM), without the photo. Every
// record's image height, orientation, angle to the radius, MTF50 in lp/mm
// and values at the field frequencies are derived again from its position,
// direction and stored curve (a sine pattern's only where it was measured),
// the gratings are grouped again by their new orientations, and the stars'
// agreement with edges, the chart's set-up checks, the warnings and the
// summary are made again, by the same code as Run's last step (summarise).
// The result equals what Run gives with s, also when img was read back
// from its JSON: every figure Resummarise derives comes from full-precision
// fields (positions, directions, curves, modulations), never from the
// figures the JSON rounds to 5 decimals.
//
// What was measured cannot change without the photo: a different tone or
// estimator (Settings.Tone, Method) gives a *MeasureAgainError. So does a
// moved optical centre when the photo has sine stars: each star is
// measured in angular segments aligned with the field radius through it
// (sine.StarOptions.AlignDeg), and its sagittal and tangential records are
// read along and across that radius. Read along a radius from another
// centre, its segments give only an interpolation between them
// (sine.Star.Along), less accurate for an astigmatic lens: on a simulated
// star behind an anisotropic Gaussian (1.3 and 0.7 px), read 22.5 degrees
// off its segments, the largest error against the analytic MTF from 0.05
// to 0.35 cy/px was 0.03 and 0.06 (the two directions) against 0.005 and
// 0.012 when aligned (TestAlongOffSegments in core/sine). So the star is
// measured again rather than reported at lower accuracy than Run gives.
//
// Settings.MaxPixels and Workers play no part (nothing is decoded or
// measured). img is not changed; the new Image shares with it the slices
// neither changes (curves, profiles, segments, Exif, the chart's marks).
// A malformed img gives a ResultError.
func Resummarise(img *Image, s Settings) (out *Image, err error) {
	if img == nil {
		return nil, ResultError("no image")
	}
	defer func() {
		if r := recover(); r != nil {
			out, err = nil, fmt.Errorf("analyze: internal error on %s: %v", img.File, r)
		}
	}()
	chk, err := s.check()
	if err != nil {
		return nil, err
	}
	if err := img.validate(); err != nil {
		return nil, err
	}
	base, err := baseWarnings(img)
	if err != nil {
		return nil, err
	}
	out = clearSummary(img)
	geo, err := placeFrame(out, s, chk.freqs)
	if err != nil {
		return nil, err
	}
	var again []note.Note
	if m := chk.method.String(); m != img.Method {
		again = append(again, note.New(note.AgainMethod, fmt.Sprintf("it was measured with the %s estimator, not %s", img.Method, m)))
	}
	if !sameTone(chk.tone, img) {
		if chk.tone.Kind == decode.ToneAuto {
			again = append(again, note.New(note.AgainTone, fmt.Sprintf("it was decoded with the tone chosen then (%s), not as the file says", img.Tone)))
		} else {
			again = append(again, note.New(note.AgainTone, fmt.Sprintf("it was decoded with tone %s (%s), not with %s as chosen now", img.Tone, img.ToneSource, chk.tone)))
		}
	}
	if out.CentrePx != img.CentrePx && len(img.Stars) > 0 {
		again = append(again, note.New(note.AgainCentreStars, "the optical centre moved and the photo has sine stars, measured along and across the radius from the old centre"))
	}
	if img.Chart != nil && (len(img.Stars) > 0 || len(img.Gratings) > 0) {
		if code, err := chart.ParseCode(img.Chart.Code); err == nil {
			if p := printInfo(s, code); p.DotsPerUnit != img.Chart.Print.DotsPerUnit {
				again = append(again, note.New(note.AgainPrint, fmt.Sprintf("its sine patterns were cut at the limit of a print of %.0f dpi, chart %.0f mm, not %.0f dpi, %.0f mm", img.Chart.Print.DPI, img.Chart.Print.ChartMM, p.DPI, p.ChartMM)))
			}
		}
	}
	if len(again) > 0 {
		e := &MeasureAgainError{}
		e.Reasons, e.Codes = note.Split(again)
		return nil, e
	}
	if err := summarise(out, geo, base); err != nil {
		return nil, err
	}
	return out, nil
}

// MeasureAgainError is Resummarise's answer when the new settings change
// what was measured, not only how it is placed and summarised: the photo
// must be measured again (Run). Reasons say what changed, in words, and
// Codes the same, aligned, for programs (core/note: note.AgainMethod,
// note.AgainTone, note.AgainCentreStars).
type MeasureAgainError struct {
	Reasons []string
	Codes   []string
}

func (e *MeasureAgainError) Error() string {
	return "analyze: measure the photo again: " + strings.Join(e.Reasons, "; ")
}

// ResultError reports an Image that Resummarise cannot use: not one that
// Run made (or its JSON), or one changed since.
type ResultError string

func (e ResultError) Error() string { return "analyze: result: " + string(e) }

// sameTone reports whether decoding with tone t gives the image's pixels:
// "auto" (and "") when the file's rule chose the tone, else the same tone
// chosen by the user. (An explicit choice equal to the file's rule decodes
// the same pixels, but the file's tone warnings and the tone source differ:
// measured again, the result stays what Run gives.)
func sameTone(t decode.Tone, img *Image) bool {
	const user = "user" // decode.Image.ToneSource for a tone the caller chose
	if t.Kind == decode.ToneAuto {
		return img.ToneSource != user
	}
	return img.ToneSource == user && img.Tone == t.String()
}

// baseWarnings returns the image's warnings that summarise does not derive
// (see derivedWarnings), with their codes, checking that the derived ones
// close the list.
func baseWarnings(img *Image) ([]note.Note, error) {
	all, ok := img.notes()
	if !ok {
		return nil, ResultError("its warning codes do not match its warnings")
	}
	tail := derivedWarnings(img)
	n := len(all) - len(tail)
	if n < 0 || !slices.Equal(all[n:], tail) {
		return nil, ResultError("its warnings do not end with those its chart check, stars and edges give")
	}
	return all[:n:n], nil
}

// clearSummary returns a copy of img without what summarise derives: no
// grating records (summarise groups the gratings again), no agreement of
// stars and edges (nor its flags), no summary and no warnings. Slices that
// summarise changes are copied; the rest are shared.
func clearSummary(img *Image) *Image {
	out := *img
	out.Measurements = make([]Measurement, 0, len(img.Measurements))
	for _, m := range img.Measurements {
		if m.Kind == "grating" {
			continue
		}
		if m.Agreement != nil {
			nf, nw := len(m.Flags), len(m.Warnings)
			if nf > 0 && nw > 0 && m.Flags[nf-1] == string(sine.FlagDisagree) && m.Warnings[nw-1] == disagreeText(m.Agreement) {
				m.Flags, m.Warnings = m.Flags[:nf-1], m.Warnings[:nw-1]
			}
			m.Agreement = nil
		}
		// Full slice expressions: appending never writes into img's arrays.
		m.Flags, m.Warnings = slices.Clip(m.Flags), slices.Clip(m.Warnings)
		out.Measurements = append(out.Measurements, m)
	}
	out.Stars = slices.Clone(img.Stars)
	for i := range out.Stars {
		out.Stars[i].Agreement = nil
		out.Stars[i].Records = []int{}
	}
	out.Gratings = slices.Clone(img.Gratings)
	if img.Chart != nil {
		c := *img.Chart
		out.Chart = &c
	}
	out.Agreement, out.Summary, out.Warnings, out.WarningCodes = nil, nil, nil, nil
	return &out
}

// validate checks what Resummarise reads of an image, so that a malformed
// one is refused rather than summarised into nonsense.
func (img *Image) validate() error {
	if img.Width <= 0 || img.Height <= 0 {
		return ResultError(fmt.Sprintf("image size %dx%d px", img.Width, img.Height))
	}
	for _, m := range img.Measurements {
		if len(m.Freq) == 0 || len(m.Freq) != len(m.MTF) {
			return ResultError(fmt.Sprintf("record %d has %d frequencies and %d values", m.ID, len(m.Freq), len(m.MTF)))
		}
		switch m.Kind {
		case "edge", "star", "grating":
		default:
			return ResultError(fmt.Sprintf("record %d is of unknown kind %q", m.ID, m.Kind))
		}
	}
	refs := 0
	for _, g := range img.Gratings {
		if g.Reference {
			refs++
			if !(g.Modulation > 0) {
				return ResultError(fmt.Sprintf("reference grating %d has modulation %g", g.ID, g.Modulation))
			}
		}
	}
	// One reference per photo, or one per direction of a recognised chart.
	if len(img.Gratings) > 0 && (refs < 1 || refs > 1 && img.Chart == nil) {
		return ResultError(fmt.Sprintf("%d reference gratings", refs))
	}
	return nil
}
