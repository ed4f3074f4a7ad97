package edge

import (
	"cmp"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestSortByKey: the bucket sort gives the order of the standard library's
// stable comparison sort (Go's slices.SortStableFunc, the reference), ties
// included, for keys spread evenly, bunched, repeated and at the range's
// ends.
func TestSortByKey(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	var tmp, count []int32
	for trial := range 200 {
		n := 1 + rng.IntN(400)
		key := make([]float64, n)
		for i := range key {
			switch trial % 4 {
			case 0:
				key[i] = -7 + 14*rng.Float64()
			case 1:
				key[i] = 0.01 * rng.NormFloat64() // all in a few buckets
			case 2:
				key[i] = float64(rng.IntN(5)) - 2 // many exact ties
			default:
				key[i] = []float64{-7, 7, 0}[rng.IntN(3)]
			}
			key[i] = min(max(key[i], -7), 7)
		}
		ord := make([]int32, n)
		for i := range ord {
			ord[i] = int32(n - 1 - i) // not the identity: stability is checked against this order
		}
		want := slices.Clone(ord)
		slices.SortStableFunc(want, func(a, b int32) int { return cmp.Compare(key[a], key[b]) })
		tmp, count = sortByKey(ord, key, -7, 7, tmp, count)
		if !slices.Equal(ord, want) {
			t.Fatalf("trial %d (n %d): order differs from the stable comparison sort", trial, n)
		}
	}
}
