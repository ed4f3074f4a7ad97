// Package falloff measures a lens's light fall-off (vignetting) from
// patches of blank paper spread over the frame: each patch's linear level
// relative to the centre, in stops (EV, log2 of the ratio), as a smooth
// curve against image height and as a coarse map.
//
// The curve is a least-squares even polynomial in the image height s
// (half-diagonals from the optical centre),
//
//	log2 L(s) = a0 + a1 s^2 + a2 s^4 + a3 s^6,
//
// the shape of the cosine-fourth law of natural vignetting, -2 log2(1 +
// s^2 R^2 / f^2) (W. J. Smith, Modern Optical Engineering, 4th ed. (2008),
// section 10.9, chapter from memory), expanded in s^2, and of a lens
// barrel's smooth extra darkening; the reported fall-off is
// EV(s) = log2 L(s) - a0, 0 at the centre and negative towards the corners.
//
// A patch's level is the product of the lens's fall-off and the light on
// the paper there: uneven lighting of the chart looks exactly the same
// (see Result.Cautions).
package falloff

import (
	"errors"
	"fmt"
	"math"
	"slices"

	"sagitta/core/note"
)

// Patch is one patch of blank paper: its centre in the image and its mean
// linear level.
type Patch struct {
	XPx, YPx float64
	Level    float64
}

// Frame is the photo's geometry: its size and optical centre, px.
type Frame struct {
	W, H             int
	CentreX, CentreY float64
}

func (f Frame) halfDiag() float64 { return math.Hypot(float64(f.W), float64(f.H)) / 2 }

// cornerS and longEdgeS are the farthest corner's and the far end of the
// long axis's heights, half-diagonals.
func (f Frame) cornerS() float64 {
	w, h := float64(f.W), float64(f.H)
	return math.Hypot(math.Max(f.CentreX, w-f.CentreX), math.Max(f.CentreY, h-f.CentreY)) / f.halfDiag()
}

func (f Frame) longEdgeS() float64 {
	w, h := float64(f.W), float64(f.H)
	if w >= h {
		return math.Max(f.CentreX, w-f.CentreX) / f.halfDiag()
	}
	return math.Max(f.CentreY, h-f.CentreY) / f.halfDiag()
}

// Limits and thresholds.
const (
	// MinPatches patches are needed for a curve; with fewer than
	// MinPatchesS6 the s^6 term is left out.
	MinPatches   = 8
	MinPatchesS6 = 20
	// ClipLevel: patches at or above this linear level are taken as
	// clipped and left out.
	ClipLevel = 0.985
	// UnevenEV is the difference between opposite halves of the frame, at
	// equal heights, beyond which the lighting is called uneven (Sagitta's
	// choice: a quarter of a stop is visible in a print of the chart's
	// photo; 3 standard errors are required too).
	UnevenEV = 0.1
	// MapCols is the map's number of columns along the long side.
	MapCols = 8
	// CurveSteps is the number of intervals of the reported curve.
	CurveSteps = 20
)

// Result is the measured fall-off.
type Result struct {
	// Coef are a1.. (EV per s^2, s^4, s^6): the curve is
	// EV(s) = sum Coef[k] s^(2k+2).
	Coef []float64
	// HeightS, HeightMM and EV are the curve from the centre to the
	// farthest corner.
	HeightS, HeightMM, EV []float64
	// CornerEV and LongEdgeEV are the fall-off at the farthest corner and
	// at the far end of the long axis, stops (negative: darker).
	CornerEV, LongEdgeEV float64
	// ResidualEV is the rms difference of the patches from the curve.
	ResidualEV float64
	N          int
	// PatchEV is each patch's level relative to the centre, EV (NaN for a
	// clipped patch), and PatchS its height.
	PatchEV, PatchS []float64
	// The map: Cols x Rows cells of CellW x CellH px over the frame, row by
	// row from the top left; each the median EV of its patches (NaN for a
	// cell without one).
	Cols, Rows   int
	CellW, CellH float64
	MapEV        []float64
	// Uneven is the largest left-right or top-bottom difference at equal
	// heights, EV, and UnevenSE its standard error.
	Uneven, UnevenSE float64
	Cautions         []note.Note
}

// ErrFewPatches is returned when too few usable patches are given.
var ErrFewPatches = errors.New("falloff: too few patches of blank paper")

// Measure fits the fall-off to the patches of a frame with pixels of
// pitchUM.
func Measure(ps []Patch, fr Frame, pitchUM float64) (*Result, error) {
	R := fr.halfDiag()
	var s2, ev []float64
	var xs, ys []float64
	clipped := 0
	for _, p := range ps {
		if p.Level >= ClipLevel {
			clipped++
			continue
		}
		if !(p.Level > 0) {
			continue
		}
		d2 := ((p.XPx-fr.CentreX)*(p.XPx-fr.CentreX) + (p.YPx-fr.CentreY)*(p.YPx-fr.CentreY)) / (R * R)
		s2 = append(s2, d2)
		ev = append(ev, math.Log2(p.Level))
		xs, ys = append(xs, p.XPx), append(ys, p.YPx)
	}
	if len(ev) < MinPatches {
		return nil, ErrFewPatches
	}
	terms := 3
	if len(ev) >= MinPatchesS6 {
		terms = 4
	}
	a, ok := leastSquares(s2, ev, terms)
	if !ok {
		return nil, ErrFewPatches
	}
	out := &Result{Coef: a[1:], N: len(ev)}
	curve := func(s float64) float64 {
		v, p := 0.0, 1.0
		for _, c := range a[1:] {
			p *= s * s
			v += c * p
		}
		return v
	}
	sc := fr.cornerS()
	for i := 0; i <= CurveSteps; i++ {
		s := sc * float64(i) / CurveSteps
		out.HeightS = append(out.HeightS, s)
		out.HeightMM = append(out.HeightMM, s*R*pitchUM/1000)
		out.EV = append(out.EV, curve(s))
	}
	out.CornerEV, out.LongEdgeEV = curve(sc), curve(fr.longEdgeS())
	// Patches, residuals, halves.
	var ss float64
	var half [4][]float64 // left, right, top, bottom residuals
	k := 0
	for _, p := range ps {
		if p.Level >= ClipLevel || !(p.Level > 0) {
			out.PatchEV = append(out.PatchEV, math.NaN())
			out.PatchS = append(out.PatchS, math.Hypot(p.XPx-fr.CentreX, p.YPx-fr.CentreY)/R)
			continue
		}
		s := math.Sqrt(s2[k])
		e := ev[k] - a[0]
		out.PatchEV = append(out.PatchEV, e)
		out.PatchS = append(out.PatchS, s)
		r := e - curve(s)
		ss += r * r
		// Halves only beyond the centre's neighbourhood, where a side exists.
		if s > 0.2 {
			if dx := xs[k] - fr.CentreX; math.Abs(dx) > 0.1*R {
				half[b2i(dx > 0)] = append(half[b2i(dx > 0)], r)
			}
			if dy := ys[k] - fr.CentreY; math.Abs(dy) > 0.1*R {
				half[2+b2i(dy > 0)] = append(half[2+b2i(dy > 0)], r)
			}
		}
		k++
	}
	out.ResidualEV = math.Sqrt(ss / float64(len(ev)))
	for _, pair := range [2][2]int{{0, 1}, {2, 3}} {
		ma, va, na := meanVar(half[pair[0]])
		mb, vb, nb := meanVar(half[pair[1]])
		if na < 3 || nb < 3 {
			continue
		}
		if d := math.Abs(ma - mb); d > out.Uneven {
			out.Uneven, out.UnevenSE = d, math.Sqrt(va/float64(na)+vb/float64(nb))
		}
	}
	// The map.
	out.Cols, out.Rows = MapCols, max(1, int(math.Round(MapCols*float64(fr.H)/float64(fr.W))))
	if fr.H > fr.W {
		out.Rows, out.Cols = MapCols, max(1, int(math.Round(MapCols*float64(fr.W)/float64(fr.H))))
	}
	out.CellW, out.CellH = float64(fr.W)/float64(out.Cols), float64(fr.H)/float64(out.Rows)
	cells := make([][]float64, out.Cols*out.Rows)
	for i, p := range ps {
		if math.IsNaN(out.PatchEV[i]) {
			continue
		}
		cx := min(max(int(p.XPx/out.CellW), 0), out.Cols-1)
		cy := min(max(int(p.YPx/out.CellH), 0), out.Rows-1)
		cells[cy*out.Cols+cx] = append(cells[cy*out.Cols+cx], out.PatchEV[i])
	}
	for _, c := range cells {
		out.MapEV = append(out.MapEV, median(c))
	}
	// Cautions.
	out.Cautions = append(out.Cautions, note.New(note.FalloffLighting,
		"Uneven light on the chart looks exactly like the lens's fall-off: light the chart from both sides, or shoot it again moved or turned; what moves with the chart is the light, what stays is the lens."))
	if out.Uneven > UnevenEV && out.Uneven > 3*out.UnevenSE {
		out.Cautions = append(out.Cautions, note.New(note.FalloffUneven,
			fmt.Sprintf("The two halves of the frame differ by %.2f EV at equal distances from the optical centre, more than a centred lens gives: the chart is probably lit unevenly.", out.Uneven)))
	}
	if clipped > 0 {
		out.Cautions = append(out.Cautions, note.New(note.FalloffClipped,
			fmt.Sprintf("%d patches of paper reach the file's limit and were left out: expose a little less to measure the fall-off near the centre.", clipped)))
	}
	return out, nil
}

func b2i(b bool) int {
	if b {
		return 1
	}
	return 0
}

func meanVar(v []float64) (mean, variance float64, n int) {
	n = len(v)
	if n < 2 {
		return 0, 0, n
	}
	for _, x := range v {
		mean += x
	}
	mean /= float64(n)
	for _, x := range v {
		variance += (x - mean) * (x - mean)
	}
	return mean, variance / float64(n-1), n
}

func median(v []float64) float64 {
	if len(v) == 0 {
		return math.NaN()
	}
	s := slices.Clone(v)
	slices.Sort(s)
	n := len(s)
	if n%2 == 1 {
		return s[n/2]
	}
	return (s[n/2-1] + s[n/2]) / 2
}

// leastSquares fits y = sum_k a_k x^k, k < terms, by the normal equations
// (x = s^2 stays within [0, 2], so they are well conditioned for four
// terms); ok is false for a singular system.
func leastSquares(x, y []float64, terms int) ([]float64, bool) {
	var m [4][5]float64
	for i := range x {
		var p [4]float64
		p[0] = 1
		for k := 1; k < terms; k++ {
			p[k] = p[k-1] * x[i]
		}
		for r := range terms {
			for c := range terms {
				m[r][c] += p[r] * p[c]
			}
			m[r][terms] += p[r] * y[i]
		}
	}
	for c := range terms {
		piv := c
		for r := c + 1; r < terms; r++ {
			if math.Abs(m[r][c]) > math.Abs(m[piv][c]) {
				piv = r
			}
		}
		if math.Abs(m[piv][c]) < 1e-12 {
			return nil, false
		}
		m[c], m[piv] = m[piv], m[c]
		for r := range terms {
			if r == c {
				continue
			}
			f := m[r][c] / m[c][c]
			for k := c; k <= terms; k++ {
				m[r][k] -= f * m[c][k]
			}
		}
	}
	a := make([]float64, terms)
	for r := range terms {
		a[r] = m[r][terms] / m[r][r]
	}
	return a, true
}
