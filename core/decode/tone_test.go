package decode

import (
	"encoding/json"
	"math"
	"sagitta/core/decode/srgb"
	"slices"
	"strings"
	"testing"
)

func TestSRGBToLinear(t *testing.T) {
	tests := []struct {
		name string
		in   float64
		want float64
		tol  float64
	}{
		// IEC 61966-2-1:1999, 5.2 (0.2140 computed by hand from its formula).
		{"V=0.5 -> 0.2140 (IEC 61966-2-1)", 0.5, 0.2140, 0.5e-4},
		{"V=1 -> 1 (IEC 61966-2-1: full scale)", 1, 1, 0},
		{"V=0 -> 0 (IEC 61966-2-1)", 0, 0, 0},
		// The linear segment ends at V = 0.04045, L = 0.04045/12.92 = 0.0031308
		// (IEC 61966-2-1, 5.2: the encoding breakpoint is L = 0.0031308).
		{"V=0.04045 -> 0.0031308 (IEC 61966-2-1 breakpoint)", 0.04045, 0.0031308, 1e-7},
		// Closed form of the standard's power segment.
		{"V=0.8 power segment (IEC 61966-2-1 formula)", 0.8, math.Pow((0.8+0.055)/1.055, 2.4), 1e-15},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := srgb.ToLinear(tc.in); math.Abs(got-tc.want) > tc.tol {
				t.Errorf("srgb.ToLinear(%v) = %.8f, want %.8f", tc.in, got, tc.want)
			}
		})
	}
	// Continuity at the breakpoint: the two segments of IEC 61966-2-1 meet
	// to within 1e-7 (they are not exactly continuous in the published
	// constants).
	lin, pow := 0.04045/12.92, math.Pow((0.04045+0.055)/1.055, 2.4)
	if math.Abs(lin-pow) > 1e-7 {
		t.Errorf("segments at 0.04045: %.10f vs %.10f", lin, pow)
	}
	// Monotone across the breakpoint.
	if !(srgb.ToLinear(0.04044) < srgb.ToLinear(0.04045) && srgb.ToLinear(0.04045) < srgb.ToLinear(0.04046)) {
		t.Error("not increasing across the breakpoint")
	}
}

func TestLUTs(t *testing.T) {
	tones := []Tone{SRGB, Linear, Gamma(2.2), Gamma(0.2), Gamma(5), Auto}
	for _, tone := range tones {
		t.Run(tone.String(), func(t *testing.T) {
			t8, t16 := tone.lut8(), tone.lut16()
			// Full scale -> exactly 1, zero -> 0 (package plane convention).
			if t8[255] != 1 || t16[65535] != 1 || t8[0] != 0 || t16[0] != 0 {
				t.Errorf("ends: %v %v %v %v", t8[0], t8[255], t16[0], t16[65535])
			}
			for i := 1; i < 256; i++ {
				if t8[i] < t8[i-1] {
					t.Fatalf("8-bit table decreases at %d", i)
				}
			}
			for i := 1; i < 65536; i++ {
				if t16[i] < t16[i-1] {
					t.Fatalf("16-bit table decreases at %d", i)
				}
			}
			// 8-bit code c and 16-bit code 257 c are the same value c/255.
			for c := range 256 {
				if t8[c] != t16[257*c] {
					t.Fatalf("code %d: 8-bit %v, 16-bit %v", c, t8[c], t16[257*c])
				}
			}
		})
	}
	// 8-bit code 128 under sRGB: ((128/255 + 0.055)/1.055)^2.4 (IEC 61966-2-1).
	want := math.Pow((128.0/255+0.055)/1.055, 2.4)
	if got := SRGB.lut8()[128]; math.Abs(float64(got)-want) > 1e-7 {
		t.Errorf("sRGB code 128 = %v, want %v", got, want)
	}
	// Power law L = V^G (definition): code 128, gamma 2.2.
	want = math.Pow(128.0/255, 2.2)
	if got := Gamma(2.2).lut8()[128]; math.Abs(float64(got)-want) > 1e-7 {
		t.Errorf("gamma 2.2 code 128 = %v, want %v", got, want)
	}
	// Linear: L = V.
	if got := Linear.lut16()[32768]; math.Abs(float64(got)-32768.0/65535) > 1e-7 {
		t.Errorf("linear 32768 = %v", got)
	}
	// The same table is returned twice (cached).
	if SRGB.lut16() != SRGB.lut16() || Auto.lut8() != SRGB.lut8() {
		t.Error("tables not cached")
	}
}

func TestParseTone(t *testing.T) {
	tests := []struct {
		in       string
		want     Tone
		spelling string // String() of the result
	}{
		{"", Auto, "auto"},
		{"auto", Auto, "auto"},
		{"sRGB", SRGB, "srgb"},
		{" linear ", Linear, "linear"},
		{"gamma:2.2", Gamma(2.2), "gamma:2.2"},
		{"gamma:0.2", Gamma(0.2), "gamma:0.2"},
		{"gamma:5", Gamma(5), "gamma:5"},
		{"GAMMA: 1.8", Gamma(1.8), "gamma:1.8"},
	}
	for _, tc := range tests {
		t.Run(tc.in, func(t *testing.T) {
			got, err := ParseTone(tc.in)
			if err != nil || got != tc.want || got.String() != tc.spelling {
				t.Fatalf("ParseTone(%q) = %v (%q), %v", tc.in, got, got.String(), err)
			}
			back, err := ParseTone(got.String())
			if err != nil || back != got {
				t.Errorf("round trip of %q: %v, %v", got.String(), back, err)
			}
		})
	}
	for _, bad := range []string{"gamma:0.19", "gamma:5.01", "gamma:", "gamma:x", "gamma:NaN", "gamma:inf", "log", "gamma2.2", "rec709"} {
		t.Run("bad "+bad, func(t *testing.T) {
			_, err := ParseTone(bad)
			if err == nil || !strings.HasPrefix(err.Error(), "decode: ") || strings.Contains(err.Error(), "\n") {
				t.Errorf("ParseTone(%q) error %v", bad, err)
			}
		})
	}
}

func TestToneJSON(t *testing.T) {
	type settings struct {
		Tone Tone `json:"tone"`
	}
	b, err := json.Marshal(settings{Gamma(2.4)})
	if err != nil || string(b) != `{"tone":"gamma:2.4"}` {
		t.Fatalf("marshal: %s, %v", b, err)
	}
	var s settings
	if err := json.Unmarshal([]byte(`{"tone":"linear"}`), &s); err != nil || s.Tone != Linear {
		t.Errorf("unmarshal: %v, %v", s.Tone, err)
	}
	if err := json.Unmarshal([]byte(`{"tone":"gamma:9"}`), &s); err == nil {
		t.Error("gamma 9 accepted")
	}
}

func TestToneCheck(t *testing.T) {
	for _, bad := range []Tone{Gamma(0), Gamma(math.NaN()), Gamma(6), {Kind: 9}} {
		if err := bad.Check(); err == nil {
			t.Errorf("%v accepted", bad)
		}
	}
}

// TestAutoTone: the colour-space chunks of PNG (ISO/IEC 15948:2004 /
// W3C PNG, 11.3.3.2 gAMA: value = file gamma x 100000; 11.3.3.5 sRGB and
// 11.3.3.3 iCCP take precedence over gAMA; section numbers from memory)
// choose the tone under ToneAuto. The chunks are inserted by hand with
// their CRCs.
func TestAutoTone(t *testing.T) {
	g := randGray(9, 4)
	base := encodePNG(t, g)
	srgbChunk := pngChunk("sRGB", []byte{0})                                              // rendering intent 0
	iccpChunk := pngChunk("iCCP", []byte("profile\x00\x00x\x9c\x03\x00\x00\x00\x00\x01")) // name, method 0, tiny zlib stream
	tests := []struct {
		name       string
		data       []byte
		user       Tone
		want       Tone
		wantSource string
		lin        func(float64) float64
		warn       string // substring of a warning, "" for none expected
	}{
		{"no chunks", base, Auto, SRGB, "default: sRGB", refSRGB, ""},
		{"gAMA 1.0 -> linear", insertAfterIHDR(base, gamaChunk(100000)), Auto, Linear, "file: PNG gAMA 1.0",
			func(v float64) float64 { return v }, ""},
		{"gAMA 0.45455 -> gamma 2.19998", insertAfterIHDR(base, gamaChunk(45455)), Auto, Gamma(100000.0 / 45455),
			"file: PNG gAMA 0.45455 (decoding gamma 2.2)", func(v float64) float64 { return math.Pow(v, 100000.0/45455) }, ""},
		{"gAMA 0.8 -> gamma 1.25", insertAfterIHDR(base, gamaChunk(80000)), Auto, Gamma(1.25),
			"file: PNG gAMA 0.8 (decoding gamma 1.25)", func(v float64) float64 { return math.Pow(v, 1.25) }, ""},
		{"sRGB chunk wins over gAMA", insertAfterIHDR(base, gamaChunk(100000), srgbChunk), Auto, SRGB,
			"file: PNG sRGB chunk", refSRGB, ""},
		{"iCCP wins over gAMA", insertAfterIHDR(base, gamaChunk(100000), iccpChunk), Auto, SRGB,
			"file: PNG iCCP chunk (profile not read; assumed sRGB)", refSRGB, "ICC profile not read"},
		{"user wins over gAMA", insertAfterIHDR(base, gamaChunk(100000)), SRGB, SRGB, "user", refSRGB, ""},
		{"gAMA 0.1 out of range", insertAfterIHDR(base, gamaChunk(10000)), Auto, SRGB, "default: sRGB", refSRGB,
			"outside [0.2, 5]"},
		{"gAMA 0 ignored", insertAfterIHDR(base, gamaChunk(0)), Auto, SRGB, "default: sRGB", refSRGB, "gAMA of 0"},
		{"gAMA after IDAT ignored", append(base[:len(base)-12:len(base)-12], append(gamaChunk(100000), base[len(base)-12:]...)...),
			Auto, SRGB, "default: sRGB", refSRGB, ""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			im, err := Decode(tc.data, Options{Tone: tc.user})
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(im.Tone.Gamma-tc.want.Gamma) > 1e-12 || im.Tone.Kind != tc.want.Kind || im.ToneSource != tc.wantSource {
				t.Errorf("tone %v (%q), want %v (%q)", im.Tone, im.ToneSource, tc.want, tc.wantSource)
			}
			if d := maxDiff(t, im.Lum.Pix, refLum(g, tc.lin)); d > 2e-6 {
				t.Errorf("max diff %g", d)
			}
			hasWarn := slices.ContainsFunc(im.Warnings, func(s string) bool { return tc.warn != "" && strings.Contains(s, tc.warn) })
			if hasWarn != (tc.warn != "") {
				t.Errorf("warnings %q, want one with %q", im.Warnings, tc.warn)
			}
		})
	}
}

// Test16BitDefaultWarns: a 16-bit file with no declared tone is decoded as
// sRGB with a warning that says so (common practice: raw converters write
// both; say which default was used).
func Test16BitDefaultWarns(t *testing.T) {
	im, err := Decode(encodePNG(t, randGray16(4, 4)), Options{})
	if err != nil {
		t.Fatal(err)
	}
	if im.Tone != SRGB || !slices.ContainsFunc(im.Warnings, func(s string) bool { return strings.Contains(s, "16-bit") }) {
		t.Errorf("tone %v, warnings %q", im.Tone, im.Warnings)
	}
}

func TestGAMABadCRC(t *testing.T) {
	c := gamaChunk(100000)
	c[len(c)-1] ^= 1
	_, err := Decode(insertAfterIHDR(encodePNG(t, randGray(3, 3)), c), Options{})
	var fe *FormatError
	if !asErr(err, &fe) || !strings.Contains(err.Error(), "gAMA chunk checksum") {
		t.Errorf("error %v", err)
	}
}
