// Package preview makes small display images of decoded photos, for front
// ends that cannot show the file itself (browsers do not display TIFF).
//
// A preview is the linear-light luminance plane reduced by an integer factor
// k with a box filter (each output pixel is the mean of a k x k block of
// input pixels, partial blocks at the right and bottom edges averaged over
// the pixels they hold), then encoded with the sRGB transfer function of
// IEC 61966-2-1 (https://webstore.iec.ch/publication/6169):
//
//	V = 12.92 L                  for L <= 0.0031308
//	V = 1.055 L^(1/2.4) - 0.055  otherwise
//
// and quantised to 8 bits. Averaging in linear light keeps the mean
// brightness of fine detail, as an optical reduction would.
//
// Coordinates follow core/plane: preview pixel (i, j) covers the input
// square [k i, k (i+1)) x [k j, k (j+1)), so an input point (x, y) px is at
// (x / k, y / k) in the preview.
package preview

import (
	"fmt"
	"image"
	"sagitta/core/decode/srgb"

	"sagitta/core/plane"
)

// Factor returns the smallest integer reduction k >= 1 such that a w x h
// image reduced by k fits in maxSide x maxSide px (ceil(w/k) <= maxSide and
// ceil(h/k) <= maxSide). It panics if maxSide < 1 (a programmer error).
func Factor(w, h, maxSide int) int {
	if maxSide < 1 {
		panic(fmt.Sprintf("preview: maxSide %d < 1", maxSide))
	}
	side := max(w, h)
	k := max(1, (side+maxSide-1)/maxSide)
	for (side+k-1)/k > maxSide {
		k++
	}
	return k
}

// Gray returns the sRGB-encoded 8-bit preview of the linear plane p reduced
// by Factor(p.W, p.H, maxSide), and that factor. Linear values outside
// [0, 1] are clipped. It panics if maxSide < 1 (a programmer error).
func Gray(p *plane.Plane, maxSide int) (*image.Gray, int) {
	k := Factor(p.W, p.H, maxSide)
	ow, oh := (p.W+k-1)/k, (p.H+k-1)/k
	out := image.NewGray(image.Rect(0, 0, ow, oh))
	lut := encodeTable()
	sums := make([]float64, ow)
	counts := make([]int, ow)
	for oy := 0; oy < oh; oy++ {
		clear(sums)
		clear(counts)
		for y := oy * k; y < min((oy+1)*k, p.H); y++ {
			row := p.Pix[y*p.W : (y+1)*p.W]
			for x, v := range row {
				sums[x/k] += float64(v)
				counts[x/k]++
			}
		}
		dst := out.Pix[oy*out.Stride : oy*out.Stride+ow]
		for ox := range dst {
			dst[ox] = lut.encode(sums[ox] / float64(counts[ox]))
		}
	}
	return out, k
}

// table maps linear light to 8-bit sRGB codes by the thresholds between
// successive codes: code c is chosen for L in [t[c-1], t[c]), where t[c] is
// the linear value whose sRGB encoding is (c + 0.5) / 255. This rounds the
// encoded value to the nearest code exactly, without a pow per pixel.
type table [255]float64

func encodeTable() *table {
	var t table
	for c := range t {
		t[c] = srgb.ToLinear((float64(c) + 0.5) / 255)
	}
	return &t
}

func (t *table) encode(l float64) uint8 {
	if !(l > 0) { // also NaN
		return 0
	}
	lo, hi := 0, len(t) // first threshold above l, by bisection
	for lo < hi {
		m := (lo + hi) / 2
		if t[m] <= l {
			lo = m + 1
		} else {
			hi = m
		}
	}
	return uint8(lo)
}
