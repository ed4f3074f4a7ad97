package decode

import (
	"math"
	"slices"
	"strings"
	"testing"
)

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
// sRGB with a warning that says so (DOMAIN.md section 7: say which default
// was used).
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
