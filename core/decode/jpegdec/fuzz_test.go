package jpegdec

import (
	"bytes"
	"errors"
	"image"
	"image/jpeg"
	"testing"
)

// FuzzDecode feeds arbitrary bytes to the decoder: it must never panic or
// hang, must return one of its typed errors or an image of the declared
// size with Row working on every row, and must refuse sizes above the limit
// before allocating.
func FuzzDecode(f *testing.F) {
	for _, q := range []int{30, 95} {
		for _, img := range []image.Image{noisy(13, 9, 1), image.NewGray(image.Rect(0, 0, 9, 17))} {
			var b bytes.Buffer
			if err := jpeg.Encode(&b, img, &jpeg.Options{Quality: q}); err != nil {
				f.Fatal(err)
			}
			f.Add(b.Bytes())
		}
	}
	f.Add([]byte{0xff, 0xd8, 0xff, 0xd9})
	f.Fuzz(func(t *testing.T, data []byte) {
		if len(data) > 1<<16 {
			return
		}
		img, err := decode(data, 1<<16)
		if err != nil {
			var (
				fe FormatError
				te *TooLargeError
			)
			if !errors.Is(err, ErrUnsupported) && !errors.As(err, &fe) && !errors.As(err, &te) {
				t.Fatalf("untyped error %T: %v", err, err)
			}
			return
		}
		b := img.Bounds()
		if b.Dx()*b.Dy() > 1<<16 || b.Empty() {
			t.Fatalf("bounds %v", b)
		}
		if m, ok := img.(*YCbCr); ok {
			w := b.Dx()
			r, g, bl := make([]uint8, w), make([]uint8, w), make([]uint8, w)
			for y := 0; y < b.Dy(); y++ {
				m.Row(y, 0, w, r, g, bl, nil)
				m.Row(y, w/2, w, r, g, bl, nil)
			}
		}
	})
}
