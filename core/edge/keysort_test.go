package edge

import (
	"cmp"
	"math"
	"math/rand/v2"
	"slices"
	"sort"
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

// TestSortNonNegative: the radix sort of non-negative values gives what
// the standard library's sort.Float64s gives (the reference), on absolute
// differences of float32 values (as the pair noise makes them), on
// arbitrary float64 values with repeats, zeros and +Inf, and on values
// with a negative or NaN among them (the fallback).
func TestSortNonNegative(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 4))
	var tmp []float64 // reused from one trial to the next, as a scratch is
	for trial := range 300 {
		n := rng.IntN(3000)
		d := make([]float64, n)
		for i := range d {
			switch trial % 4 {
			case 0:
				a, b := float32(rng.Float64()), float32(rng.Float64())
				d[i] = math.Abs(float64(a - b))
			case 1:
				d[i] = math.Abs(rng.NormFloat64()) * math.Pow(10, float64(rng.IntN(20)-10))
			case 2:
				d[i] = []float64{0, 1, 0.5, math.Inf(1), 1e-300}[rng.IntN(5)]
			default:
				d[i] = rng.NormFloat64()
				if i == n/2 {
					d[i] = math.NaN()
				}
			}
		}
		want := slices.Clone(d)
		sort.Float64s(want)
		sortNonNegative(d, &tmp)
		for i := range d {
			if math.Float64bits(d[i]) != math.Float64bits(want[i]) && !(math.IsNaN(d[i]) && math.IsNaN(want[i])) {
				t.Fatalf("trial %d (n %d): index %d is %v, sort.Float64s gives %v", trial, n, i, d[i], want[i])
			}
		}
	}
}
