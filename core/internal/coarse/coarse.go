// Package coarse gives reduced views of a photo that the target searches
// (edges, sine patterns, chart marks) start from: a box-averaged reduction
// and a map of the local level between dark and light.
package coarse

import (
	"math"
	"runtime"
	"slices"

	"sagitta/core/internal/parallel"
	"sagitta/core/plane"
)

// Shrink returns p reduced by an integer factor k (box average of k x k
// blocks; a partial block at the right or bottom is dropped). Coarse pixel
// (i, j) covers full-resolution [i k, (i+1) k) x [j k, (j+1) k), so a coarse
// continuous coordinate c maps to c*k at full resolution. For k <= 1 it
// returns p itself.
func Shrink(p *plane.Plane, k int) *plane.Plane {
	if k <= 1 {
		return p
	}
	w, h := p.W/k, p.H/k
	out := plane.New(w, h)
	inv := 1 / float32(k*k)
	rows(h, w*k*k, func(j0, j1 int) {
		acc := make([]float32, w)
		for j := j0; j < j1; j++ {
			clear(acc)
			for y := j * k; y < (j+1)*k; y++ {
				row := p.Pix[y*p.W : y*p.W+w*k]
				for i := range w {
					var s float32
					for _, v := range row[i*k : (i+1)*k] {
						s += v
					}
					acc[i] += s
				}
			}
			dst := out.Pix[j*w : (j+1)*w]
			for i := range dst {
				dst[i] = acc[i] * inv
			}
		}
	})
	return out
}

// rows runs f over ranges [j0, j1) covering [0, h) on several goroutines
// when the work (about size samples read per row) is large and more than one
// CPU is available (never under js/wasm, where GOMAXPROCS is 1). Every
// output row is computed alone, so the result does not depend on the split.
func rows(h, size int, f func(j0, j1 int)) {
	n := runtime.GOMAXPROCS(0)
	if n < 2 || h < 2 || h*size < 1<<18 {
		f(0, h)
		return
	}
	parallel.Ranges(h, min(n, 8, h), f)
}

// Level returns, for every pixel of c, the level that separates dark from
// light locally: the geometric mean of the 5th and 95th percentiles of each
// tile x tile block whose 95th percentile is at least minRatio times its
// 5th (and above 1 % of full scale), spread into blocks without such
// contrast from their neighbours ring by ring, smoothed once (3 x 3 mean of
// blocks) and interpolated bilinearly between block centres. A local level
// copes with vignetting and uneven light, which can make the light paper
// in a corner darker than the dark targets in the middle of the frame. The
// percentiles are taken over every other row of a block. Where no block has
// contrast, the level is 0 everywhere.
func Level(c *plane.Plane, tile int, minRatio float64) *plane.Plane {
	tw, th := (c.W+tile-1)/tile, (c.H+tile-1)/tile
	level := make([]float64, tw*th)
	known := make([]bool, tw*th)
	rows(th, c.W*tile/2*8, func(ty0, ty1 int) { // a sort costs about 8 passes
		buf := make([]float32, 0, tile*tile)
		for ty := ty0; ty < ty1; ty++ {
			for tx := range tw {
				buf = buf[:0]
				for y := ty * tile; y < min((ty+1)*tile, c.H); y += 2 {
					buf = append(buf, c.Pix[y*c.W+tx*tile:y*c.W+min((tx+1)*tile, c.W)]...)
				}
				slices.Sort(buf)
				lo, hi := float64(buf[len(buf)*5/100]), float64(buf[len(buf)*95/100])
				if hi > 0.01 && hi >= minRatio*lo {
					level[ty*tw+tx] = math.Sqrt(math.Max(lo, hi*1e-3) * hi)
					known[ty*tw+tx] = true
				}
			}
		}
	})
	// Spread known levels into unknown blocks, ring by ring.
	for {
		changed := false
		next := slices.Clone(known)
		for i := range level {
			if known[i] {
				continue
			}
			if s, n := neighbours(level, known, i, tw, th); n > 0 {
				level[i], next[i], changed = s/float64(n), true, true
			}
		}
		known = next
		if !changed {
			break
		}
	}
	sm := make([]float64, len(level))
	for i := range level {
		if s, n := neighbours(level, known, i, tw, th); n > 0 {
			sm[i] = s / float64(n)
		}
	}
	out := plane.New(c.W, c.H)
	rows(c.H, 4*c.W, func(ya, yb int) {
		for y := ya; y < yb; y++ {
			fy := (float64(y)+0.5)/float64(tile) - 0.5
			y0 := min(max(int(math.Floor(fy)), 0), th-1)
			y1 := min(y0+1, th-1)
			ay := math.Min(math.Max(fy-float64(y0), 0), 1)
			for x := range c.W {
				fx := (float64(x)+0.5)/float64(tile) - 0.5
				x0 := min(max(int(math.Floor(fx)), 0), tw-1)
				x1 := min(x0+1, tw-1)
				ax := math.Min(math.Max(fx-float64(x0), 0), 1)
				v := (sm[y0*tw+x0]*(1-ax)+sm[y0*tw+x1]*ax)*(1-ay) + (sm[y1*tw+x0]*(1-ax)+sm[y1*tw+x1]*ax)*ay
				out.Pix[y*c.W+x] = float32(v)
			}
		}
	})
	return out
}

// neighbours sums the known levels in the 3 x 3 blocks around block i
// (itself included) and counts them.
func neighbours(level []float64, known []bool, i, tw, th int) (float64, int) {
	x, y := i%tw, i/tw
	var s float64
	var n int
	for dy := -1; dy <= 1; dy++ {
		for dx := -1; dx <= 1; dx++ {
			xx, yy := x+dx, y+dy
			if xx >= 0 && yy >= 0 && xx < tw && yy < th && known[yy*tw+xx] {
				s += level[yy*tw+xx]
				n++
			}
		}
	}
	return s, n
}
