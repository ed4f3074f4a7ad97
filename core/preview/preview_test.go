package preview

import (
	"fmt"
	"math"
	"sagitta/core/decode/srgb"
	"testing"

	"sagitta/core/plane"
)

func TestFactor(t *testing.T) {
	tests := []struct {
		name          string
		w, h, maxSide int
		want          int
	}{
		{"fits", 800, 600, 1024, 1},
		{"exact", 2048, 1000, 1024, 2},
		{"one over", 2049, 1000, 1024, 3},
		{"24 MP", 6000, 4000, 1600, 4},
		{"tall", 100, 5000, 1000, 5},
		{"one pixel", 1, 1, 1, 1},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got := Factor(tc.w, tc.h, tc.maxSide)
			if got != tc.want {
				t.Fatalf("Factor(%d, %d, %d) = %d, want %d", tc.w, tc.h, tc.maxSide, got, tc.want)
			}
			if (max(tc.w, tc.h)+got-1)/got > tc.maxSide {
				t.Fatalf("reduced size exceeds %d", tc.maxSide)
			}
		})
	}
}

// The encoded codes are checked against the sRGB transfer function of
// IEC 61966-2-1 evaluated directly and rounded to the nearest code, for
// every code's centre and both sides of every rounding threshold.
func TestEncodeMatchesTransferFunction(t *testing.T) {
	lut := encodeTable()
	for c := 0; c < 256; c++ {
		for _, dv := range []float64{-0.499, 0, 0.499} {
			v := (float64(c) + dv) / 255
			if v < 0 || v > 1 {
				continue
			}
			l := srgb.ToLinear(v)
			want := uint8(math.Round(srgb.FromLinear(l) * 255))
			if got := lut.encode(l); got != want {
				t.Fatalf("encode(%g) = %d, want %d (code %d)", l, got, want, c)
			}
		}
	}
	// Reference points of the sRGB curve (IEC 61966-2-1): linear 0.5 is
	// encoded as 0.7354 (code 188), linear 0.18 as 0.4614 (code 118).
	for _, tc := range []struct {
		in   float64
		want uint8
	}{{0, 0}, {-1, 0}, {math.NaN(), 0}, {1, 255}, {2, 255}, {0.5, 188}, {0.18, 118}} {
		if got := lut.encode(tc.in); got != tc.want {
			t.Errorf("encode(%g) = %d, want %d", tc.in, got, tc.want)
		}
	}
}

func TestGrayAveragesBlocksInLinearLight(t *testing.T) {
	// A 5 x 3 plane reduced by 2: blocks of 2 x 2, partial at the edges.
	p := plane.New(5, 3)
	for y := 0; y < p.H; y++ {
		for x := 0; x < p.W; x++ {
			p.Set(x, y, float32(x%2)) // columns alternate 0, 1, 0, 1, 0
		}
	}
	img, k := Gray(p, 3)
	if k != 2 {
		t.Fatalf("factor %d, want 2", k)
	}
	if b := img.Bounds(); b.Dx() != 3 || b.Dy() != 2 {
		t.Fatalf("size %v, want 3 x 2", b)
	}
	// Full and partial blocks over columns {0,1} and {2,3} average to 0.5
	// in linear light (code 188, see above); the last column is all 0.
	want := []uint8{188, 188, 0, 188, 188, 0}
	for i, w := range want {
		x, y := i%3, i/3
		if got := img.GrayAt(x, y).Y; got != w {
			t.Errorf("pixel (%d,%d) = %d, want %d", x, y, got, w)
		}
	}
}

func BenchmarkGray(b *testing.B) {
	for _, s := range []struct{ w, h int }{{1500, 1000}, {6000, 4000}} {
		p := plane.New(s.w, s.h)
		for i := range p.Pix {
			p.Pix[i] = float32(i%97) / 97
		}
		b.Run(fmt.Sprintf("%dx%d", s.w, s.h), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				Gray(p, 1600)
			}
		})
	}
}
