package analyze

import (
	"math"
	"slices"
	"testing"

	"sagitta/core/edge"
)

// TestDiffractionCheck: the curve of a perfect lens at f/2 on 4 um pixels,
// times 0.97 (circular-pupil MTF, cut-off 1 / (0.555 um x 2) = 3.6 cy/px,
// Goodman, Introduction to Fourier Optics, 3rd ed., ch. 6, times the pixel
// aperture's sinc, Boreman, MTF in Optical and Electro-Optical Systems,
// ch. 2) is far above what a perfect lens transfers at f/16 (cut-off 0.45
// cy/px): flagged there when the pitch is known, not when it is assumed,
// and not at f/2; applying the check twice changes nothing (Resummarise
// relies on that).
func TestDiffractionCheck(t *testing.T) {
	rec := func() Measurement {
		m := Measurement{Kind: "edge", NormalDeg: 5, Flags: []string{}, Warnings: []string{},
			Sharpening: &Sharpening{Signs: []string{}}}
		s, c := math.Sincos(5 * math.Pi / 180)
		sinc := func(x float64) float64 {
			if x == 0 {
				return 1
			}
			return math.Sin(math.Pi*x) / (math.Pi * x)
		}
		for i := 0; i <= 100; i++ {
			f := float64(i) / 100
			v := f / (4 / (0.555 * 2))
			d := 2 / math.Pi * (math.Acos(v) - v*math.Sqrt(1-v*v))
			m.Freq = append(m.Freq, f)
			m.MTF = append(m.MTF, 0.97*d*math.Abs(sinc(f*c)*sinc(f*s)))
			m.StdErr = append(m.StdErr, 0.005)
		}
		m.MTF[0] = 1
		return m
	}
	img := &Image{PitchUM: 4, Exif: ExifTags{FNumber: 16}}
	m := rec()
	diffractionCheck(&m, img)
	diffractionCheck(&m, img)
	if !slices.Equal(m.Sharpening.Signs, []string{edge.SignDiffraction}) || !slices.Equal(m.Flags, []string{"sharpened"}) || len(m.Warnings) != 1 {
		t.Errorf("known pitch: signs %v flags %v warnings %v", m.Sharpening.Signs, m.Flags, m.Warnings)
	}
	img.PitchAssumed = true
	diffractionCheck(&m, img)
	if len(m.Sharpening.Signs) != 0 || len(m.Flags) != 0 || len(m.Warnings) != 0 {
		t.Errorf("assumed pitch: signs %v flags %v warnings %v", m.Sharpening.Signs, m.Flags, m.Warnings)
	}
	img.PitchAssumed, img.Exif.FNumber = false, 2
	m = rec()
	diffractionCheck(&m, img)
	if len(m.Flags) != 0 {
		t.Errorf("f/2: flags %v", m.Flags)
	}
}
