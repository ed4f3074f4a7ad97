package analyze

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"sync"
	"testing"

	"sagitta/core/exif"
	"sagitta/core/sim/demo"
	"sagitta/core/sim/simcam"
)

// Resummarise is checked against Run itself: measuring a photo with
// settings A and then resummarising to settings B must give what Run gives
// with B directly, number for number, whether Resummarise is handed Run's
// value or that value read back from its JSON (as in the browser).

// fixture is a photo and its analyses, made once per test binary.
type fixture struct {
	once sync.Once
	make func() ([]byte, error)
	data []byte
	err  error
}

func (f *fixture) photo(t *testing.T) []byte {
	t.Helper()
	f.once.Do(func() { f.data, f.err = f.make() })
	if f.err != nil {
		t.Fatal(f.err)
	}
	return f.data
}

var (
	// The demo lens and camera photographing a sheet of squares, 1000 x
	// 666 px, pixel pitch from Exif; no sine pattern.
	squaresPhoto = &fixture{make: func() ([]byte, error) { return demo.PortraitSmall(6).SquaresPhoto() }}
	// Sagitta's chart through the demo lens, 1500 x 1000 px: edges, five
	// stars, gratings, the chart's set-up checks (its tilt needs the pitch).
	chartPhoto = &fixture{make: func() ([]byte, error) { return demo.PortraitSmall(4).Photo() }}
	// Squares, a sine star and three sine gratings (patternScene).
	starPhoto = &fixture{make: func() ([]byte, error) { return patternScene(true) }}
	// The same without the star.
	gratingPhoto = &fixture{make: func() ([]byte, error) { return patternScene(false) }}
)

// patternScene renders 1200 x 800 px through a field-dependent Gaussian
// lens: four squares turned to the radius at 250 px from the centre, with
// (star) a sine star among them, and three sine gratings in a row left of
// the centre (0.03 cy/px, the reference, then 0.12 and 0.22), their lines
// across the row, so that they lie along the radius from the image centre
// and one set forms; moved optical centres split them.
func patternScene(star bool) ([]byte, error) {
	const w, h = 1200, 800
	lens := simcam.FieldLens{CentreX: w / 2, CentreY: h / 2, PitchUM: 5, SigmaT: []float64{0.7, 0.08}, SigmaS: []float64{0.7, 0.02}}
	sc := simcam.Scene{Background: 0.75}
	if star {
		sc.Stars = append(sc.Stars, simcam.Star{X: w/2 + 250, Y: h / 2, Radius: 110, Cycles: 48, Mean: 0.42, Amplitude: 0.32})
	}
	for _, a := range []float64{-40, 40, 140, 220} {
		x := w/2 + 250*math.Cos(a*math.Pi/180)
		y := h/2 + 250*math.Sin(a*math.Pi/180)
		sc.Polygons = append(sc.Polygons, simcam.Square(x, y, 90, a+5, 0.12))
	}
	for i, f := range []float64{0.03, 0.12, 0.22} {
		gx, gy := 200+130*float64(i), float64(h)/2
		c := [4][2]float64{{gx - 55, gy - 50}, {gx + 55, gy - 50}, {gx + 55, gy + 50}, {gx - 55, gy + 50}}
		sc.Gratings = append(sc.Gratings, simcam.Grating{Corners: c, FreqCyPx: f, Mean: 0.42, Amplitude: 0.3})
	}
	cam := simcam.Camera{W: w, H: h, Lens: lens, Encoding: simcam.SRGB8, FullWellE: 20000, Seed: 3}
	return cam.Encode(sc)
}

func run(t *testing.T, data []byte, s Settings) *Image {
	t.Helper()
	img, err := Run(context.Background(), "photo", data, s, nil)
	if err != nil {
		t.Fatal(err)
	}
	return img
}

func marshal(t *testing.T, img *Image) []byte {
	t.Helper()
	b, err := json.Marshal(img)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// viaJSON returns img read back from its JSON.
func viaJSON(t *testing.T, img *Image) *Image {
	t.Helper()
	var back Image
	if err := json.Unmarshal(marshal(t, img), &back); err != nil {
		t.Fatal(err)
	}
	return &back
}

func at(x, y float64) *[2]float64 { return &[2]float64{x, y} }

// TestResummariseEqualsRun: for a new optical centre, new field
// frequencies and a new pitch (from Exif to a sensor size or a value, and
// back), Resummarise(Run(A), B) has the JSON of Run(B): every number within
// 1e-9 (in practice the same bytes), from Run's value and from its JSON;
// and Run(A) is left as it was.
func TestResummariseEqualsRun(t *testing.T) {
	cases := []struct {
		name  string
		photo *fixture
		a, b  Settings
		short bool
	}{
		{"squares: optical centre", squaresPhoto, Settings{}, Settings{CenterPx: at(637.3, 271.7)}, true},
		{"squares: field frequencies 20, 40", squaresPhoto, Settings{}, Settings{FreqsLPMM: []float64{20, 40}}, true},
		{"squares: pitch from Exif to a 36 x 24 mm sensor", squaresPhoto, Settings{}, Settings{SensorMM: [2]float64{36, 24}}, true},
		{"squares: all three and back", squaresPhoto, Settings{PitchUM: 30, CenterPx: at(480, 350), FreqsLPMM: []float64{5}}, Settings{}, false},
		{"star and gratings: pitch and frequencies", starPhoto, Settings{PitchUM: 5}, Settings{PitchUM: 4, FreqsLPMM: []float64{20, 40}}, true},
		{"gratings: optical centre splits the set", gratingPhoto, Settings{PitchUM: 5}, Settings{PitchUM: 5, CenterPx: at(330, 600)}, true},
		{"chart: pitch from Exif to 5.5 um, frequencies 15, 45", chartPhoto, Settings{}, Settings{PitchUM: 5.5, FreqsLPMM: []float64{15, 45}}, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if testing.Short() && !c.short {
				t.Skip("heavy")
			}
			data := c.photo.photo(t)
			a := run(t, data, c.a)
			want := run(t, data, c.b)
			before := marshal(t, a)
			for _, from := range []struct {
				name string
				img  *Image
			}{{"Run's value", a}, {"its JSON", viaJSON(t, a)}} {
				got, err := Resummarise(from.img, c.b)
				if err != nil {
					t.Fatalf("from %s: %v", from.name, err)
				}
				gb, wb := marshal(t, got), marshal(t, want)
				if d := jsonDiff(gb, wb, 1e-9); d != "" {
					t.Errorf("from %s: resummarised and measured differ at %s", from.name, d)
				} else if string(gb) != string(wb) {
					t.Logf("from %s: equal within 1e-9, not byte for byte", from.name)
				}
			}
			if string(marshal(t, a)) != string(before) {
				t.Error("Resummarise changed its input")
			}
			t.Logf("%d records (%d before), centre %v, pitch %.4g um (%s), corner %.3f mm", len(want.Measurements), len(a.Measurements),
				want.CenterPx, want.PitchUM, want.PitchSource, want.CornerMM)
			// Something must have changed, or the case proves nothing.
			if string(marshal(t, want)) == string(before) {
				t.Error("settings A and B give the same result")
			}
			switch c.photo {
			case squaresPhoto:
				if c.b.SensorMM[0] == 36 {
					// Corner radius of a 36 x 24 mm sensor: sqrt(18^2 + 12^2)
					// = 21.63 mm (common practice); 666 rows make 23.98 mm.
					if math.Abs(want.CornerMM-21.63) > 0.01 {
						t.Errorf("corner %.3f mm, want 21.63", want.CornerMM)
					}
				}
			case gratingPhoto:
				if n, m := kindCount(a, "grating"), kindCount(want, "grating"); n != 1 || m != 2 {
					t.Errorf("%d grating records, then %d: the moved centre should split the one set in two", n, m)
				}
			case chartPhoto:
				if a.Chart == nil || want.Chart == nil || !(a.Chart.Setup.TiltDeg > 0) || a.Chart.Setup.TiltDeg == want.Chart.Setup.TiltDeg {
					t.Errorf("chart set-up not checked again: %+v", want.Chart)
				}
				if len(a.Stars) == 0 {
					t.Error("the chart photo has no stars: the star records are not exercised")
				}
			}
		})
	}
}

func kindCount(img *Image, kind string) int {
	n := 0
	for _, m := range img.Measurements {
		if m.Kind == kind {
			n++
		}
	}
	return n
}

// TestResummariseMeasureAgain: settings that change what was measured
// (the tone, the estimator, the optical centre of a photo with sine stars)
// give a *MeasureAgainError; bad settings and tampered results give plain
// and ResultError errors.
func TestResummariseMeasureAgain(t *testing.T) {
	sq := run(t, squaresPhoto.photo(t), Settings{})
	st := run(t, starPhoto.photo(t), Settings{PitchUM: 5})
	cases := []struct {
		name    string
		img     *Image
		s       Settings
		reasons int // MeasureAgainError with this many reasons; 0: another error
	}{
		{"tone: linear", sq, Settings{Tone: "linear"}, 1},
		{"tone: sRGB chosen where the file's rule chose it", sq, Settings{Tone: "srgb"}, 1},
		{"estimator: ISO 12233", sq, Settings{Method: "iso"}, 1},
		{"tone and estimator", sq, Settings{Tone: "gamma:2.2", Method: "iso"}, 2},
		{"optical centre of a photo with a star", st, Settings{PitchUM: 5, CenterPx: at(590, 410)}, 1},
		{"unknown estimator", sq, Settings{Method: "best"}, 0},
		{"field frequency 0", sq, Settings{FreqsLPMM: []float64{0}}, 0},
		{"no pitch", st, Settings{}, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			out, err := Resummarise(c.img, c.s)
			var again *MeasureAgainError
			switch {
			case out != nil || err == nil:
				t.Fatalf("got a result, want an error")
			case c.reasons > 0 && (!errors.As(err, &again) || len(again.Reasons) != c.reasons):
				t.Errorf("error %v (%T), want a MeasureAgainError with %d reasons", err, err, c.reasons)
			case c.reasons == 0 && errors.As(err, &again):
				t.Errorf("error %v, want one that is not a MeasureAgainError", err)
			}
			t.Logf("%v", err)
		})
	}
	// The same centre, given explicitly, is no move.
	if _, err := Resummarise(st, Settings{PitchUM: 5, CenterPx: at(600, 400)}); err != nil {
		t.Errorf("the image centre given explicitly: %v", err)
	}

	tampered := []struct {
		name   string
		change func(*Image)
	}{
		{"stars and edges made to disagree, with no warning", func(img *Image) { img.Agreement.RMSDiff = 2 * DisagreeRMS }},
		{"a curve cut short", func(img *Image) { img.Measurements[3].MTF = img.Measurements[3].MTF[:5] }},
		{"no reference grating", func(img *Image) {
			for i := range img.Gratings {
				img.Gratings[i].Reference = false
			}
		}},
		{"no size", func(img *Image) { img.Width = 0 }},
	}
	if st.Agreement == nil {
		t.Fatal("the star photo's star has no nearby edges")
	}
	for _, c := range tampered {
		img := viaJSON(t, st)
		c.change(img)
		_, err := Resummarise(img, Settings{PitchUM: 5})
		var re ResultError
		if !errors.As(err, &re) {
			t.Errorf("%s: error %v (%T), want a ResultError", c.name, err, err)
		}
	}
}

// jsonDiff compares two JSON documents; numbers may differ by tol. It
// returns the first difference as "path: a != b", or "".
func jsonDiff(a, b []byte, tol float64) string {
	var va, vb any
	if err := json.Unmarshal(a, &va); err != nil {
		return "first: " + err.Error()
	}
	if err := json.Unmarshal(b, &vb); err != nil {
		return "second: " + err.Error()
	}
	return valueDiff(va, vb, tol, "$")
}

func valueDiff(a, b any, tol float64, at string) string {
	switch x := a.(type) {
	case float64:
		y, ok := b.(float64)
		if !ok || math.Abs(x-y) > tol {
			return fmt.Sprintf("%s: %v != %v", at, a, b)
		}
	case []any:
		y, ok := b.([]any)
		if !ok || len(x) != len(y) {
			return fmt.Sprintf("%s: %d items != %v", at, len(x), b)
		}
		for i := range x {
			if d := valueDiff(x[i], y[i], tol, fmt.Sprintf("%s[%d]", at, i)); d != "" {
				return d
			}
		}
	case map[string]any:
		y, ok := b.(map[string]any)
		if !ok || len(x) != len(y) {
			return fmt.Sprintf("%s: keys differ", at)
		}
		for k := range x {
			if d := valueDiff(x[k], y[k], tol, at+"."+k); d != "" {
				return d
			}
		}
	default:
		if a != b {
			return fmt.Sprintf("%s: %v != %v", at, a, b)
		}
	}
	return ""
}

// TestPitch: the pixel pitch comes from the user's value, else the sensor
// width, else Exif, else the fallback sensor. Exif's focal-plane resolution
// is pixels per unit (CIPA DC-008, tags 0xA20E and 0xA210): 1666.67 px per
// cm is a 6 um pitch; 50 px per inch is 508 um, outside (0.3, 50) um and
// not taken.
func TestPitch(t *testing.T) {
	good := exif.Tags{FocalPlaneXRes: 10000.0 / 6, FocalPlaneResUnit: exif.UnitCentimetre}
	bad := exif.Tags{FocalPlaneXRes: 50, FocalPlaneResUnit: exif.UnitInch}
	cases := []struct {
		name string
		s    Settings
		tags exif.Tags
		want float64
		src  string
	}{
		{"user", Settings{PitchUM: 4.3, SensorMM: [2]float64{36, 24}}, good, 4.3, "user"},
		{"sensor", Settings{SensorMM: [2]float64{36, 24}, FallbackSensorMM: [2]float64{24, 16}}, good, 6, "sensor size"},
		{"Exif", Settings{FallbackSensorMM: [2]float64{24, 16}}, good, 6, "Exif focal-plane resolution"},
		{"fallback: Exif out of range", Settings{FallbackSensorMM: [2]float64{24, 16}}, bad, 4, "sensor size"},
		{"fallback: no Exif", Settings{FallbackSensorMM: [2]float64{24, 16}}, exif.Tags{}, 4, "sensor size"},
		{"none", Settings{}, bad, 0, ""},
	}
	const tol = 1e-9
	for _, c := range cases {
		p, src, err := pitch(c.s, 6000, c.tags)
		if math.Abs(p-c.want) > tol || src != c.src || (err != nil) != (c.src == "") {
			t.Errorf("%s: %g um from %q (%v), want %g from %q", c.name, p, src, err, c.want, c.src)
		}
	}
}
