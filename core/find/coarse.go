package find

import (
	"math"
	"slices"

	"sagitta/core/plane"
)

// shrink returns the plane reduced by an integer factor k (box average of
// k x k blocks; a partial block at the right or bottom is dropped). Coarse
// pixel (i, j) covers full-resolution [i k, (i+1) k) x [j k, (j+1) k), so a
// coarse continuous coordinate c maps to c*k at full resolution.
func shrink(p *plane.Plane, k int) *plane.Plane {
	if k <= 1 {
		return p
	}
	w, h := p.W/k, p.H/k
	out := plane.New(w, h)
	inv := 1 / float32(k*k)
	acc := make([]float32, w)
	for j := 0; j < h; j++ {
		clear(acc)
		for y := j * k; y < (j+1)*k; y++ {
			row := p.Pix[y*p.W : y*p.W+w*k]
			for i := 0; i < w; i++ {
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
	return out
}

// tilePx is the side of the tiles over which the local threshold is set,
// in coarse pixels.
const tilePx = 32

// minTileRatio is the light/dark ratio below which a tile is taken to hold
// no edge and borrows its threshold from its neighbours.
const minTileRatio = 1.3

// threshold returns, for every coarse pixel, the level separating dark from
// light locally: the geometric mean of the 5th and 95th percentiles of each
// tile that holds contrast, spread into tiles without contrast from their
// neighbours, smoothed and interpolated bilinearly. A local level copes with
// vignetting and uneven light, which can make the light paper in a corner
// darker than the dark targets in the middle of the frame.
func threshold(c *plane.Plane) *plane.Plane {
	tw := (c.W + tilePx - 1) / tilePx
	th := (c.H + tilePx - 1) / tilePx
	level := make([]float64, tw*th)
	known := make([]bool, tw*th)
	buf := make([]float32, 0, tilePx*tilePx)
	for ty := 0; ty < th; ty++ {
		for tx := 0; tx < tw; tx++ {
			buf = buf[:0]
			for y := ty * tilePx; y < min((ty+1)*tilePx, c.H); y++ {
				buf = append(buf, c.Pix[y*c.W+tx*tilePx:y*c.W+min((tx+1)*tilePx, c.W)]...)
			}
			slices.Sort(buf)
			lo := float64(buf[len(buf)*5/100])
			hi := float64(buf[len(buf)*95/100])
			if lo > 0 && hi/lo >= minTileRatio || lo <= 0 && hi > 0.02 {
				level[ty*tw+tx] = math.Sqrt(math.Max(lo, hi*1e-3) * hi)
				known[ty*tw+tx] = true
			}
		}
	}
	// Spread known levels into unknown tiles, ring by ring.
	for {
		changed, any := false, false
		next := append([]bool(nil), known...)
		for i := range level {
			if known[i] {
				any = true
				continue
			}
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
			if n > 0 {
				level[i] = s / float64(n)
				next[i] = true
				changed = true
			}
		}
		known = next
		if !changed || !any {
			break
		}
	}
	// Smooth the tile levels once (3 x 3 mean) and interpolate per pixel.
	sm := make([]float64, len(level))
	for i := range level {
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
		if n > 0 {
			sm[i] = s / float64(n)
		}
	}
	out := plane.New(c.W, c.H)
	for y := 0; y < c.H; y++ {
		fy := (float64(y)+0.5)/tilePx - 0.5
		y0 := min(max(int(math.Floor(fy)), 0), th-1)
		y1 := min(y0+1, th-1)
		ay := math.Min(math.Max(fy-float64(y0), 0), 1)
		for x := 0; x < c.W; x++ {
			fx := (float64(x)+0.5)/tilePx - 0.5
			x0 := min(max(int(math.Floor(fx)), 0), tw-1)
			x1 := min(x0+1, tw-1)
			ax := math.Min(math.Max(fx-float64(x0), 0), 1)
			v := (sm[y0*tw+x0]*(1-ax)+sm[y0*tw+x1]*ax)*(1-ay) + (sm[y1*tw+x0]*(1-ax)+sm[y1*tw+x1]*ax)*ay
			out.Pix[y*c.W+x] = float32(v)
		}
	}
	return out
}
