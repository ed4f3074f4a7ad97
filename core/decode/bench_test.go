package decode

import (
	"bytes"
	"fmt"
	"image/jpeg"
	"os"
	"testing"
)

// BenchmarkDecode decodes synthetic photo-like JPEG (quality 90, 4:2:0) and
// RGB PNG files of 6 and 24 MP. B/op shows the peak-relevant allocations:
// the decoded image plus the 4-byte-per-pixel plane.
func BenchmarkDecode(b *testing.B) {
	sizes := []struct {
		name string
		w, h int
	}{{"6MP", 3000, 2000}, {"24MP", 6000, 4000}}
	for _, s := range sizes {
		img := smoothRGBA(s.w, s.h)
		files := []struct {
			name string
			data []byte
		}{
			{"jpeg", encodeJPEG(b, img, 90)},
			{"png", encodePNG(b, img)},
		}
		img = nil
		for _, f := range files {
			b.Run(fmt.Sprintf("%s-%s", f.name, s.name), func(b *testing.B) {
				b.ReportAllocs()
				b.SetBytes(int64(len(f.data)))
				for b.Loop() {
					im, err := Decode(f.data, Options{})
					if err != nil {
						b.Fatal(err)
					}
					_ = im
				}
			})
		}
	}
}

// BenchmarkLuminance measures the conversion alone (decoded image -> plane)
// for the two commonest decoded types.
func BenchmarkLuminance(b *testing.B) {
	const w, h = 6000, 4000
	rgba := asRGBA(randNRGBA(w, h, true))
	for _, c := range []struct {
		name string
		tone Tone
	}{{"srgb", SRGB}, {"gamma", Gamma(2.2)}} {
		b.Run("RGBA-24MP-"+c.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				newConverter(c.tone).luminance(rgba)
			}
		})
	}
}

// BenchmarkJPEGDecoders decodes a 24 MP 4:2:0 JPEG into luminance with the
// core's decoder (Decode: core/decode/jpegdec, libjpeg-turbo's pixels) and,
// for comparison, with Go's image/jpeg followed by the same conversion. It
// uses the bench photo of `make bench` (/tmp/sagitta-bench/chart-24MP-3000e.jpg)
// when present, else a synthetic photo-like file. Measure CPU time with
// -benchtime 1x -count 3 and /usr/bin/time (the machine may be shared).
func BenchmarkJPEGDecoders(b *testing.B) {
	data, err := os.ReadFile("/tmp/sagitta-bench/chart-24MP-3000e.jpg")
	if err != nil {
		data = encodeJPEG(b, smoothRGBA(6000, 4000), 95)
	}
	b.Run("core", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			if _, err := Decode(data, Options{}); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("go", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			img, err := jpeg.Decode(bytes.NewReader(data))
			if err != nil {
				b.Fatal(err)
			}
			newConverter(SRGB).luminance(img)
		}
	})
}
