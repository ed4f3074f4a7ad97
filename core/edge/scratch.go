package edge

import "sync"

// scratch is the working memory of one measurement that does not outlive
// it: the region's samples, their distances and sides, the noise
// estimates' grids and lists. A photo's regions are measured one after
// another on each worker, so the memory of one is reused by the next (a
// pool, one scratch per measurement running at a time) instead of being
// allocated and collected for every region.
type scratch struct {
	u, w, v, d []float64
	at         []int32
	sides      []int8
	// cells is the noise correlation's grid (noisepsd.go); it is all
	// zero between uses: measureNoiseShape clears the cells it set.
	cells  []noiseCell
	dd, dl []float64
	// Temporaries of one step each: the copy percentiles selects in, the
	// edge fit's band of samples, the radix sort's second array and the
	// estimator's merged bins.
	sel, band, sorted []float64
	bins              []point
	// flat is samples.flattened's result for the current measurement
	// (cleared when a region's samples are gathered).
	flat flatCache
}

// flatCache holds samples.flattened's result for one core width.
type flatCache struct {
	ok          bool
	core        float64
	v           []float64
	dark, light float64
}

var scratchPool = sync.Pool{New: func() any { return new(scratch) }}

// getScratch takes a scratch from the pool. Give it back with putScratch
// only after a measurement ran to its end: one left by a panic may hold
// cells that are not zero, and is simply dropped.
func getScratch() *scratch { return scratchPool.Get().(*scratch) }

func putScratch(sc *scratch) { scratchPool.Put(sc) }

// take returns buf emptied, or a new slice when buf cannot hold n.
func take[T any](buf []T, n int) []T {
	if cap(buf) >= n {
		return buf[:0]
	}
	return make([]T, 0, n)
}
