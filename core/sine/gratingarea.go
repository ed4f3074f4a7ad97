package sine

import (
	"math"

	"gonum.org/v1/gonum/dsp/fourier"
	"sagitta/core/plane"
)

// Finding a grating in its area: the pixels, the frequency (spectrum peak,
// then refinement by the fitted amplitude) and the pattern's interior clear
// of its blurred border.

// pix is a pixel position.
type pix struct{ x, y int }

// areaPixels returns the pixels whose centres lie inside the convex
// quadrilateral q and inside the plane.
func areaPixels(p *plane.Plane, q [4][2]float64) []pix {
	x0, y0 := math.Inf(1), math.Inf(1)
	x1, y1 := math.Inf(-1), math.Inf(-1)
	for _, c := range q {
		if math.IsNaN(c[0]) || math.IsNaN(c[1]) || math.IsInf(c[0], 0) || math.IsInf(c[1], 0) {
			return nil
		}
		x0, x1 = math.Min(x0, c[0]), math.Max(x1, c[0])
		y0, y1 = math.Min(y0, c[1]), math.Max(y1, c[1])
	}
	ix0, iy0 := max(int(math.Floor(x0)), 0), max(int(math.Floor(y0)), 0)
	ix1, iy1 := min(int(math.Ceil(x1)), p.W-1), min(int(math.Ceil(y1)), p.H-1)
	if ix1 < ix0 || iy1 < iy0 || float64(ix1-ix0+1)*float64(iy1-iy0+1) > 4*maxGratingPixels {
		return nil
	}
	var out []pix
	for y := iy0; y <= iy1; y++ {
		for x := ix0; x <= ix1; x++ {
			if inside(q, float64(x)+0.5, float64(y)+0.5) {
				out = append(out, pix{x, y})
			}
		}
	}
	return out
}

// spectrumPeak returns the strongest spatial frequency (fx >= 0, cy/px) of
// the pixels px: the peak of the 2D DFT of a Hann-windowed patch of at most
// maxSpecSide px square about the area's middle, zero-padded twofold, with
// parabolic interpolation between bins.
func spectrumPeak(p *plane.Plane, px []pix) (fx, fy float64, ok bool) {
	var sx, sy, sv float64
	for _, q := range px {
		sx += float64(q.x)
		sy += float64(q.y)
		sv += float64(p.Pix[q.y*p.W+q.x])
	}
	n := float64(len(px))
	cx, cy, mean := int(sx/n), int(sy/n), sv/n
	x0, y0, x1, y1 := math.MaxInt, math.MaxInt, math.MinInt, math.MinInt
	for _, q := range px {
		x0, x1 = min(x0, q.x), max(x1, q.x)
		y0, y1 = min(y0, q.y), max(y1, q.y)
	}
	w := min(x1-x0+1, maxSpecSide)
	h := min(y1-y0+1, maxSpecSide)
	if w < 8 || h < 8 {
		return 0, 0, false
	}
	bx, by := max(cx-w/2, x0), max(cy-h/2, y0)
	bx, by = min(bx, x1-w+1), min(by, y1-h+1)
	nx, ny := 16, 16
	for nx < 2*w {
		nx *= 2
	}
	for ny < 2*h {
		ny *= 2
	}
	inArea := make(map[pix]bool, len(px))
	for _, q := range px {
		if q.x >= bx && q.x < bx+w && q.y >= by && q.y < by+h {
			inArea[q] = true
		}
	}
	nh := nx/2 + 1
	spec := make([]complex128, ny*nh)
	row := make([]float64, nx)
	rfft := fourier.NewFFT(nx)
	for j := range h {
		clear(row)
		wy := 0.5 - 0.5*math.Cos(2*math.Pi*(float64(j)+0.5)/float64(h))
		for i := range w {
			q := pix{bx + i, by + j}
			if inArea[q] {
				wx := 0.5 - 0.5*math.Cos(2*math.Pi*(float64(i)+0.5)/float64(w))
				row[i] = (float64(p.Pix[q.y*p.W+q.x]) - mean) * wx * wy
			}
		}
		rfft.Coefficients(spec[j*nh:(j+1)*nh], row)
	}
	col := make([]complex128, ny)
	cfft := fourier.NewCmplxFFT(ny)
	pow := make([]float64, ny*nh)
	for m := range nh {
		for q := range ny {
			col[q] = spec[q*nh+m]
		}
		cfft.Coefficients(col, col)
		for q := range ny {
			pow[q*nh+m] = real(col[q])*real(col[q]) + imag(col[q])*imag(col[q])
		}
	}
	// Strongest bin away from zero frequency.
	best, bm, bq := 0.0, -1, -1
	for q := range ny {
		fyq := float64(freqIdx(q, ny)) / float64(ny)
		for m := range nh {
			fxm := float64(m) / float64(nx)
			// skip the bins next to zero frequency (the window's own lobe)
			if math.Abs(fxm)*float64(w) < 1.5 && math.Abs(fyq)*float64(h) < 1.5 {
				continue
			}
			// f^2 weighting: the spectrum of the gradient, in which the
			// 1/f spectrum of steps (the pattern's border, the paper
			// around it) is flat and a grating's line stands out.
			if v := pow[q*nh+m] * (fxm*fxm + fyq*fyq); v > best {
				best, bm, bq = v, m, q
			}
		}
	}
	if bm < 0 || best == 0 {
		return 0, 0, false
	}
	at := func(m, q int) float64 {
		if m < 0 || m >= nh {
			return 0
		}
		q = (q + ny) % ny
		fxm, fyq := float64(m)/float64(nx), float64(freqIdx(q, ny))/float64(ny)
		return pow[q*nh+m] * (fxm*fxm + fyq*fyq)
	}
	dm := parabola(at(bm-1, bq), best, at(bm+1, bq))
	dq := parabola(at(bm, bq-1), best, at(bm, bq+1))
	fx = (float64(bm) + dm) / float64(nx)
	fy = (float64(freqIdx(bq, ny)) + dq) / float64(ny)
	return fx, fy, true
}

// freqIdx maps DFT index i of n to its signed frequency index.
func freqIdx(i, n int) int {
	if i > n/2 {
		return i - n
	}
	return i
}

// parabola returns the offset (-0.5..0.5) of the vertex of the parabola
// through (-1, a), (0, b), (1, c).
func parabola(a, b, c float64) float64 {
	d := a - 2*b + c
	if d >= 0 {
		return 0
	}
	return math.Max(-0.5, math.Min(0.5, 0.5*(a-c)/d))
}

// amplitude returns the amplitude of the least-squares sinusoid of
// frequency (fx, fy) over the pixels of a.
//
// The phase 2 pi (fx x + fy y) of a pixel is the sum of a column's and a
// row's, so its cosine and sine come from one table of each by the angle-sum
// identities instead of a Sincos per pixel (they agree to about 1e-15).
func (a *ampArea) amplitude(fx, fy float64) float64 {
	for i := range a.cx {
		a.sx[i], a.cx[i] = math.Sincos(2 * math.Pi * fx * (float64(a.x0+i) + 0.5))
	}
	for j := range a.cy {
		a.sy[j], a.cy[j] = math.Sincos(2 * math.Pi * fy * (float64(a.y0+j) + 0.5))
	}
	var h harmonic
	for _, q := range a.px {
		i, j := q.x-a.x0, q.y-a.y0
		c := a.cx[i]*a.cy[j] - a.sx[i]*a.sy[j]
		s := a.sx[i]*a.cy[j] + a.cx[i]*a.sy[j]
		h.add(c, s, float64(a.p.Pix[q.y*a.p.W+q.x]))
	}
	f := h.solve()
	return math.Hypot(f.b, f.c)
}

// ampArea holds the pixels amplitude fits over, their bounding columns
// x0.. and rows y0.., and the trigonometric tables it fills per frequency.
type ampArea struct {
	p              *plane.Plane
	px             []pix
	x0, y0         int
	cx, sx, cy, sy []float64
}

func newAmpArea(p *plane.Plane, px []pix) *ampArea {
	a := &ampArea{p: p, px: px}
	if len(px) == 0 {
		return a
	}
	x0, y0, x1, y1 := px[0].x, px[0].y, px[0].x, px[0].y
	for _, q := range px {
		x0, x1 = min(x0, q.x), max(x1, q.x)
		y0, y1 = min(y0, q.y), max(y1, q.y)
	}
	a.x0, a.y0 = x0, y0
	nx, ny := x1-x0+1, y1-y0+1
	buf := make([]float64, 2*nx+2*ny)
	a.cx, a.sx, a.cy, a.sy = buf[:nx], buf[nx:2*nx], buf[2*nx:2*nx+ny], buf[2*nx+ny:]
	return a
}

// refineFreq maximises the fitted amplitude over the frequency and the
// direction in turn (golden-section search, three rounds), within half a
// cycle across the area of the start.
func refineFreq(p *plane.Plane, px []pix, fx, fy float64) (float64, float64) {
	f := math.Hypot(fx, fy)
	th := math.Atan2(fy, fx)
	// extents along and across the modulation direction
	c, s := math.Cos(th), math.Sin(th)
	lo, hi := [2]float64{math.Inf(1), math.Inf(1)}, [2]float64{math.Inf(-1), math.Inf(-1)}
	for _, q := range px {
		x, y := float64(q.x)+0.5, float64(q.y)+0.5
		u, v := x*c+y*s, -x*s+y*c
		lo[0], hi[0] = math.Min(lo[0], u), math.Max(hi[0], u)
		lo[1], hi[1] = math.Min(lo[1], v), math.Max(hi[1], v)
	}
	lu, lv := math.Max(hi[0]-lo[0], 1), math.Max(hi[1]-lo[1], 1)
	df, dth := 0.5/lu, 0.5/(f*lv)
	area := newAmpArea(p, px)
	amp := func(f, th float64) float64 {
		return area.amplitude(f*math.Cos(th), f*math.Sin(th))
	}
	for range 3 {
		f = golden(func(x float64) float64 { return amp(x, th) }, f-df, f+df)
		th = golden(func(x float64) float64 { return amp(f, x) }, th-dth, th+dth)
		df, dth = df/3, dth/3
	}
	return f * math.Cos(th), f * math.Sin(th)
}

// golden returns the maximiser of g on [a, b] by golden-section search
// (about 1e-3 of the interval).
func golden(g func(float64) float64, a, b float64) float64 {
	const r = 0.6180339887498949 // (sqrt(5) - 1) / 2
	x1, x2 := b-r*(b-a), a+r*(b-a)
	g1, g2 := g(x1), g(x2)
	for range 14 {
		if g1 < g2 {
			a, x1, g1 = x1, x2, g2
			x2 = a + r*(b-a)
			g2 = g(x2)
		} else {
			b, x2, g2 = x2, x1, g1
			x1 = b - r*(b-a)
			g1 = g(x1)
		}
	}
	if g1 > g2 {
		return x1
	}
	return x2
}

// interior returns the pixels of px inside the pattern itself, clear of
// its blurred border, and the corners of that rectangle. The grating is
// taken to be a rectangle with sides along and across its direction of
// modulation, in the frame u = x cos t + y sin t (along the modulation),
// v = -x sin t + y cos t (along the lines):
//
//   - across the lines (v): in strips 1 px wide the sinusoid is fitted over
//     all u; its amplitude is a plateau inside the pattern and falls to 0
//     outside. The edges are the half-plateau crossings v0, v1, and the
//     margin is twice the distance from there to the 90 % point (the blur's
//     reach) plus 2 px.
//   - along the modulation (u): the mean profile m(u) over the interior
//     strips is fitted with the sinusoid over its middle 40 %; going
//     outward, the pattern ends where |m(u) - fit(u)| (3-bin mean) exceeds
//     the larger of 4 times its noise in the middle and 5 % of the
//     amplitude; 3 px more are dropped for the blur beyond that point.
func interior(p *plane.Plane, px []pix, fx, fy float64) ([]pix, [4][2]float64, bool) {
	var corners [4][2]float64
	f := math.Hypot(fx, fy)
	c, s := fx/f, fy/f
	uv := func(q pix) (float64, float64) {
		x, y := float64(q.x)+0.5, float64(q.y)+0.5
		return x*c + y*s, -x*s + y*c
	}
	umin, vmin := math.Inf(1), math.Inf(1)
	umax, vmax := math.Inf(-1), math.Inf(-1)
	for _, q := range px {
		u, v := uv(q)
		umin, umax = math.Min(umin, u), math.Max(umax, u)
		vmin, vmax = math.Min(vmin, v), math.Max(vmax, v)
	}
	nv, nu := int(vmax-vmin)+1, int(umax-umin)+1
	if nv < 8 || nu < 8 {
		return nil, corners, false
	}
	// Across the lines: amplitude per v strip.
	strips := make([]harmonic, nv)
	for _, q := range px {
		u, v := uv(q)
		sn, cs := math.Sincos(2 * math.Pi * f * u)
		strips[int(v-vmin)].add(cs, sn, float64(p.Pix[q.y*p.W+q.x]))
	}
	amp := make([]float64, nv)
	var ok []float64
	for k := range strips {
		if ft := strips[k].solve(); ft.ok && ft.n >= 2/f {
			amp[k] = math.Hypot(ft.b, ft.c)
			ok = append(ok, amp[k])
		}
	}
	if len(ok) < 8 {
		return nil, corners, false
	}
	median(ok)
	plateau := median(ok[len(ok)/2:])
	k0, k1 := longestRun(amp, 0.5*plateau)
	if k1-k0 < 6 {
		return nil, corners, false
	}
	v0, v1 := vmin+crossing(amp, k0, -1, 0.5*plateau), vmin+crossing(amp, k1, +1, 0.5*plateau)
	// blur reach: from the half-plateau crossing to the 90 % point
	reach := 0.0
	for _, e := range [2]struct{ k, dir int }{{k0, +1}, {k1, -1}} {
		k := e.k
		for k > k0-1 && k < k1+1 && amp[k] < 0.9*plateau {
			k += e.dir
		}
		reach = math.Max(reach, math.Abs(float64(k-e.k)))
	}
	mv := 2*reach + 2
	if v1-v0-2*mv < 4 {
		return nil, corners, false
	}
	// Along the modulation: mean profile over the interior strips.
	sum := make([]float64, nu)
	cnt := make([]float64, nu)
	for _, q := range px {
		u, v := uv(q)
		if v < v0+mv || v > v1-mv {
			continue
		}
		k := int(u - umin)
		sum[k] += float64(p.Pix[q.y*p.W+q.x])
		cnt[k]++
	}
	prof := make([]float64, nu)
	for k := range prof {
		prof[k] = math.NaN()
		if cnt[k] > 0 {
			prof[k] = sum[k] / cnt[k]
		}
	}
	a, b := int(0.3*float64(nu)), int(0.7*float64(nu))
	var u0, u1 float64
	fu := f // frequency along u, refined on the profile's middle
	fitProfile := func(f float64, a, b int) fit {
		var h harmonic
		for k := a; k <= b; k++ {
			if !math.IsNaN(prof[k]) {
				uc := umin + float64(k) + 0.5
				sn, cs := math.Sincos(2 * math.Pi * f * uc)
				h.add(cs, sn, prof[k])
			}
		}
		return h.solve()
	}
	for range 2 {
		span := float64(b - a + 1)
		fu = golden(func(x float64) float64 {
			ft := fitProfile(x, a, b)
			return math.Hypot(ft.b, ft.c)
		}, fu-0.75/span, fu+0.75/span)
		ft := fitProfile(fu, a, b)
		if !ft.ok {
			return nil, corners, false
		}
		f := fu
		res := make([]float64, nu)
		for k := range res {
			uc := umin + float64(k) + 0.5
			sn, cs := math.Sincos(2 * math.Pi * f * uc)
			res[k] = math.NaN()
			if !math.IsNaN(prof[k]) {
				res[k] = math.Abs(prof[k] - (ft.a + ft.b*cs + ft.c*sn))
			}
		}
		var mid []float64
		for k := a; k <= b; k++ {
			if !math.IsNaN(res[k]) {
				mid = append(mid, res[k])
			}
		}
		tau := math.Max(4*1.4826*median(mid), 0.05*math.Hypot(ft.b, ft.c))
		bad := func(k int) bool {
			var s, n float64
			for d := -1; d <= 1; d++ {
				if k+d >= 0 && k+d < nu && !math.IsNaN(res[k+d]) {
					s += res[k+d]
					n++
				}
			}
			return n == 0 || s/n > tau
		}
		mid0 := (a + b) / 2
		lo, hi := mid0, mid0
		for lo > 0 && !bad(lo-1) {
			lo--
		}
		for hi < nu-1 && !bad(hi+1) {
			hi++
		}
		a, b = lo+3, hi-3
		u0, u1 = umin+float64(lo)+3, umin+float64(hi)+1-3
		if b-a < 8 {
			return nil, corners, false
		}
	}
	if u1-u0 < 4 {
		return nil, corners, false
	}
	var in []pix
	for _, q := range px {
		u, v := uv(q)
		if u >= u0 && u <= u1 && v >= v0+mv && v <= v1-mv {
			in = append(in, q)
		}
	}
	for i, q := range [4][2]float64{{u0, v0 + mv}, {u1, v0 + mv}, {u1, v1 - mv}, {u0, v1 - mv}} {
		corners[i] = [2]float64{q[0]*c - q[1]*s, q[0]*s + q[1]*c}
	}
	return in, corners, len(in) >= 64
}

// longestRun returns the first and last index of the longest run of
// values >= level.
func longestRun(v []float64, level float64) (int, int) {
	bestLen, b0, b1 := 0, 0, -1
	start := -1
	for k := 0; k <= len(v); k++ {
		if k < len(v) && v[k] >= level {
			if start < 0 {
				start = k
			}
			continue
		}
		if start >= 0 && k-start > bestLen {
			bestLen, b0, b1 = k-start, start, k-1
		}
		start = -1
	}
	return b0, b1
}

// crossing returns the position (in bins, bin k centred at k + 0.5) where
// v falls through level beyond index k in direction dir (linear
// interpolation), or the outer edge of bin k when the run ends at the data.
func crossing(v []float64, k, dir int, level float64) float64 {
	n := k + dir
	if n < 0 || n >= len(v) {
		return float64(k) + 0.5 + 0.5*float64(dir)
	}
	t := (v[k] - level) / (v[k] - v[n])
	return float64(k) + 0.5 + t*float64(dir)
}

// shrinkArea returns the pixels of the convex quadrilateral q (in order)
// farther than m px inside each of its sides.
func shrinkArea(p *plane.Plane, q [4][2]float64, m float64) []pix {
	px := areaPixels(p, q)
	// orientation of the quadrilateral
	area := 0.0
	for i := range 4 {
		a, b := q[i], q[(i+1)%4]
		area += a[0]*b[1] - a[1]*b[0]
	}
	out := px[:0]
	for _, c := range px {
		x, y := float64(c.x)+0.5, float64(c.y)+0.5
		keep := true
		for i := range 4 {
			a, b := q[i], q[(i+1)%4]
			l := math.Hypot(b[0]-a[0], b[1]-a[1])
			d := ((b[0]-a[0])*(y-a[1]) - (b[1]-a[1])*(x-a[0])) / l
			if area < 0 {
				d = -d
			}
			if d < m {
				keep = false
				break
			}
		}
		if keep {
			out = append(out, c)
		}
	}
	return out
}
