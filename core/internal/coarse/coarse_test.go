package coarse

import (
	"runtime"
	"slices"
	"testing"

	"sagitta/core/plane"
)

func TestShrink(t *testing.T) {
	// A box average of 2 x 2 blocks; the odd last column is dropped.
	p := plane.New(5, 2)
	for i := range p.Pix {
		p.Pix[i] = float32(i)
	}
	c := Shrink(p, 2)
	if c.W != 2 || c.H != 1 {
		t.Fatalf("size %dx%d", c.W, c.H)
	}
	// Block (0,0): 0, 1, 5, 6 -> 3; block (1,0): 2, 3, 7, 8 -> 5.
	if c.At(0, 0) != 3 || c.At(1, 0) != 5 {
		t.Errorf("got %v", c.Pix)
	}
	if Shrink(p, 1) != p {
		t.Error("k = 1 must return the plane itself")
	}
}

func TestLevelSeparates(t *testing.T) {
	// Dark squares on paper whose light falls off 4:1 from left to right:
	// the level lies between the local dark and light everywhere.
	w, h := 256, 64
	p := plane.New(w, h)
	for y := 0; y < h; y++ {
		for x := 0; x < w; x++ {
			light := 0.8 - 0.6*float64(x)/float64(w)
			v := light
			if (x/16)%2 == 0 && y > 16 && y < 48 {
				v = light / 5
			}
			p.Set(x, y, float32(v))
		}
	}
	lv := Level(p, 32, 1.5)
	for y := 20; y < 44; y++ {
		for x := 0; x < w; x++ {
			light := 0.8 - 0.6*float64(x)/float64(w)
			if l := float64(lv.At(x, y)); !(l > light/5 && l < light) {
				t.Fatalf("level %.3f at (%d,%d) not between %.3f and %.3f", l, x, y, light/5, light)
			}
		}
	}
	flat := plane.New(64, 64)
	for i := range flat.Pix {
		flat.Pix[i] = 0.5
	}
	if Level(flat, 32, 1.5).At(10, 10) != 0 {
		t.Error("a flat image must have no level")
	}
}

// TestSplitRowsSame: the reduction and the level are the same, bit for
// bit, on one CPU and on several (their rows are computed alone, over row
// ranges in parallel); the photo is large enough to be split. With -race
// (make test-race) it also checks that the ranges share nothing.
func TestSplitRowsSame(t *testing.T) {
	p := plane.New(1201, 903)
	for y := range p.H {
		for x := range p.W {
			v := float32(0.7)
			if (x/37+y/29)%2 == 0 {
				v = 0.05
			}
			p.Set(x, y, v*(1-float32(x)/3000)+float32((x*7+y*13)%17)/1000)
		}
	}
	run := func(procs int) (*plane.Plane, *plane.Plane) {
		defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(procs))
		c := Shrink(p, 2)
		return c, Level(c, 32, 1.3)
	}
	c1, l1 := run(1)
	c2, l2 := run(4)
	if !slices.Equal(c1.Pix, c2.Pix) || !slices.Equal(l1.Pix, l2.Pix) {
		t.Error("the planes differ between one CPU and several")
	}
}

// TestPercentiles checks the selection against a full sort (the order
// statistics are the sorted values at those ranks), with many ties.
func TestPercentiles(t *testing.T) {
	seed := uint32(1)
	next := func() uint32 { seed = seed*1664525 + 1013904223; return seed >> 8 }
	for _, n := range []int{1, 2, 3, 7, 64, 257, 1024} {
		for _, spread := range []uint32{3, 1000, 1 << 24} {
			buf := make([]float32, n)
			for i := range buf {
				buf[i] = float32(next()%spread) / 7
			}
			want := slices.Clone(buf)
			slices.Sort(want)
			i, j := n*5/100, n*95/100
			lo, hi := percentiles(buf, i, j)
			if lo != float64(want[i]) || hi != float64(want[j]) {
				t.Errorf("n %d spread %d: %g, %g; sorted %g, %g", n, spread, lo, hi, want[i], want[j])
			}
		}
	}
}

// TestViews: a shared reduction is Shrink's, made once.
func TestViews(t *testing.T) {
	p := plane.New(40, 30)
	for i := range p.Pix {
		p.Pix[i] = float32(i%13) / 13
	}
	v := NewViews(p)
	a := v.Shrink(4)
	if !slices.Equal(a.Pix, Shrink(p, 4).Pix) || v.Shrink(4) != a || v.Shrink(1) != p {
		t.Error("the shared reduction differs from Shrink's or is made again")
	}
	if Of(v, p) != v || Of(v, plane.New(4, 4)) == v || Of(nil, p) == nil {
		t.Error("Of")
	}
}

// TestShrinkFactors: every factor's block means (the unrolled ones and the
// general loop) agree with means taken in float64.
func TestShrinkFactors(t *testing.T) {
	p := plane.New(61, 37)
	for i := range p.Pix {
		p.Pix[i] = float32((i*7919)%1000) / 997
	}
	for k := 2; k <= 6; k++ {
		c := Shrink(p, k)
		for j := range c.H {
			for i := range c.W {
				var s float64
				for y := j * k; y < (j+1)*k; y++ {
					for x := i * k; x < (i+1)*k; x++ {
						s += float64(p.At(x, y))
					}
				}
				if d := float64(c.At(i, j)) - s/float64(k*k); d > 1e-6 || d < -1e-6 {
					t.Fatalf("k %d block (%d, %d): %g, mean %g", k, i, j, c.At(i, j), s/float64(k*k))
				}
			}
		}
	}
}
