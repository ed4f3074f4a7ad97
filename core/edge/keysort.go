package edge

// sortByKey puts the indices ord in ascending order of key[ord[i]]: a
// bucket (counting) sort on the key followed by an insertion sort, linear
// time for keys spread evenly over [lo, hi], as the distances of a pixel
// grid's samples from a smooth line are (D. E. Knuth, The Art of Computer
// Programming, vol. 3, 2nd ed., sec. 5.2 and 5.2.5: distribution counting
// and sorting by distribution). The bucket of a key is a non-decreasing
// function of it, so the buckets come out in order and the insertion sort
// only works inside each bucket; keys that are exactly equal keep their
// order in ord (the sort is stable). tmp and count are scratch space, grown
// as needed and returned for reuse. Keys must not be NaN; keys outside
// [lo, hi] go to the end buckets and are still put in order, only slower.
func sortByKey(ord []int32, key []float64, lo, hi float64, tmp []int32, count []int32) ([]int32, []int32) {
	n := len(ord)
	if n < 2 {
		return tmp, count
	}
	nb := n
	tmp = grow(tmp, n)
	count = grow(count, nb+1)
	clear(count)
	scale := 0.0
	if hi > lo {
		scale = float64(nb) / (hi - lo)
	}
	bucket := func(k float64) int {
		b := int((k - lo) * scale)
		return min(max(b, 0), nb-1)
	}
	for _, i := range ord {
		count[bucket(key[i])+1]++
	}
	for b := 1; b <= nb; b++ {
		count[b] += count[b-1]
	}
	for _, i := range ord {
		b := bucket(key[i])
		tmp[count[b]] = i
		count[b]++
	}
	// Insertion sort: every element is already in its bucket's place, so
	// each moves only past the few of its own bucket.
	for j := 1; j < n; j++ {
		i := tmp[j]
		k := key[i]
		m := j
		for m > 0 && key[tmp[m-1]] > k {
			tmp[m] = tmp[m-1]
			m--
		}
		tmp[m] = i
	}
	copy(ord, tmp[:n])
	return tmp, count
}

// grow returns s with length n, reusing its array when it is large enough.
func grow[T any](s []T, n int) []T {
	if cap(s) >= n {
		return s[:n]
	}
	return make([]T, n)
}
