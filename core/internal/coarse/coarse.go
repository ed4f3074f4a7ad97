// Package coarse gives reduced views of a photo that the target searches
// (edges, sine patterns, chart marks) start from: a box-averaged reduction
// and a map of the local level between dark and light.
package coarse

import (
	"math"
	"slices"

	"sagitta/core/internal/parallel"
	"sagitta/core/internal/rank"
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
	parallel.Rows(h, w*k*k, func(j0, j1 int) {
		acc := make([]float32, w)
		for j := j0; j < j1; j++ {
			clear(acc)
			for y := j * k; y < (j+1)*k; y++ {
				row := p.Pix[y*p.W : y*p.W+w*k]
				switch k { // the same sums in the same order, unrolled for the usual factors
				case 2:
					for i := range acc {
						r := row[2*i : 2*i+2]
						acc[i] += r[0] + r[1]
					}
				case 4:
					for i := range acc {
						r := row[4*i : 4*i+4]
						acc[i] += r[0] + r[1] + r[2] + r[3]
					}
				default:
					for i := range w {
						var s float32
						for _, v := range row[i*k : (i+1)*k] {
							s += v
						}
						acc[i] += s
					}
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
	parallel.Rows(th, c.W*tile/2*8, func(ty0, ty1 int) { // a sort costs about 8 passes
		buf := make([]float32, 0, tile*tile)
		for ty := ty0; ty < ty1; ty++ {
			for tx := range tw {
				buf = buf[:0]
				for y := ty * tile; y < min((ty+1)*tile, c.H); y += 2 {
					buf = append(buf, c.Pix[y*c.W+tx*tile:y*c.W+min((tx+1)*tile, c.W)]...)
				}
				lo, hi := percentiles(buf, len(buf)*5/100, len(buf)*95/100)
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
	// The blocks and weights of each column, the same for every row.
	cx0, cx1, cax := make([]int, c.W), make([]int, c.W), make([]float64, c.W)
	for x := range c.W {
		fx := (float64(x)+0.5)/float64(tile) - 0.5
		cx0[x] = min(max(int(math.Floor(fx)), 0), tw-1)
		cx1[x] = min(cx0[x]+1, tw-1)
		cax[x] = math.Min(math.Max(fx-float64(cx0[x]), 0), 1)
	}
	parallel.Rows(c.H, 4*c.W, func(ya, yb int) {
		for y := ya; y < yb; y++ {
			fy := (float64(y)+0.5)/float64(tile) - 0.5
			y0 := min(max(int(math.Floor(fy)), 0), th-1)
			y1 := min(y0+1, th-1)
			ay := math.Min(math.Max(fy-float64(y0), 0), 1)
			r0, r1 := sm[y0*tw:(y0+1)*tw], sm[y1*tw:(y1+1)*tw]
			for x := range c.W {
				x0, x1, ax := cx0[x], cx1[x], cax[x]
				v := (r0[x0]*(1-ax)+r0[x1]*ax)*(1-ay) + (r1[x0]*(1-ax)+r1[x1]*ax)*ay
				out.Pix[y*c.W+x] = float32(v)
			}
		}
	})
	return out
}

// percentiles returns the values of rank i and j (i <= j) of buf in
// ascending order, as buf[i] and buf[j] after sorting it, reordering buf:
// two selections (Hoare's FIND, quickselect) in place of a sort. A NaN
// falls back to the sort's order.
func percentiles(buf []float32, i, j int) (float64, float64) {
	for _, v := range buf {
		if v != v {
			slices.Sort(buf)
			return float64(buf[i]), float64(buf[j])
		}
	}
	rank.Select(buf, i)
	rank.Select(buf[i:], j-i) // every value past i is at least buf[i]
	return float64(buf[i]), float64(buf[j])
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
