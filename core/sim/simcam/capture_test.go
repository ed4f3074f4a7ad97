package simcam

import (
	"bytes"
	"errors"
	"image"
	"image/jpeg"
	"image/png"
	"math"
	"sagitta/core/decode/srgb"
	"testing"
)

// TestNoiseStatistics: with FullWellE = 1000 at level 0.25 the photon count
// is Poisson with mean 250, so the linear values have standard deviation
// sqrt(250) / 1000 (Poisson variance = mean; any statistics text).
func TestNoiseStatistics(t *testing.T) {
	cases := []struct {
		name      string
		fw, level float64
		read      float64
	}{
		{"gaussian regime", 1000, 0.25, 0},
		{"exact poisson regime", 200, 0.2, 0}, // mean 40 electrons
		{"with read noise", 1000, 0.25, 10},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			cam := Camera{W: 200, H: 150, FullWellE: c.fw, ReadNoiseE: c.read, Seed: 11}
			p := cam.RenderLinear(Scene{Background: c.level})
			cam.addNoise(p)
			var s, s2 float64
			for _, v := range p.Pix {
				s += float64(v)
				s2 += float64(v) * float64(v)
			}
			n := float64(len(p.Pix))
			mean := s / n
			sd := math.Sqrt((s2 - s*s/n) / (n - 1))
			want := math.Sqrt(c.level*c.fw+c.read*c.read) / c.fw
			if math.Abs(sd/want-1) > 0.05 {
				t.Errorf("std %.6f, want %.6f", sd, want)
			}
			if math.Abs(mean-c.level) > 4*want/math.Sqrt(n) {
				t.Errorf("mean %.6f, want %.6f", mean, c.level)
			}
		})
	}
}

// TestNoiseSeeds: same seed -> identical bytes; different seed -> different.
func TestNoiseSeeds(t *testing.T) {
	s := lookScene()
	enc := func(seed uint64) []byte {
		cam := Camera{W: 120, H: 80, Lens: Fixed{Gaussian{0.7, 0.7, 0}}, FullWellE: 5000, ReadNoiseE: 2, Seed: seed}
		b, err := cam.Encode(s)
		if err != nil {
			t.Fatal(err)
		}
		return b
	}
	a, b, c := enc(3), enc(3), enc(4)
	if !bytes.Equal(a, b) {
		t.Error("same seed gave different bytes")
	}
	if bytes.Equal(a, c) {
		t.Error("different seeds gave identical bytes")
	}
}

// TestSRGB checks the transfer function against IEC 61966-2-1: the check
// value V = 0.5 <-> L = 0.2140 (IEC 61966-2-1:1999, 5.2), V = 1 <-> L = 1, and
// the linear segment below 0.0031308.
func TestSRGB(t *testing.T) {
	cases := []struct {
		name      string
		l, v, tol float64
	}{
		{"check value", 0.2140, 0.5, 1e-4},
		{"full scale", 1, 1, 1e-12},
		{"toe", 0.002, 12.92 * 0.002, 1e-15},
	}
	for _, c := range cases {
		if got := srgb.FromLinear(c.l); math.Abs(got-c.v) > c.tol {
			t.Errorf("%s: encode(%v) = %v, want %v", c.name, c.l, got, c.v)
		}
		if got := srgb.ToLinear(c.v); math.Abs(got-c.l) > c.tol {
			t.Errorf("%s: decode(%v) = %v, want %v", c.name, c.v, got, c.l)
		}
	}
	// 8-bit codes: code = round(255 V). V = 0.5 is exactly half-way between
	// codes 127 and 128, and L = 0.2140 (4 digits) encodes to V = 0.49996, so
	// it rounds to 127; L = 0.21404, the value of V = 0.5 to 5 digits, is
	// above half-way and gives 128.
	code := func(l float64) uint8 {
		cam := Camera{W: 1, H: 1}
		p := cam.RenderLinear(Scene{Background: l})
		return cam.encodeImage(p).(*image.Gray).Pix[0]
	}
	if c := code(0.2140); c != 127 {
		t.Errorf("sRGB8 of 0.2140 = %d, want 127", c)
	}
	if c := code(0.21405); c != 128 {
		t.Errorf("sRGB8 of 0.21405 = %d, want 128", c)
	}
	// Round trip: every 8-bit code decodes to a level that encodes back to it.
	for k := range 256 {
		l := srgb.ToLinear(float64(k) / 255)
		if c := code(l); int(c) != k {
			t.Errorf("code %d -> L %v -> code %d", k, l, c)
		}
	}
}

// TestEncodeFormats checks the file outputs: a 16-bit PNG decodes to
// Gray16 with the same codes as Capture, and a JPEG carries the Exif APP1
// segment right after SOI (JPEG, ITU-T T.81 B.1.1; Exif, CIPA DC-008 4.5.4).
func TestEncodeFormats(t *testing.T) {
	s := lookScene()
	cam := Camera{W: 90, H: 60, Lens: Fixed{Gaussian{0.6, 0.6, 0}}, Encoding: SRGB16}
	b, err := cam.Encode(s)
	if err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(bytes.NewReader(b))
	if err != nil {
		t.Fatal(err)
	}
	g, ok := img.(*image.Gray16)
	if !ok {
		t.Fatalf("16-bit PNG decoded as %T", img)
	}
	want := cam.Capture(s).(*image.Gray16)
	if !bytes.Equal(g.Pix, want.Pix) {
		t.Error("PNG pixels differ from Capture")
	}

	exif := append([]byte("Exif\x00\x00"), []byte("II*\x00\x08\x00\x00\x00\x00\x00\x00\x00\x00\x00")...)
	cam = Camera{W: 90, H: 60, Colour: true, JPEGQuality: 90, ExifAPP1: exif}
	b, err = cam.Encode(s)
	if err != nil {
		t.Fatal(err)
	}
	n := len(exif) + 2
	head := append([]byte{0xFF, 0xD8, 0xFF, 0xE1, byte(n >> 8), byte(n)}, exif...)
	if !bytes.HasPrefix(b, head) {
		t.Errorf("JPEG does not start with SOI + APP1(Exif): % x", b[:min(len(b), 24)])
	}
	if _, err := jpeg.Decode(bytes.NewReader(b)); err != nil {
		t.Errorf("JPEG with APP1 does not decode: %v", err)
	}
}

// TestInvalidInput checks typed errors for bad input.
func TestInvalidInput(t *testing.T) {
	cases := []struct {
		name string
		cam  Camera
		s    Scene
		want any
	}{
		{"zero size", Camera{W: 0, H: 10}, Scene{}, InvalidError("")},
		{"two vertices", Camera{W: 10, H: 10}, Scene{Polygons: []Polygon{{Pts: [][2]float64{{0, 0}, {1, 1}}}}}, InvalidError("")},
		{"nan level", Camera{W: 10, H: 10}, Scene{Background: math.NaN()}, InvalidError("")},
		{"star without cycles", Camera{W: 10, H: 10}, Scene{Stars: []Star{{Radius: 3}}}, InvalidError("")},
		{"skewed grating", Camera{W: 10, H: 10}, Scene{Gratings: []Grating{{Corners: [4][2]float64{{0, 0}, {4, 0}, {5, 3}, {0, 3}}, FreqCyPx: 0.1}}}, InvalidError("")},
		{"negative sigma", Camera{W: 10, H: 10, Lens: Fixed{Gaussian{-1, 1, 0}}}, Scene{}, InvalidError("")},
		{"16-bit jpeg", Camera{W: 10, H: 10, Encoding: Linear16, JPEGQuality: 80}, Scene{}, UnsupportedError("")},
		{"bad exif", Camera{W: 10, H: 10, JPEGQuality: 80, ExifAPP1: []byte("nope")}, Scene{}, InvalidError("")},
	}
	for _, c := range cases {
		_, err := c.cam.Encode(c.s)
		switch c.want.(type) {
		case InvalidError:
			var e InvalidError
			if !errors.As(err, &e) {
				t.Errorf("%s: got %v, want InvalidError", c.name, err)
			}
		case UnsupportedError:
			var e UnsupportedError
			if !errors.As(err, &e) {
				t.Errorf("%s: got %v, want UnsupportedError", c.name, err)
			}
		}
		if err != nil && err.Error()[:8] != "simcam: " {
			t.Errorf("%s: message %q lacks the package prefix", c.name, err)
		}
	}
}

// TestUnsharpMask: out = v + A (v - blur(v)) leaves a flat field unchanged
// and overshoots on both sides of an edge (the unsharp mask's defining
// property; common practice).
func TestUnsharpMask(t *testing.T) {
	cam := Camera{W: 40, H: 8, Encoding: Linear8, Sharpen: &UnsharpMask{Amount: 1, RadiusPx: 1.5}}
	flat := cam.Capture(Scene{Background: 0.5}).(*image.Gray)
	for _, v := range flat.Pix {
		if v != 128 {
			t.Fatalf("flat field changed to %d", v)
		}
	}
	edge := cam.Capture(HalfPlaneScene(40, 8, 0, 0.2, 0.6)).(*image.Gray)
	lo, hi := uint8(255), uint8(0)
	for _, v := range edge.Pix[3*40 : 4*40] {
		lo, hi = min(lo, v), max(hi, v)
	}
	if !(hi > 153 && lo < 51) {
		t.Errorf("no overshoot: min %d max %d (levels 51 and 153)", lo, hi)
	}
}
