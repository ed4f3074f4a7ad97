package decode

import (
	"errors"
	"math"
	"sort"
	"sync"

	"sagitta/core/internal/parallel"
	"sagitta/core/plane"
)

// Fitted is a tone curve fitted to measured points: a monotone map from a
// decoded value X (linear under the tone the photo was decoded with) to
// linear light Y. Between the points it is the monotone piecewise cubic
// Hermite interpolant of F. N. Fritsch and R. E. Carlson, "Monotone
// piecewise cubic interpolation", SIAM J. Numer. Anal. 17 (1980) 238-246
// (three-point slopes, limited so that alpha^2 + beta^2 <= 9 on every
// interval); beyond the last point it continues along the last interval's
// straight line. Points whose Y do not rise with X are first pooled into
// their means (pool-adjacent-violators: R. E. Barlow et al., Statistical
// Inference under Order Restrictions, Wiley (1972), ch. 1), the
// least-squares monotone fit.
type Fitted struct {
	X, Y, slope []float64
}

// ErrFewPoints is returned by Fit with fewer than 3 distinct points.
var ErrFewPoints = errors.New("decode: a tone curve needs at least 3 distinct points")

// Fit returns the monotone curve through the points (x[i], y[i]).
func Fit(x, y []float64) (*Fitted, error) {
	type pt struct{ x, y, w float64 }
	pts := make([]pt, 0, len(x))
	for i := range x {
		if !math.IsNaN(x[i]) && !math.IsNaN(y[i]) {
			pts = append(pts, pt{x[i], y[i], 1})
		}
	}
	sort.Slice(pts, func(a, b int) bool { return pts[a].y < pts[b].y })
	// Pool adjacent violators: X must rise with Y (both orders agree).
	var st []pt
	for _, p := range pts {
		st = append(st, p)
		for len(st) > 1 && st[len(st)-1].x <= st[len(st)-2].x {
			a, b := st[len(st)-2], st[len(st)-1]
			w := a.w + b.w
			st = st[:len(st)-2]
			st = append(st, pt{(a.x*a.w + b.x*b.w) / w, (a.y*a.w + b.y*b.w) / w, w})
		}
	}
	if len(st) < 3 {
		return nil, ErrFewPoints
	}
	f := &Fitted{}
	for _, p := range st {
		f.X = append(f.X, p.x)
		f.Y = append(f.Y, p.y)
	}
	n := len(f.X)
	d := make([]float64, n-1) // secant slopes
	for i := range d {
		d[i] = (f.Y[i+1] - f.Y[i]) / (f.X[i+1] - f.X[i])
	}
	m := make([]float64, n)
	m[0], m[n-1] = d[0], d[n-2]
	for i := 1; i < n-1; i++ {
		if d[i-1]*d[i] <= 0 {
			m[i] = 0
		} else {
			m[i] = (d[i-1] + d[i]) / 2
		}
	}
	for i := range d {
		if d[i] == 0 {
			m[i], m[i+1] = 0, 0
			continue
		}
		a, b := m[i]/d[i], m[i+1]/d[i]
		if s := a*a + b*b; s > 9 {
			t := 3 / math.Sqrt(s)
			m[i], m[i+1] = t*a*d[i], t*b*d[i]
		}
	}
	f.slope = m
	return f, nil
}

// At returns the curve's value at x.
func (f *Fitted) At(x float64) float64 {
	n := len(f.X)
	switch {
	case x <= f.X[0]:
		return f.Y[0] + (x-f.X[0])*(f.Y[1]-f.Y[0])/(f.X[1]-f.X[0])
	case x >= f.X[n-1]:
		return f.Y[n-1] + (x-f.X[n-1])*(f.Y[n-1]-f.Y[n-2])/(f.X[n-1]-f.X[n-2])
	}
	i := sort.SearchFloat64s(f.X, x) - 1
	h := f.X[i+1] - f.X[i]
	t := (x - f.X[i]) / h
	t2, t3 := t*t, t*t*t
	return (2*t3-3*t2+1)*f.Y[i] + (t3-2*t2+t)*h*f.slope[i] + (-2*t3+3*t2)*f.Y[i+1] + (t3-t2)*h*f.slope[i+1]
}

// Apply maps every value of p through the curve times scale, by a table
// of 4097 values over [0, max(p)] with linear interpolation between them.
// Clipping stays visible as such: a value at or above plane.ClipLevel (the
// top of the file's values) is kept, and no other value is mapped onto or
// above it.
func (f *Fitted) Apply(p *plane.Plane, scale float64) {
	// Both passes run over row ranges in parallel (parallel.Rows); the
	// largest value does not depend on the order it is found in. Plain
	// comparisons rather than the min and max builtins: the same values for
	// pixels (never NaN), and WebAssembly makes each builtin a call, which
	// was a third of this pass's time in the page.
	var mu sync.Mutex
	var hi float32
	parallel.Rows(p.H, p.W, func(y0, y1 int) {
		var h float32
		for _, v := range p.Pix[y0*p.W : y1*p.W] {
			if v > h {
				h = v
			}
		}
		mu.Lock()
		hi = max(hi, h)
		mu.Unlock()
	})
	if !(hi > 0) {
		return
	}
	const n = 4096
	lut := make([]float32, n+2)
	for i := range n + 2 {
		lut[i] = float32(scale * f.At(float64(i)*float64(hi)/n))
	}
	k := float32(n) / hi
	const top = float32(plane.ClipLevel - 1e-4)
	parallel.Rows(p.H, p.W, func(y0, y1 int) {
		pix := p.Pix[y0*p.W : y1*p.W]
		for i, v := range pix {
			if v >= plane.ClipLevel {
				continue
			}
			if v < 0 {
				v = 0
			}
			t := v * k
			j := int(t)
			if j > n {
				j = n
			}
			fr := t - float32(j)
			out := lut[j] + fr*(lut[j+1]-lut[j])
			if out > top {
				out = top
			}
			pix[i] = out
		}
	})
}
