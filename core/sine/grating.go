package sine

import (
	"fmt"
	"math"

	"sagitta/core/plane"
)

// GratingGuess is the approximate place of a sine grating: an area that
// holds it (the pattern may be smaller; its own extent is found), and
// optionally its frequency and direction (from a chart layout).
type GratingGuess struct {
	Corners      [4][2]float64 // convex area to search, px, in order
	FreqCyPx     float64       // approximate frequency, cy/px; 0 = estimate from the spectrum
	DirectionDeg float64       // approximate direction of modulation, degrees (used when FreqCyPx > 0)
	// Exact says Corners are the pattern's own outline (from a chart
	// layout): the fit then uses the area shrunk by marginPx instead of
	// finding the pattern's extent.
	Exact bool
}

// GratingOptions tunes MeasureGrating. The zero value refines a given
// frequency and direction.
type GratingOptions struct {
	// FixedFreq keeps GratingGuess.FreqCyPx and DirectionDeg as they are
	// (a frequency known exactly, e.g. from a calibrated chart layout).
	FixedFreq bool
}

// Grating is a measured sine grating.
type Grating struct {
	X, Y         float64 // middle of the measured area, px
	AreaPx       int     // pixels fitted
	FreqCyPx     float64 // frequency along DirectionDeg, cy/px
	DirectionDeg float64 // direction in which the level varies, degrees in [0, 180)
	Cycles       float64 // cycles across the measured area along DirectionDeg
	Mean         float64 // linear level at the middle
	Amplitude    float64 // noise-corrected amplitude, linear
	Modulation   float64 // Amplitude / Mean
	ModStdErr    float64 // standard error of Modulation
	Flags        []Flag
	// Corners is the rectangle whose pixels were fitted: the pattern's
	// interior, clear of its blurred border, px.
	Corners [4][2]float64
}

// Thresholds of the grating measurement.
const (
	minGratingCycles = 4    // fewer cycles across the fitted area get FlagFewCycles
	marginPx         = 4    // an exact outline is shrunk by this much for the blur, px
	minExplained     = 0.5  // share of the area's variance the sinusoid must explain
	maxSpecSide      = 256  // largest window side for the spectrum, px
	maxGratingPixels = 4e6  // largest area accepted, px
	maxModStdErr     = 0.03 // relative standard error of the modulation beyond which a grating is noisy
)

// MeasureGrating measures the sine grating in the area g of the linear
// plane p. The fit is a + b cos(w) + c sin(w) + a_x x + a_y y over the
// interior pixels, w = 2 pi f (x cos t + y sin t), the plane terms taking up
// uneven light; Modulation = sqrt(b^2 + c^2 - var b - var c) / a at the
// area's middle.
func MeasureGrating(p *plane.Plane, g GratingGuess, opt GratingOptions) (*Grating, error) {
	px := areaPixels(p, g.Corners)
	if len(px) < 64 {
		return nil, ArgumentError(fmt.Sprintf("grating area holds %d pixels, too few", len(px)))
	}
	if len(px) > maxGratingPixels {
		return nil, ArgumentError(fmt.Sprintf("grating area of %d pixels is too large", len(px)))
	}
	var fx, fy float64
	if g.FreqCyPx > 0 && g.FreqCyPx < 1 && !math.IsNaN(g.DirectionDeg) && !math.IsInf(g.DirectionDeg, 0) {
		s, c := math.Sincos(g.DirectionDeg * math.Pi / 180)
		fx, fy = g.FreqCyPx*c, g.FreqCyPx*s
	} else if opt.FixedFreq {
		return nil, ArgumentError("FixedFreq needs a frequency in (0, 1) and a direction")
	} else {
		var ok bool
		fx, fy, ok = spectrumPeak(p, px)
		if !ok {
			return nil, ErrNoGrating
		}
	}
	if !opt.FixedFreq {
		fx, fy = refineFreq(p, px, fx, fy)
	}
	in, corners := px, g.Corners
	if g.Exact {
		in = shrinkArea(p, g.Corners, marginPx)
	} else {
		// Two passes: the second with the frequency refined on the
		// first pass's interior, free of the background around it.
		for pass := range 2 {
			var ok bool
			in, corners, ok = interior(p, px, fx, fy)
			if !ok {
				return nil, ErrNoGrating
			}
			if pass == 0 && !opt.FixedFreq {
				fx, fy = refineFreq(p, in, fx, fy)
			}
		}
	}
	if len(in) < 64 {
		return nil, ErrNoGrating
	}
	if !opt.FixedFreq {
		fx, fy = refineFreq(p, in, fx, fy)
	}
	gr, explained := fitGrating(p, in, fx, fy)
	if !(gr.Mean > 0) || explained < minExplained {
		return nil, ErrNoGrating
	}
	gr.Corners = corners
	gr.Flags = []Flag{}
	add := func(c bool, fl Flag) {
		if c {
			gr.Flags = append(gr.Flags, fl)
		}
	}
	var clipped int
	for _, q := range in {
		v := p.Pix[q.y*p.W+q.x]
		if v >= plane.ClipLevel || v <= darkLimit {
			clipped++
		}
	}
	add(float64(clipped) > clipShare*float64(len(in)), FlagClipped)
	add(gr.Cycles < minGratingCycles, FlagFewCycles)
	add(gr.FreqCyPx > 0.5, FlagAliased)
	add(gr.ModStdErr > maxModStdErr*gr.Modulation, FlagNoisy)
	return gr, nil
}

// fitGrating fits a + b cos w + c sin w + a_x (x - xm) + a_y (y - ym) over
// px and returns the grating and the share of the variance explained.
func fitGrating(p *plane.Plane, px []pix, fx, fy float64) (*Grating, float64) {
	var xm, ym float64
	for _, q := range px {
		xm += float64(q.x) + 0.5
		ym += float64(q.y) + 0.5
	}
	n := float64(len(px))
	xm, ym = xm/n, ym/n
	var ne normalEq5
	var sv, svv float64
	lo, hi := math.Inf(1), math.Inf(-1)
	f := math.Hypot(fx, fy)
	for _, q := range px {
		x, y := float64(q.x)+0.5, float64(q.y)+0.5
		s, c := math.Sincos(2 * math.Pi * (fx*x + fy*y))
		v := float64(p.Pix[q.y*p.W+q.x])
		ne.add([5]float64{1, c, s, x - xm, y - ym}, v)
		sv += v
		svv += v * v
		u := (fx*x + fy*y) / f
		lo, hi = math.Min(lo, u), math.Max(hi, u)
	}
	beta, cov, rss, ok := ne.solve()
	if !ok {
		return &Grating{}, 0
	}
	g := &Grating{X: xm, Y: ym, AreaPx: len(px), FreqCyPx: f,
		DirectionDeg: math.Mod(math.Atan2(fy, fx)*180/math.Pi+360, 180),
		Cycles:       f * (hi - lo), Mean: beta[0]}
	a2 := beta[1]*beta[1] + beta[2]*beta[2] - cov[1] - cov[2]
	g.Amplitude = math.Sqrt(math.Max(a2, 0))
	if g.Mean > 0 {
		g.Modulation = g.Amplitude / g.Mean
		g.ModStdErr = math.Sqrt(0.5*(cov[1]+cov[2])) / g.Mean
	}
	tss := svv - sv*sv/n
	explained := 0.0
	if tss > 0 {
		explained = 1 - rss/tss
	}
	return g, explained
}

// normalEq5 accumulates the normal equations of a five-term linear fit.
type normalEq5 struct {
	a  [5][5]float64
	b  [5]float64
	vv float64
	n  float64
}

func (e *normalEq5) add(x [5]float64, v float64) {
	for i := range 5 {
		for j := i; j < 5; j++ {
			e.a[i][j] += x[i] * x[j]
		}
		e.b[i] += x[i] * v
	}
	e.vv += v * v
	e.n++
}

// solve returns the coefficients, the variances of each (from the residual
// noise) and the residual sum of squares, by Cholesky decomposition.
func (e *normalEq5) solve() (beta, variance [5]float64, rss float64, ok bool) {
	var l [5][5]float64
	for i := range 5 {
		for j := 0; j <= i; j++ {
			s := e.a[j][i]
			for k := 0; k < j; k++ {
				s -= l[i][k] * l[j][k]
			}
			if i == j {
				if !(s > 1e-12*e.a[i][i]) {
					return beta, variance, 0, false
				}
				l[i][i] = math.Sqrt(s)
			} else {
				l[i][j] = s / l[j][j]
			}
		}
	}
	// inverse of L, then (X'X)^-1 = L^-T L^-1
	var li [5][5]float64
	for i := range 5 {
		li[i][i] = 1 / l[i][i]
		for j := 0; j < i; j++ {
			s := 0.0
			for k := j; k < i; k++ {
				s -= l[i][k] * li[k][j]
			}
			li[i][j] = s / l[i][i]
		}
	}
	var inv [5][5]float64
	for i := range 5 {
		for j := range 5 {
			s := 0.0
			for k := max(i, j); k < 5; k++ {
				s += li[k][i] * li[k][j]
			}
			inv[i][j] = s
		}
	}
	for i := range 5 {
		for j := range 5 {
			beta[i] += inv[i][j] * e.b[j]
		}
	}
	rss = e.vv
	for i := range 5 {
		rss -= beta[i] * e.b[i]
	}
	s2 := math.Max(rss, 0) / math.Max(e.n-5, 1)
	for i := range 5 {
		variance[i] = s2 * inv[i][i]
	}
	return beta, variance, math.Max(rss, 0), true
}
