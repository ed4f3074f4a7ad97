package rank

import (
	"math/rand/v2"
	"slices"
	"testing"
)

// Select gives the value a sort puts at k (the definition of the k-th order
// statistic), with the values split about it, for sizes, ties and orders
// that exercise every branch of the partition.
func TestSelectAgainstSort(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	for _, n := range []int{1, 2, 3, 7, 64, 501} {
		for _, levels := range []int{1, 3, 1000} {
			v := make([]float64, n)
			for i := range v {
				v[i] = float64(r.IntN(levels))
			}
			for _, order := range []string{"random", "sorted", "reversed"} {
				w := slices.Clone(v)
				switch order {
				case "sorted":
					slices.Sort(w)
				case "reversed":
					slices.Sort(w)
					slices.Reverse(w)
				}
				sorted := slices.Sorted(slices.Values(w))
				for _, k := range []int{0, n / 3, n / 2, n - 1} {
					a := slices.Clone(w)
					if got := Select(a, k); got != sorted[k] || a[k] != sorted[k] {
						t.Fatalf("n %d levels %d %s: Select(%d) = %v (a[k] %v), sorted %v", n, levels, order, k, got, a[k], sorted[k])
					}
					for i := range a {
						if (i < k && a[i] > a[k]) || (i > k && a[i] < a[k]) {
							t.Fatalf("n %d levels %d %s k %d: a[%d] = %v on the wrong side of %v", n, levels, order, k, i, a[i], a[k])
						}
					}
				}
			}
		}
	}
	f := []float32{3, 1, 2}
	if Select(f, 1) != 2 {
		t.Fatalf("float32: %v", f)
	}
}
