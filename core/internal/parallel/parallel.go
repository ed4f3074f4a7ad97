// Package parallel is the one worker pool of the core: a parallel for
// loop over indices. The packages that measure many targets, convert many
// rows or render many bands call it instead of keeping pools of their own.
package parallel

import (
	"runtime"
	"sync"
	"sync/atomic"
)

// For calls f(i) once for every i in [0, n), on up to workers goroutines
// (runtime.GOMAXPROCS(0) when workers <= 0), each taking the lowest index
// not yet taken, and returns when every call has returned. With one worker
// (as under js/wasm, where GOMAXPROCS is 1) the calls run in order on the
// calling goroutine. f must be safe to call concurrently for different i;
// a panic in f is not recovered.
func For(n, workers int, f func(i int)) {
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, n)
	if workers <= 1 {
		for i := range n {
			f(i)
		}
		return
	}
	var next atomic.Int64
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				i := int(next.Add(1) - 1)
				if i >= n {
					return
				}
				f(i)
			}
		}()
	}
	wg.Wait()
}

// Ranges splits [0, n) into parts contiguous ranges of nearly equal length
// (runtime.GOMAXPROCS(0) of them when parts <= 0, at most n) and calls
// f(lo, hi) for each, one goroutine per range. With one range, f(0, n)
// runs on the calling goroutine.
func Ranges(n, parts int, f func(lo, hi int)) {
	if parts <= 0 {
		parts = runtime.GOMAXPROCS(0)
	}
	parts = min(parts, n)
	if parts <= 1 {
		f(0, n)
		return
	}
	For(parts, parts, func(i int) { f(i*n/parts, (i+1)*n/parts) })
}

// Rows runs f over row ranges [y0, y1) covering [0, h), where each row
// costs about work reads and every row is computed alone (so the result
// does not depend on the split). Large jobs go on up to 8 goroutines when
// more than one CPU is available. On one CPU (always under js/wasm, where
// GOMAXPROCS is 1) a large job still goes in bands of rows, one call each:
// a browser runs a WebAssembly function with its quick first compilation
// until the function is called again (it does not swap the code of a
// running call), so one call over a whole 24 MP plane ran at a third of
// the speed of the same loop called band by band.
func Rows(h, work int, f func(y0, y1 int)) {
	if h < 2 || h*work < 1<<18 {
		f(0, h)
		return
	}
	if n := runtime.GOMAXPROCS(0); n >= 2 {
		Ranges(h, min(n, 8, h), f)
		return
	}
	band := max(1, (1<<16)/max(work, 1))
	for y := 0; y < h; y += band {
		f(y, min(y+band, h))
	}
}
