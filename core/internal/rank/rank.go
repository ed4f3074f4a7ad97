// Package rank finds order statistics without sorting.
package rank

import "cmp"

// Select reorders a so that a[k] is the value sorting would put there, with
// no larger value before it and no smaller one after it, and returns it:
// Hoare's selection (C. A. R. Hoare, "Algorithm 65: Find", Comm. ACM 4(7),
// 1961, 321-322) with a median-of-three pivot, linear time on average
// instead of a sort's n log n. The values must not be NaN; k must lie in
// [0, len(a)).
func Select[T cmp.Ordered](a []T, k int) T {
	lo, hi := 0, len(a)-1
	for hi > lo {
		// Median of three as the pivot keeps sorted input linear.
		m := lo + (hi-lo)/2
		if a[m] < a[lo] {
			a[m], a[lo] = a[lo], a[m]
		}
		if a[hi] < a[lo] {
			a[hi], a[lo] = a[lo], a[hi]
		}
		if a[hi] < a[m] {
			a[hi], a[m] = a[m], a[hi]
		}
		pivot := a[m]
		i, j := lo, hi
		for i <= j {
			for a[i] < pivot {
				i++
			}
			for a[j] > pivot {
				j--
			}
			if i <= j {
				a[i], a[j] = a[j], a[i]
				i++
				j--
			}
		}
		// Now a[lo..j] <= pivot <= a[i..hi], and a[j+1..i-1] == pivot.
		switch {
		case k <= j:
			hi = j
		case k >= i:
			lo = i
		default:
			return a[k]
		}
	}
	return a[k]
}
