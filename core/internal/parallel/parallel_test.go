package parallel

import (
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
