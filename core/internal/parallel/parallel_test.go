package parallel

import (
	"runtime"
	"sync/atomic"
	"testing"
)

// TestForEachOnce: every index is called exactly once, whatever the number
// of workers.
func TestForEachOnce(t *testing.T) {
	for _, n := range []int{0, 1, 7, 100} {
		for _, w := range []int{-1, 0, 1, 3, 200} {
			counts := make([]atomic.Int32, n)
			For(n, w, func(i int) { counts[i].Add(1) })
			for i := range counts {
				if c := counts[i].Load(); c != 1 {
					t.Errorf("n %d, workers %d: index %d called %d times", n, w, i, c)
				}
			}
		}
	}
}

// TestForInOrder: one worker runs the calls in order on the caller's
// goroutine.
func TestForInOrder(t *testing.T) {
	var got []int
	For(5, 1, func(i int) { got = append(got, i) })
	for i, v := range got {
		if v != i {
			t.Fatalf("order %v", got)
		}
	}
	if len(got) != 5 {
		t.Fatalf("%d calls", len(got))
	}
}

// TestRanges: the ranges cover [0, n) without gap or overlap.
func TestRanges(t *testing.T) {
	for _, n := range []int{1, 10, 1001} {
		for _, parts := range []int{1, 3, 8, 2000} {
			counts := make([]atomic.Int32, n)
			Ranges(n, parts, func(lo, hi int) {
				for i := lo; i < hi; i++ {
					counts[i].Add(1)
				}
			})
			for i := range counts {
				if c := counts[i].Load(); c != 1 {
					t.Errorf("n %d, parts %d: index %d covered %d times", n, parts, i, c)
				}
			}
		}
	}
}

// Rows covers every row once, in one call for a small job, and in bands of
// rows in order on one CPU.
func TestRows(t *testing.T) {
	for _, c := range []struct{ h, work int }{{1, 10}, {100, 10}, {4000, 6000}, {37, 1 << 16}} {
		counts := make([]atomic.Int32, c.h)
		var calls atomic.Int32
		Rows(c.h, c.work, func(y0, y1 int) {
			calls.Add(1)
			for y := y0; y < y1; y++ {
				counts[y].Add(1)
			}
		})
		for y := range counts {
			if n := counts[y].Load(); n != 1 {
				t.Fatalf("h %d: row %d covered %d times", c.h, y, n)
			}
		}
		if c.h*c.work < 1<<18 && calls.Load() != 1 {
			t.Errorf("h %d, work %d: a small job in %d calls", c.h, c.work, calls.Load())
		}
	}
	prev := runtime.GOMAXPROCS(1)
	defer runtime.GOMAXPROCS(prev)
	var bands [][2]int
	Rows(4000, 6000, func(y0, y1 int) { bands = append(bands, [2]int{y0, y1}) })
	if len(bands) < 8 || bands[0][0] != 0 || bands[len(bands)-1][1] != 4000 {
		t.Fatalf("one CPU: %d bands %v...", len(bands), bands[:min(3, len(bands))])
	}
	for i := 1; i < len(bands); i++ {
		if bands[i][0] != bands[i-1][1] {
			t.Fatalf("one CPU: bands out of order at %d: %v", i, bands[i-1:i+1])
		}
	}
}
