package decode

import (
	"bytes"
	"image"
	"image/color"
	"image/draw"
	"image/png"
	"testing"

	"sagitta/core/exif"
)

// nrgbaOf converts an image to 8-bit NRGBA as a browser hands it over.
func nrgbaOf(img image.Image) *image.NRGBA {
	b := img.Bounds()
	out := image.NewNRGBA(image.Rect(0, 0, b.Dx(), b.Dy()))
	draw.Draw(out, out.Rect, img, b.Min, draw.Src)
	return out
}

// TestFromPixelsEqualsDecode hands FromPixels the very pixels Go's PNG
// decoder makes of 8-bit grey and RGB files, with and without tone chunks:
// the luminance must be Decode's bit for bit, with the same tone, reason
// and warnings (the tone is chosen from the file's bytes on both paths).
func TestFromPixelsEqualsDecode(t *testing.T) {
	rgb := image.NewRGBA(image.Rect(0, 0, 37, 23))
	grey := image.NewGray(rgb.Rect)
	for y := 0; y < 23; y++ {
		for x := 0; x < 37; x++ {
			rgb.Set(x, y, color.RGBA{uint8(7 * x), uint8(11 * y), uint8(x * y), 255})
			grey.Set(x, y, color.Gray{uint8(3*x + 5*y)})
		}
	}
	withGAMA := func(data []byte) []byte { // gAMA 1.0 right after IHDR
		return append(append(append([]byte{}, data[:33]...), gamaChunk(100000)...), data[33:]...)
	}
	for _, tc := range []struct {
		name string
		data []byte
	}{
		{"RGB", encodePNG(t, rgb)},
		{"grey", encodePNG(t, grey)},
		{"RGB gAMA 1.0", withGAMA(encodePNG(t, rgb))},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if !ForeignDecodable(tc.data) {
				t.Fatal("ForeignDecodable refuses an 8-bit PNG")
			}
			want, err := Decode(tc.data, Options{})
			if err != nil {
				t.Fatal(err)
			}
			img, err := png.Decode(bytes.NewReader(tc.data))
			if err != nil {
				t.Fatal(err)
			}
			got, err := FromPixels(tc.data, nrgbaOf(img), Options{})
			if err != nil {
				t.Fatal(err)
			}
			if got.Tone != want.Tone || got.ToneSource != want.ToneSource || got.Format != want.Format || got.BitDepth != want.BitDepth || got.Colour != want.Colour {
				t.Errorf("got %v %q %s %d colour %v, want %v %q %s %d colour %v", got.Tone, got.ToneSource, got.Format, got.BitDepth, got.Colour, want.Tone, want.ToneSource, want.Format, want.BitDepth, want.Colour)
			}
			if len(got.Warnings) != len(want.Warnings) {
				t.Errorf("warnings %q, want %q", got.Warnings, want.Warnings)
			}
			for i, v := range want.Lum.Pix {
				if got.Lum.Pix[i] != v {
					t.Fatalf("pixel %d: %g, want %g", i, got.Lum.Pix[i], v)
				}
			}
			if mx, mean, err := LumDiff(tc.data, nrgbaOf(img), Options{}); err != nil || mx != 0 || mean != 0 {
				t.Errorf("LumDiff %g, %g, %v; want 0, 0", mx, mean, err)
			}
		})
	}
}

// TestForeignDecodable keeps to the core's decoders what a browser would
// decode differently or not at all, and FromPixels refuses it.
func TestForeignDecodable(t *testing.T) {
	g := image.NewGray(image.Rect(0, 0, 16, 16))
	g16 := image.NewGray16(g.Rect)
	pal := image.NewPaletted(g.Rect, color.Palette{color.Black, color.White})
	turned, err := exif.InsertJPEG(encodeJPEG(t, g, 90), exif.Tags{Orientation: 6})
	if err != nil {
		t.Fatal(err)
	}
	upright, err := exif.InsertJPEG(encodeJPEG(t, g, 90), exif.Tags{Orientation: 1})
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name string
		data []byte
		want bool
	}{
		{"grey JPEG", encodeJPEG(t, g, 90), true},
		{"JPEG, Exif orientation 1", upright, true},
		{"JPEG, Exif orientation 6", turned, false},
		{"16-bit PNG", encodePNG(t, g16), false},
		{"palette PNG", encodePNG(t, pal), false},
		{"TIFF", encodeTIFF(t, g, 1), false},
		{"not an image", []byte("hello, world"), false},
	} {
		if got := ForeignDecodable(tc.data); got != tc.want {
			t.Errorf("%s: ForeignDecodable %v, want %v", tc.name, got, tc.want)
		}
		if !tc.want && tc.name != "not an image" {
			if _, err := FromPixels(tc.data, image.NewNRGBA(g.Rect), Options{}); err == nil {
				t.Errorf("%s: FromPixels took pixels of a file the core decodes itself", tc.name)
			}
		}
	}
	// Pixels of the wrong size or kind are refused.
	data := encodePNG(t, g)
	if _, err := FromPixels(data, image.NewNRGBA(image.Rect(0, 0, 15, 16)), Options{}); err == nil {
		t.Error("pixels of the wrong size taken")
	}
	if _, err := FromPixels(data, g, Options{}); err == nil {
		t.Error("grey pixels taken for RGBA")
	}
}
