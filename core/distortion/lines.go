package distortion

import (
	"errors"
	"math"
	"sort"
)

// Straight runs without a chart: the plumb-line method (D. C. Brown,
// "Close-range camera calibration", Photogrammetric Engineering 37 (1971)
// 855-866): edges that are straight in the scene (a door frame, a long
// ruler, a long strip of tape) stay straight only in a photo free of
// distortion, so K1 is the value that makes the measured pieces of each
// long edge line up best once the distortion is undone. Single pieces
// carry too little: a 120 px edge 2000 px from the centre of a 24 MP frame
// bows by k1 d L^2 / R^2 = 0.004 px under -0.8 % of barrel distortion at
// the corner; pieces spread over a run of 2000 px move off its chord by
// about 1 px.

// Run-finding and fitting limits.
const (
	// Pieces belong to one run when their normals agree within runAngleDeg
	// (modulo 180) and each lies within runOffPx of the other's line.
	runAngleDeg = 3.0
	runOffPx    = 3.0
	// MinRunPieces pieces spanning MinRunSpan of the half-diagonal make a
	// run; MinRuns runs are needed.
	MinRunPieces = 4
	MinRunSpan   = 0.4
	MinRuns      = 2
	// maxLineK1 bounds the search for K1.
	maxLineK1 = 0.25
)

// ErrFewRuns is returned when too few long straight runs are found.
var ErrFewRuns = errors.New("distortion: too few long straight edges")

// Runs groups measured edge pieces into long straight runs: pieces whose
// normals agree and that lie on each other's lines, joined transitively,
// kept when at least MinRunPieces span MinRunSpan of the half-diagonal.
// Each run lists indices into pieces.
func Runs(pieces []Line, fr Frame) [][]int {
	n := len(pieces)
	parent := make([]int, n)
	for i := range parent {
		parent[i] = i
	}
	var find func(int) int
	find = func(i int) int {
		for parent[i] != i {
			parent[i] = parent[parent[i]]
			i = parent[i]
		}
		return i
	}
	cosTol := math.Cos(runAngleDeg * math.Pi / 180)
	for i := range n {
		si, ci := math.Sincos(pieces[i].NormalDeg * math.Pi / 180)
		for j := i + 1; j < n; j++ {
			sj, cj := math.Sincos(pieces[j].NormalDeg * math.Pi / 180)
			if math.Abs(ci*cj+si*sj) < cosTol {
				continue
			}
			dx, dy := pieces[j].X-pieces[i].X, pieces[j].Y-pieces[i].Y
			if math.Abs(dx*ci+dy*si) > runOffPx || math.Abs(dx*cj+dy*sj) > runOffPx {
				continue
			}
			parent[find(i)] = find(j)
		}
	}
	groups := map[int][]int{}
	for i := range n {
		groups[find(i)] = append(groups[find(i)], i)
	}
	var out [][]int
	for _, g := range groups {
		if len(g) < MinRunPieces {
			continue
		}
		s, c := math.Sincos(pieces[g[0]].NormalDeg * math.Pi / 180)
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, k := range g {
			t := -pieces[k].X*s + pieces[k].Y*c // along the line
			lo, hi = math.Min(lo, t), math.Max(hi, t)
		}
		if hi-lo >= MinRunSpan*fr.HalfDiagPx() {
			out = append(out, g)
		}
	}
	sort.Slice(out, func(a, b int) bool { return out[a][0] < out[b][0] })
	return out
}

// FitLines fits K1 to the runs of pieces (Runs) by the plumb-line method:
// the K1 whose undistorted pieces lie closest to one straight line per run
// (least squares of their distances from each run's total-least-squares
// line), found by golden-section search over [-maxLineK1, maxLineK1]. The
// Fit has K1, RMSPx (the pieces' rms distance from their lines), N (the
// pieces used), Runs and ReachS; H is zero and there are no per-point
// residuals. Pieces farther from their run's line than OutlierFactor robust
// standard deviations are left out once and K1 fitted again.
func FitLines(pieces []Line, runs [][]int, fr Frame) (*Fit, error) {
	if len(runs) < MinRuns {
		return nil, ErrFewRuns
	}
	k1 := searchK1(pieces, runs, fr)
	// Once: leave out pieces off their run's line (a piece of another edge
	// that happened to line up), as FitChart does, and fit again.
	var res []float64
	for _, g := range runs {
		res = append(res, lineDistances(pieces, g, k1, fr)...)
	}
	cut := math.Max(OutlierFactor*1.4826*median(res), minLineOutlierPx)
	var kept [][]int
	for _, g := range runs {
		d := lineDistances(pieces, g, k1, fr)
		var k []int
		for i, p := range g {
			if d[i] <= cut {
				k = append(k, p)
			}
		}
		if len(k) >= MinRunPieces {
			kept = append(kept, k)
		}
	}
	if len(kept) < MinRuns {
		return nil, ErrFewRuns
	}
	k1 = searchK1(pieces, kept, fr)
	f := &Fit{K1: k1}
	R := fr.HalfDiagPx()
	var ss float64
	for _, g := range kept {
		f.N += len(g)
		ss += lineSS(pieces, g, k1, fr)
		for _, k := range g {
			f.ReachS = math.Max(f.ReachS, math.Hypot(pieces[k].X-fr.CentreX, pieces[k].Y-fr.CentreY)/R)
		}
	}
	f.RMSPx = math.Sqrt(ss / float64(f.N))
	f.Runs = len(kept)
	return f, nil
}

// minLineOutlierPx is the least distance from its run's line that marks a
// piece as an outlier.
const minLineOutlierPx = 0.3

// searchK1 returns the K1 that makes the runs straightest: golden-section
// search (Press et al., Numerical Recipes, 3rd ed., section 10.2) over
// [-maxLineK1, maxLineK1]; the cost is smooth and, over this range,
// unimodal for runs that are straight in the scene.
func searchK1(pieces []Line, runs [][]int, fr Frame) float64 {
	cost := func(k1 float64) float64 {
		var ss float64
		for _, g := range runs {
			ss += lineSS(pieces, g, k1, fr)
		}
		return ss
	}
	a, b := -maxLineK1, maxLineK1
	g := (math.Sqrt(5) - 1) / 2
	x1, x2 := b-g*(b-a), a+g*(b-a)
	f1, f2 := cost(x1), cost(x2)
	for b-a > 1e-7 {
		if f1 < f2 {
			b, x2, f2 = x2, x1, f1
			x1 = b - g*(b-a)
			f1 = cost(x1)
		} else {
			a, x1, f1 = x1, x2, f2
			x2 = a + g*(b-a)
			f2 = cost(x2)
		}
	}
	return (a + b) / 2
}

// undistort returns the ideal position of image point (x, y) under K1:
// r_u solves r_d = r_u (1 + k1 (r_u / R)^2) (fixed-point iteration).
func undistort(x, y, k1 float64, fr Frame) (float64, float64) {
	R := fr.HalfDiagPx()
	dx, dy := x-fr.CentreX, y-fr.CentreY
	rd := math.Hypot(dx, dy)
	if rd == 0 {
		return x, y
	}
	ru := rd
	for range 8 {
		ru = rd / (1 + k1*(ru/R)*(ru/R))
	}
	m := ru / rd
	return fr.CentreX + dx*m, fr.CentreY + dy*m
}

// lineSS returns the sum of squared distances of run g's undistorted
// pieces from their total-least-squares line.
func lineSS(pieces []Line, g []int, k1 float64, fr Frame) float64 {
	var ss float64
	for _, d := range lineDistances(pieces, g, k1, fr) {
		ss += d * d
	}
	return ss
}

// lineDistances returns the distance of each of run g's undistorted pieces
// from the run's total-least-squares line (through the centroid, along the
// scatter matrix's major axis).
func lineDistances(pieces []Line, g []int, k1 float64, fr Frame) []float64 {
	var mx, my float64
	xs := make([]float64, len(g))
	ys := make([]float64, len(g))
	for i, k := range g {
		xs[i], ys[i] = undistort(pieces[k].X, pieces[k].Y, k1, fr)
		mx += xs[i]
		my += ys[i]
	}
	n := float64(len(g))
	mx, my = mx/n, my/n
	var sxx, syy, sxy float64
	for i := range xs {
		dx, dy := xs[i]-mx, ys[i]-my
		sxx += dx * dx
		syy += dy * dy
		sxy += dx * dy
	}
	// The major axis's direction: half the angle of (sxx - syy, 2 sxy).
	a := math.Atan2(2*sxy, sxx-syy) / 2
	s, c := math.Sincos(a)
	out := make([]float64, len(g))
	for i := range xs {
		out[i] = math.Abs(-(xs[i]-mx)*s + (ys[i]-my)*c)
	}
	return out
}
