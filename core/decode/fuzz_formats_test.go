package decode

import (
	"errors"
	"math"
	"testing"

	"golang.org/x/image/tiff"

	"sagitta/core/exif"
)

// One fuzz target per decoder path, each seeded with its own format only, so
// that a short run spends its time inside that decoder (FuzzDecode mixes
// them all). Every target checks what FuzzDecode checks: no panic, typed
// "decode: " errors, a plane of the declared size with values in [0, 1];
// and Config must agree with Decode on the format and size.

func FuzzDecodePNG(f *testing.F) {
	f.Add(encodePNG(f, randGray(6, 5)))
	f.Add(insertAfterIHDR(encodePNG(f, randNRGBA(5, 4, false)), gamaChunk(100000)))
	f.Add(encodePNG(f, randPaletted(4, 4, 5)))
	f.Add(encodePNG(f, randGray16(3, 3)))
	f.Add(encodePNG(f, randNRGBA64(3, 2, true)))
	f.Fuzz(func(t *testing.T, data []byte) { checkDecode(t, data) })
}

func FuzzDecodeJPEG(f *testing.F) {
	f.Add(encodeJPEG(f, smoothRGBA(12, 9), 75))
	f.Add(encodeJPEG(f, randGray(8, 8), 90))
	f.Add(cmykJPEG([4][]uint8{{1}, {2}, {3}, {4}}, true))
	if j, err := exif.InsertJPEG(encodeJPEG(f, randGray(6, 5), 50), exif.Tags{Make: "Sagitta", Orientation: 6, FNumber: 2.8}); err == nil {
		f.Add(j)
	}
	f.Fuzz(func(t *testing.T, data []byte) { checkDecode(t, data) })
}

func FuzzDecodeTIFF(f *testing.F) {
	f.Add(encodeTIFF(f, asRGBA64(randNRGBA64(4, 3, true)), tiff.Deflate))
	f.Add(encodeTIFF(f, asRGBA64(randNRGBA64(3, 3, false)), tiff.Uncompressed))
	f.Add(greyTIFF(6, 5, randGray(6, 5).Pix, "Sagitta", 3, 56, 2000))
	f.Fuzz(func(t *testing.T, data []byte) { checkDecode(t, data) })
}

func checkDecode(t *testing.T, data []byte) {
	if len(data) > 1<<16 {
		return
	}
	format, w, h, cerr := Config(data)
	im, err := Decode(data, Options{MaxPixels: 1 << 16})
	if err != nil {
		var (
			fe *FormatError
			ue *UnsupportedError
			te *TooLargeError
		)
		if !errors.As(err, &fe) && !errors.As(err, &ue) && !errors.As(err, &te) {
			t.Fatalf("untyped error %T: %v", err, err)
		}
		if msg := err.Error(); len(msg) < 8 || msg[:8] != "decode: " {
			t.Fatalf("message %q", msg)
		}
		return
	}
	if cerr == nil && (w != im.Width || h != im.Height || format == "") {
		t.Fatalf("Config says %s %dx%d, Decode %dx%d", format, w, h, im.Width, im.Height)
	}
	if im.Lum.W != im.Width || im.Lum.H != im.Height || len(im.Lum.Pix) != im.Width*im.Height {
		t.Fatalf("plane %dx%d (%d), image %dx%d", im.Lum.W, im.Lum.H, len(im.Lum.Pix), im.Width, im.Height)
	}
	for _, v := range im.Lum.Pix {
		if !(v >= 0 && v <= 1+1e-6) || math.IsNaN(float64(v)) {
			t.Fatalf("sample %v outside [0, 1]", v)
		}
	}
}
