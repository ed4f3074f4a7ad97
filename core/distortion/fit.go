// Package distortion measures a lens's radial distortion from a photo of a
// flat chart whose targets' designed positions are known: it fits the
// chart's homography (its position and perspective) jointly with a radial
// model about the optical centre,
//
//	p = c + (q - c) (1 + K1 s^2 + K2 s^4),  q = H(X, Y),  s = |q - c| / R,
//
// (X, Y) a target's designed position in chart units, q where an ideal lens
// would image it, p where it was found, c the optical centre, R the frame's
// half-diagonal: the radial terms of D. C. Brown's model ("Decentering
// distortion of lenses", Photogrammetric Engineering 32 (1966) 444-462),
// in the normalisation of Z. Zhang's flat-target calibration ("A flexible
// new technique for camera calibration", IEEE Trans. PAMI 22 (2000)
// 1330-1334, section 3.3), who also fits the homography and the radial
// terms jointly by Levenberg-Marquardt. One photo of a flat chart fixes the
// distortion's shape; the focal length is not needed because the
// homography absorbs it.
//
// The radial displacement relative to the ideal image height is
// D(s) = 100 (K1 s^2 + K2 s^4) % (negative: barrel, positive: pincushion).
package distortion

import (
	"errors"
	"math"
	"slices"
)

// Point is one chart target located in the photo.
type Point struct {
	Kind           string  // "square", "mark" or "star"
	ID             string  // the target's id on the chart
	XPx, YPx       float64 // where it was found, image px
	ChartX, ChartY float64 // where it is on the chart, chart units
}

// Frame is the photo's geometry: its size and optical centre, px.
type Frame struct {
	W, H             int
	CentreX, CentreY float64
}

// HalfDiagPx returns the frame's half-diagonal, the unit of s.
func (f Frame) HalfDiagPx() float64 { return math.Hypot(float64(f.W), float64(f.H)) / 2 }

// CornerS returns the farthest corner's distance from the centre in
// half-diagonals (1 when the centre is the frame's).
func (f Frame) CornerS() float64 {
	w, h := float64(f.W), float64(f.H)
	dx := math.Max(f.CentreX, w-f.CentreX)
	dy := math.Max(f.CentreY, h-f.CentreY)
	return math.Hypot(dx, dy) / f.HalfDiagPx()
}

// LongEdgeS returns the distance from the centre to the farther end of the
// frame's long axis (the middle of a short side), in half-diagonals.
func (f Frame) LongEdgeS() float64 {
	w, h := float64(f.W), float64(f.H)
	if w >= h {
		return math.Max(f.CentreX, w-f.CentreX) / f.HalfDiagPx()
	}
	return math.Max(f.CentreY, h-f.CentreY) / f.HalfDiagPx()
}

// Fit is a fitted distortion.
type Fit struct {
	K1, K2 float64
	// H maps chart units to ideal image px (where a lens free of
	// distortion would put them), row-major, H[8] = 1.
	H [9]float64
	// ResidualsPx holds each point's distance from the model, px, and Used
	// whether the point was kept (points more than OutlierFactor robust
	// standard deviations off are dropped and the model refitted).
	ResidualsPx []float64
	Used        []bool
	// RMSPx is the root mean square residual of the points used, px, and N
	// their number.
	RMSPx float64
	N     int
	// WithK2 says whether K2 was fitted (else it is 0).
	WithK2 bool
	// Runs is the number of straight runs behind a FitLines.
	Runs int
	// ReachS is the largest distance of a point used from the optical
	// centre, half-diagonals.
	ReachS float64
}

// Fitting limits.
const (
	// MinPoints located targets are needed to fit the homography and K1;
	// MinPointsK2 (reaching MinReachK2 of the half-diagonal) to fit K2 too.
	MinPoints   = 10
	MinPointsK2 = 16
	MinReachK2  = 0.6
	// OutlierFactor times the robust standard deviation (1.4826 times the
	// median absolute residual, common practice), and at least
	// minOutlierPx, marks an outlier.
	OutlierFactor = 4
	minOutlierPx  = 0.5
)

// ErrFewPoints is returned when too few points are given.
var ErrFewPoints = errors.New("distortion: too few located targets to fit")

// FitChart fits the homography and K1 (and K2 when the points allow) to
// pts, starting from h0, a homography from chart units to image px (the
// chart's pose, fitted without distortion). It drops outliers once and
// refits.
func FitChart(pts []Point, h0 [9]float64, fr Frame) (*Fit, error) {
	if len(pts) < MinPoints {
		return nil, ErrFewPoints
	}
	R := fr.HalfDiagPx()
	// Normalised image coordinates: (p - c) / R.
	s := [9]float64{1 / R, 0, -fr.CentreX / R, 0, 1 / R, -fr.CentreY / R, 0, 0, 1}
	hn := mul(s, h0)
	if hn[8] == 0 || math.IsNaN(hn[8]) {
		return nil, errors.New("distortion: the chart's pose is degenerate")
	}
	var th [10]float64
	for i := range 8 {
		th[i] = hn[i] / hn[8]
	}
	used := make([]bool, len(pts))
	for i := range used {
		used[i] = true
	}
	reach := 0.0
	for _, p := range pts {
		reach = math.Max(reach, math.Hypot(p.XPx-fr.CentreX, p.YPx-fr.CentreY)/R)
	}
	withK2 := len(pts) >= MinPointsK2 && reach >= MinReachK2
	f := &Fit{WithK2: withK2}
	for round := range 2 {
		th = levenberg(th, pts, used, fr, withK2)
		res := residuals(th, pts, fr)
		f.ResidualsPx = res
		if round == 1 {
			break
		}
		cut := math.Max(OutlierFactor*1.4826*median(res), minOutlierPx)
		n := 0
		for i, r := range res {
			used[i] = r <= cut
			if used[i] {
				n++
			}
		}
		if n < MinPoints {
			return nil, ErrFewPoints
		}
	}
	f.Used = used
	var ss float64
	for i, r := range f.ResidualsPx {
		if used[i] {
			ss += r * r
			f.N++
		}
	}
	f.RMSPx = math.Sqrt(ss / float64(f.N))
	for i, p := range pts {
		if used[i] {
			f.ReachS = math.Max(f.ReachS, math.Hypot(p.XPx-fr.CentreX, p.YPx-fr.CentreY)/R)
		}
	}
	f.K1, f.K2 = th[8], th[9]
	inv := [9]float64{R, 0, fr.CentreX, 0, R, fr.CentreY, 0, 0, 1}
	hn = mul(inv, [9]float64{th[0], th[1], th[2], th[3], th[4], th[5], th[6], th[7], 1})
	for i := range hn {
		f.H[i] = hn[i] / hn[8]
	}
	return f, nil
}

// DisplacementPct returns the radial displacement at ideal height s
// (half-diagonals), per cent of the ideal height.
func (f *Fit) DisplacementPct(s float64) float64 {
	return 100 * (f.K1*s*s + f.K2*s*s*s*s)
}

// ideal returns where th's homography puts chart point (x, y), normalised.
func ideal(th [10]float64, x, y float64) (float64, float64) {
	w := th[6]*x + th[7]*y + 1
	return (th[0]*x + th[1]*y + th[2]) / w, (th[3]*x + th[4]*y + th[5]) / w
}

// predict returns where th's model puts chart point (x, y), normalised.
func predict(th [10]float64, x, y float64) (float64, float64) {
	qx, qy := ideal(th, x, y)
	s2 := qx*qx + qy*qy
	m := 1 + th[8]*s2 + th[9]*s2*s2
	return qx * m, qy * m
}

// residuals returns each point's distance from th's model, px.
func residuals(th [10]float64, pts []Point, fr Frame) []float64 {
	R := fr.HalfDiagPx()
	out := make([]float64, len(pts))
	for i, p := range pts {
		px, py := predict(th, p.ChartX, p.ChartY)
		out[i] = R * math.Hypot(px-(p.XPx-fr.CentreX)/R, py-(p.YPx-fr.CentreY)/R)
	}
	return out
}

// levenberg minimises the squared residuals of the used points over th
// (K2 held at 0 unless withK2) by the Levenberg-Marquardt method with
// Marquardt's diagonal scaling (W. H. Press et al., Numerical Recipes,
// 3rd ed. (2007), section 15.5.2), derivatives by central differences.
func levenberg(th [10]float64, pts []Point, used []bool, fr Frame, withK2 bool) [10]float64 {
	np := 10
	if !withK2 {
		np = 9
		th[9] = 0
	}
	R := fr.HalfDiagPx()
	resid := func(t [10]float64, dst []float64) float64 {
		var ss float64
		k := 0
		for i, p := range pts {
			if !used[i] {
				continue
			}
			px, py := predict(t, p.ChartX, p.ChartY)
			dst[k] = px - (p.XPx-fr.CentreX)/R
			dst[k+1] = py - (p.YPx-fr.CentreY)/R
			ss += dst[k]*dst[k] + dst[k+1]*dst[k+1]
			k += 2
		}
		return ss
	}
	m := 0
	for _, u := range used {
		if u {
			m += 2
		}
	}
	r := make([]float64, m)
	rp := make([]float64, m)
	rm := make([]float64, m)
	jac := make([][]float64, np)
	for i := range jac {
		jac[i] = make([]float64, m)
	}
	cost := resid(th, r)
	lambda := 1e-3
	for iter := 0; iter < 100; iter++ {
		for j := range np {
			h := 1e-6 * math.Max(1, math.Abs(th[j]))
			tp, tm := th, th
			tp[j] += h
			tm[j] -= h
			resid(tp, rp)
			resid(tm, rm)
			for k := range m {
				jac[j][k] = (rp[k] - rm[k]) / (2 * h)
			}
		}
		var a [10][10]float64
		var g [10]float64
		for i := range np {
			for j := 0; j <= i; j++ {
				var s float64
				for k := range m {
					s += jac[i][k] * jac[j][k]
				}
				a[i][j], a[j][i] = s, s
			}
			for k := range m {
				g[i] -= jac[i][k] * r[k]
			}
		}
		improved := false
		for try := 0; try < 10; try++ {
			var b [10][10]float64
			for i := range np {
				b[i] = a[i]
				b[i][i] *= 1 + lambda
			}
			step, ok := solve(b, g, np)
			if !ok {
				lambda *= 10
				continue
			}
			t := th
			for j := range np {
				t[j] += step[j]
			}
			if c := resid(t, rp); c < cost {
				small := cost-c < 1e-12*cost
				th, cost = t, c
				copy(r, rp)
				lambda = math.Max(lambda/10, 1e-12)
				improved = true
				if small {
					return th
				}
				break
			}
			lambda *= 10
		}
		if !improved {
			break
		}
	}
	return th
}

// solve solves the n x n system a x = b by Gaussian elimination with
// partial pivoting; ok is false for a singular system.
func solve(a [10][10]float64, b [10]float64, n int) ([10]float64, bool) {
	for c := range n {
		p := c
		for r := c + 1; r < n; r++ {
			if math.Abs(a[r][c]) > math.Abs(a[p][c]) {
				p = r
			}
		}
		if a[p][c] == 0 || math.IsNaN(a[p][c]) {
			return b, false
		}
		a[c], a[p] = a[p], a[c]
		b[c], b[p] = b[p], b[c]
		for r := c + 1; r < n; r++ {
			f := a[r][c] / a[c][c]
			for k := c; k < n; k++ {
				a[r][k] -= f * a[c][k]
			}
			b[r] -= f * b[c]
		}
	}
	var x [10]float64
	for r := n - 1; r >= 0; r-- {
		s := b[r]
		for k := r + 1; k < n; k++ {
			s -= a[r][k] * x[k]
		}
		x[r] = s / a[r][r]
	}
	return x, true
}

func mul(a, b [9]float64) [9]float64 {
	var out [9]float64
	for i := range 3 {
		for j := range 3 {
			for k := range 3 {
				out[3*i+j] += a[3*i+k] * b[3*k+j]
			}
		}
	}
	return out
}

func median(v []float64) float64 {
	if len(v) == 0 {
		return 0
	}
	s := slices.Clone(v)
	slices.Sort(s)
	n := len(s)
	if n%2 == 1 {
		return s[n/2]
	}
	return (s[n/2-1] + s[n/2]) / 2
}
