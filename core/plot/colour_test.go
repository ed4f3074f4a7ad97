package plot

import (
	"image/color"
	"math"
	"sagitta/core/decode/srgb"
	"strings"
	"testing"
)

// relLuminance is the relative luminance of an sRGB colour: linear
// components (IEC 61966-2-1 decoding) weighted 0.2126, 0.7152, 0.0722
// (ITU-R BT.709 primaries; WCAG 2.1 "relative luminance").
func relLuminance(c color.NRGBA) float64 {
	return 0.2126*srgb.ToLinear(float64(c.R)/255) + 0.7152*srgb.ToLinear(float64(c.G)/255) + 0.0722*srgb.ToLinear(float64(c.B)/255)
}

// contrastOnWhite is the WCAG 2.1 contrast ratio (L1 + 0.05)/(L2 + 0.05)
// against white.
func contrastOnWhite(c color.NRGBA) float64 { return 1.05 / (relLuminance(c) + 0.05) }

// lstar is CIE 1976 lightness L* of a colour with D65 white (CIE 15:2004):
// L* = 116 f(Y) - 16, f(t) = t^(1/3) above (6/29)^3, else t/(3 (6/29)^2) + 4/29.
func lstar(c color.NRGBA) float64 {
	y := relLuminance(c)
	d := 6.0 / 29
	f := math.Cbrt(y)
	if y <= d*d*d {
		f = y/(3*d*d) + 4.0/29
	}
	return 116*f - 16
}

// TestSRGBTransfer checks the sRGB transfer function against the values in
// IEC 61966-2-1:1999, 5.2: 0.5 -> 0.2140, 1 -> 1.
func TestSRGBTransfer(t *testing.T) {
	for _, tc := range []struct {
		name     string
		in, want float64
		tol      float64
	}{
		{"half", 0.5, 0.2140, 5e-5},
		{"full", 1, 1, 1e-12},
		{"linear toe", 0.04, 0.04 / 12.92, 1e-12},
	} {
		if got := srgb.ToLinear(tc.in); math.Abs(got-tc.want) > tc.tol {
			t.Errorf("%s: decode(%g) = %.6f, want %.6f", tc.name, tc.in, got, tc.want)
		}
		if back := srgb.FromLinear(srgb.ToLinear(tc.in)); math.Abs(back-tc.in) > 1e-12 {
			t.Errorf("%s: round trip %g -> %g", tc.name, tc.in, back)
		}
	}
}

// TestOKLab: white has L = 1 and no chroma, black L = 0 (Ottosson 2020:
// the matrices are normalised so); sRGB colours survive a round trip.
func TestOKLab(t *testing.T) {
	L, a, b := SRGBToOKLab(color.NRGBA{255, 255, 255, 255})
	if math.Abs(L-1) > 1e-4 || math.Abs(a) > 1e-4 || math.Abs(b) > 1e-4 {
		t.Errorf("white: %g %g %g, want 1 0 0", L, a, b)
	}
	if L, _, _ := SRGBToOKLab(color.NRGBA{0, 0, 0, 255}); math.Abs(L) > 1e-9 {
		t.Errorf("black: L %g", L)
	}
	for _, c := range append([]color.NRGBA{SagittalColour, TangentialColour, {12, 200, 99, 255}}, PhotoColours...) {
		if got := OKLabToSRGB(SRGBToOKLab(c)); got != c {
			t.Errorf("round trip %v -> %v", c, got)
		}
	}
}

// TestSharpnessScale: the map's scale rises monotonically in CIE L* from
// dark to light over a wide range (the property that keeps it readable
// with any colour vision and in grey print), and stays in gamut (no
// channel clipped at the anchors).
func TestSharpnessScale(t *testing.T) {
	prev := -1.0
	const n = 256
	for i := 0; i <= n; i++ {
		c := SharpnessScale.At(float64(i) / n)
		l := lstar(c)
		// 8-bit rounding can make neighbours equal; never darker.
		if l < prev-0.05 {
			t.Fatalf("L* falls from %.2f to %.2f at t = %.3f", prev, l, float64(i)/n)
		}
		prev = l
	}
	lo, hi := lstar(SharpnessScale.At(0)), lstar(SharpnessScale.At(1))
	if lo > 20 || hi < 90 {
		t.Errorf("L* spans %.1f..%.1f, want at least 20..90", lo, hi)
	}
	for _, tt := range []float64{0, 1.0 / 3, 2.0 / 3, 1} {
		c := SharpnessScale.At(tt)
		L, a, b := SRGBToOKLab(c)
		if ok := SharpnessScale.At(tt); math.IsNaN(L+a+b) || ok != c {
			t.Errorf("anchor at %g not reproducible", tt)
		}
	}
	if SharpnessScale.At(math.NaN()) != MaskColour {
		t.Error("NaN should map to the mask colour")
	}
}

// cvd simulates a colour-vision deficiency of full severity with the
// matrices of G. M. Machado, M. M. Oliveira and L. A. F. Fernandes, "A
// physiologically-based model for simulation of color vision deficiency",
// IEEE TVCG 15 (2009) 1291-1298, applied to linear sRGB (matrices from
// memory; each row sums to 1, which the test checks, so white stays white).
var cvd = map[string][3][3]float64{
	"protanopia":   {{0.152286, 1.052583, -0.204868}, {0.114503, 0.786281, 0.099216}, {-0.003882, -0.048116, 1.051998}},
	"deuteranopia": {{0.367322, 0.860646, -0.227968}, {0.280085, 0.672501, 0.047413}, {-0.011820, 0.042940, 0.968881}},
	"tritanopia":   {{1.255528, -0.076749, -0.178779}, {-0.078411, 0.930809, 0.147602}, {0.004733, 0.691367, 0.303900}},
}

func simulate(c color.NRGBA, m [3][3]float64) color.NRGBA {
	in := [3]float64{srgb.ToLinear(float64(c.R) / 255), srgb.ToLinear(float64(c.G) / 255), srgb.ToLinear(float64(c.B) / 255)}
	var out [3]uint8
	for i := range out {
		out[i] = to8(srgb.FromLinear(m[i][0]*in[0] + m[i][1]*in[1] + m[i][2]*in[2]))
	}
	return color.NRGBA{out[0], out[1], out[2], 255}
}

func okDist(a, b color.NRGBA) float64 {
	l1, a1, b1 := SRGBToOKLab(a)
	l2, a2, b2 := SRGBToOKLab(b)
	return math.Sqrt((l1-l2)*(l1-l2) + (a1-a2)*(a1-a2) + (b1-b2)*(b1-b2))
}

// TestColourCode: the orientation hues and the photo palette are readable
// on white (WCAG 2.1 non-text contrast, success criterion 1.4.11: at least
// 3:1) and stay apart under simulated protanopia, deuteranopia and
// tritanopia (OKLab distance; 0.02 is about a just-noticeable difference,
// Ottosson 2020, from memory: we ask for far more).
func TestColourCode(t *testing.T) {
	for name, m := range cvd {
		for i, row := range m {
			if s := row[0] + row[1] + row[2]; math.Abs(s-1) > 2e-6 {
				t.Errorf("%s row %d sums to %g", name, i, s)
			}
		}
	}
	for _, c := range append([]color.NRGBA{SagittalColour, TangentialColour, InkColour, ReferenceColour}, PhotoColours...) {
		if r := contrastOnWhite(c); r < 3 {
			t.Errorf("%v: contrast %.2f on white, want >= 3", c, r)
		}
	}
	for _, tc := range []struct {
		name    string
		colours []color.NRGBA
		min     float64
	}{
		{"orientations", []color.NRGBA{SagittalColour, TangentialColour}, 0.15},
		{"photos", PhotoColours, 0.05},
	} {
		for _, sim := range []string{"", "protanopia", "deuteranopia", "tritanopia"} {
			for i := range tc.colours {
				for j := i + 1; j < len(tc.colours); j++ {
					a, b := tc.colours[i], tc.colours[j]
					if sim != "" {
						a, b = simulate(a, cvd[sim]), simulate(b, cvd[sim])
					}
					if d := okDist(a, b); d < tc.min {
						t.Errorf("%s %d and %d under %q: OKLab distance %.3f, want >= %.2f", tc.name, i, j, sim, d, tc.min)
					}
				}
			}
		}
	}
	// Not a red/blue pair (UX.md): neither orientation hue is red or blue.
	for _, c := range []color.NRGBA{SagittalColour, TangentialColour} {
		_, a, b := SRGBToOKLab(c)
		h := math.Mod(math.Atan2(b, a)*180/math.Pi+360, 360)
		// OKLab hue: red about 20-40 degrees, blue about 250-275 (from memory).
		if (h > 0 && h < 45) || (h > 240 && h < 280) {
			t.Errorf("%v has OKLab hue %.0f: red or blue", c, h)
		}
	}
}

// TestOneLineCode: in the field plots every data line is solid and of one
// weight (frequency and orientation have panels of their own); only the
// reference curve is dashed; each marker shape keeps one meaning.
func TestOneLineCode(t *testing.T) {
	for name, f := range testFigures(t) {
		for _, pn := range f.Panels {
			for _, se := range pn.Series {
				if se.Dash != nil && !strings.HasPrefix(se.Name, "Reference") {
					t.Errorf("%s: %q is dashed", name, se.Name)
				}
				if se.Width > 0 && se.Dash == nil && se.Width != LineWidth {
					t.Errorf("%s: %q drawn %g px, want %g", name, se.Name, se.Width, LineWidth)
				}
				if se.Marker != NoMarker {
					kind := ""
					for _, k := range TargetKinds {
						if strings.Contains(strings.ToLower(se.Name), k) {
							kind = k
						}
					}
					if kind == "" || se.Marker != KindMarker(kind) {
						t.Errorf("%s: %q has marker %d, not its kind's", name, se.Name, se.Marker)
					}
				}
			}
			for _, mk := range pn.Marks {
				if mk.Marker != ReadingMarker && mk.Marker != CentreMarker {
					t.Errorf("%s: mark %q uses marker %d, which belongs to a kind of target", name, mk.Label, mk.Marker)
				}
			}
		}
	}
	if ReadingMarker == EdgeMarker || ReadingMarker == StarMarker || ReadingMarker == GratingMarker {
		t.Error("the reading marker is a target kind's")
	}
}
