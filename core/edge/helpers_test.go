package edge

import (
	"image"
	"math"
	"testing"

	"sagitta/core/plane"
)

// linearFrom16 reads a 16-bit linear grey image into a plane.
func linearFrom16(t testing.TB, img image.Image) *plane.Plane {
	t.Helper()
	g, ok := img.(*image.Gray16)
	if !ok {
		t.Fatalf("want *image.Gray16, got %T", img)
	}
	b := g.Bounds()
	p := plane.New(b.Dx(), b.Dy())
	for y := 0; y < b.Dy(); y++ {
		for x := 0; x < b.Dx(); x++ {
			p.Set(x, y, float32(g.Gray16At(x, y).Y)/65535)
		}
	}
	return p
}

// linearFromSRGB8 decodes an 8-bit sRGB grey image (IEC 61966-2-1).
func linearFromSRGB8(t testing.TB, img image.Image) *plane.Plane {
	t.Helper()
	g, ok := img.(*image.Gray)
	if !ok {
		t.Fatalf("want *image.Gray, got %T", img)
	}
	b := g.Bounds()
	p := plane.New(b.Dx(), b.Dy())
	for y := 0; y < b.Dy(); y++ {
		for x := 0; x < b.Dx(); x++ {
			v := float64(g.GrayAt(x, y).Y) / 255
			if v <= 0.04045 {
				v /= 12.92
			} else {
				v = math.Pow((v+0.055)/1.055, 2.4)
			}
			p.Set(x, y, float32(v))
		}
	}
	return p
}
