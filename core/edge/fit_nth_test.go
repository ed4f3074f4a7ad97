package edge

import (
	"math/rand/v2"
	"slices"
	"testing"
)

// TestNth: the selection gives what a sort puts at each index, on random
// values with and without repeats (the definition of the k-th order
// statistic; the sort is Go's slices.Sort).
func TestNth(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, n := range []int{1, 2, 3, 5, 17, 100, 1001} {
		for _, levels := range []int{0, 3} {
			v := make([]float64, n)
			for i := range v {
				if levels > 0 {
					v[i] = float64(rng.IntN(levels))
				} else {
					v[i] = rng.NormFloat64()
				}
			}
			sorted := slices.Clone(v)
			slices.Sort(sorted)
			for k := range n {
				if got := nth(slices.Clone(v), k); got != sorted[k] {
					t.Fatalf("n %d levels %d: nth(%d) = %v, sorted %v", n, levels, k, got, sorted[k])
				}
			}
		}
	}
}
