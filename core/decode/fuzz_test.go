package decode

import (
	"errors"
	"math"
	"testing"

	"golang.org/x/image/tiff"

	"sagitta/core/exif"
)

// FuzzDecode feeds small arbitrary inputs to Decode. It must never panic;
// errors must be the package's typed errors with a one-line "decode: "
// message; a decoded plane must have the declared size and hold values in
// [0, 1].
func FuzzDecode(f *testing.F) {
	g := randGray(6, 5)
	f.Add(encodePNG(f, g))
	f.Add(insertAfterIHDR(encodePNG(f, randNRGBA(5, 4, false)), gamaChunk(45455)))
	f.Add(encodePNG(f, randPaletted(4, 4, 5)))
	f.Add(encodePNG(f, randGray16(3, 3)))
	f.Add(encodeJPEG(f, smoothRGBA(12, 9), 75))
	f.Add(encodeJPEG(f, g, 75))
	f.Add(cmykJPEG([4][]uint8{{1}, {2}, {3}, {4}}, true))
	f.Add(encodeTIFF(f, asRGBA64(randNRGBA64(4, 3, true)), tiff.Deflate))
	f.Add(greyTIFF(6, 5, g.Pix, "Sagitta", 3, 56, 2000))
	if j, err := exif.InsertJPEG(encodeJPEG(f, g, 50), exif.Tags{Make: "Sagitta", Orientation: 8}); err == nil {
		f.Add(j)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		if len(data) > 1<<16 {
			return
		}
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
		if im.Lum.W != im.Width || im.Lum.H != im.Height || len(im.Lum.Pix) != im.Width*im.Height {
			t.Fatalf("plane %dx%d (%d), image %dx%d", im.Lum.W, im.Lum.H, len(im.Lum.Pix), im.Width, im.Height)
		}
		for _, v := range im.Lum.Pix {
			if !(v >= 0 && v <= 1+1e-6) || math.IsNaN(float64(v)) {
				t.Fatalf("sample %v outside [0, 1]", v)
			}
		}
	})
}
