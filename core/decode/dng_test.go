package decode

import (
	"errors"
	"math"
	"strings"
	"testing"

	"sagitta/core/sim/simcam"
)

// TestDNG: a DNG goes to core/raw; its luminance plane is the mosaic
// divided by the white balance written as AsShotNeutral, so a neutral
// scene seen through filters of different gains reads the same level at
// every site, and the tone is linear by definition.
func TestDNG(t *testing.T) {
	cam := &simcam.Camera{W: 120, H: 80}
	scene := simcam.Scene{Background: 0.4}
	for _, o := range []simcam.DNG{
		{Gains: [3]float64{0.5, 1, 0.7}, Make: "Orrery Optical", Model: "Fieldmark 7"},
		{Gains: [3]float64{0.5, 1, 0.7}, Linear: true, Bits: 16},
	} {
		data, err := cam.EncodeDNG(scene, o)
		if err != nil {
			t.Fatal(err)
		}
		f, w, h, err := Config(data)
		if err != nil || f != FormatDNG || w != 120 || h != 80 {
			t.Fatalf("Config: %v %d %d %v", f, w, h, err)
		}
		img, err := Decode(data, Options{Tone: SRGB})
		if err != nil {
			t.Fatal(err)
		}
		if img.Format != FormatDNG || img.Tone != Linear || img.ToneSource != ToneSourceRaw || img.Raw == nil || !img.Colour {
			t.Fatalf("image %+v", img)
		}
		if !strings.Contains(strings.Join(img.Warnings, ";"), "linear by definition") {
			t.Errorf("no warning that the sRGB setting was ignored: %v", img.Warnings)
		}
		var lo, hi float64 = 1, 0
		for _, v := range img.Lum.Pix {
			lo, hi = math.Min(lo, float64(v)), math.Max(hi, float64(v))
		}
		// One code in 2^14 of rounding, divided by the smallest gain.
		if hi-lo > 2.0/(16383-512)/0.5 || math.Abs(hi-0.4) > 1e-3 {
			t.Errorf("linear=%v: balanced levels span %v..%v, want 0.4 everywhere", o.Linear, lo, hi)
		}
	}
	// Limits and errors come back as this package's types.
	data, _ := cam.EncodeDNG(scene, simcam.DNG{})
	var tl *TooLargeError
	if _, err := Decode(data, Options{MaxPixels: 5000}); !errors.As(err, &tl) {
		t.Errorf("limit: %v", err)
	}
	var fe *FormatError
	if _, err := Decode(data[:len(data)-200], Options{}); !errors.As(err, &fe) || !strings.HasPrefix(err.Error(), "decode: ") {
		t.Errorf("truncated: %v", err)
	}
}
