package edge

import (
	"errors"
	"math"

	"sagitta/core/plane"
)

// measureISO follows the e-SFR procedure of ISO 12233:2017 (edge-based SFR
// annex; Burns, PICS 2000) as published:
//
//  1. Lines are taken across the edge: pixel rows for an edge nearer
//     vertical, columns for one nearer horizontal. Each line is a window of
//     fixed length centred where the region's nominal edge crosses it.
//     (Deviation: the standard's region is one axis-aligned rectangle; here
//     each line's window follows the slant so the region can be an oriented
//     strip in a full chart. The pixels used near the edge are the same.)
//  2. Per line, the derivative [-1/2, +1/2], weighted by a Hamming window
//     centred on the line's middle; its centroid is the edge location. A
//     straight line is fitted to the locations by least squares; the
//     centroids are computed again with the window centred on the fitted
//     line, and the line refitted. Then, as ISO 12233:2017 allows (a
//     polynomial fit of the edge locations, in place of the straight line
//     of the first edition, for edges bent by distortion), a second-order
//     polynomial is fitted, twice, the centroid windows centred on the
//     previous fit; distances in step 4 are taken from it. Edges bowing by
//     up to 2 px over the region measure within 0.5 % of the straight
//     edge's MTF50 (bow_test.go); beyond maxBowPx the analysis sets the
//     edge aside.
//  3. The number of lines is cut to a whole number of phase cycles of the
//     slant, so that every quarter-pixel bin receives data evenly.
//  4. Each pixel's distance from the fitted edge along the line direction
//     is put into bins of 1/4 pixel; the bin means form the oversampled edge
//     spread function; empty bins take the average of their neighbours.
//  5. The line spread function is the central difference [-1/2, 0, +1/2] of
//     the edge spread function, multiplied by a Hamming window centred on its
//     centroid.
//  6. The magnitude of its discrete Fourier transform, normalised to 1 at
//     zero frequency, divided by the transfer function of the central
//     difference, sin(2 pi f D)/(2 pi f D) for bin spacing D, is the SFR.
//     Bin spacing along the edge normal is cos(slant)/4 px, which sets the
//     frequency scale. (The transform is evaluated directly at the output
//     frequencies: the same transform as the zero-padded DFT.)
//
// The standard error of each value follows from the plateau noise (noise
// rms sd per pixel, so sd^2 / n in a bin of n pixels) propagated through the
// central difference, the window and the transform as in stieltjes.
//
// One function per published step: the plane is already linear light
// (core/decode applies the file's tone curve, the inverse of its OECF,
// before any step here); isoLines (1); isoCentroid and isoFitEdge (2);
// isoWholeCycles (3); isoBin (4); isoDerivative and isoWindow (5); isoDFT
// and isoDerivativeCorrection (6); isoProfiles, the curves shown.
func measureISO(m *Measurement, p *plane.Plane, r Region, freq []float64, sd float64, shape noiseShape) error {
	lines, nPix := isoLines(p, r)
	if len(lines) < 8 || nPix < 8 {
		return ErrNoEdge
	}
	edgeAt, b, err := isoFitEdge(lines, nPix)
	if err != nil {
		return err
	}
	if lines, err = isoWholeCycles(lines, b); err != nil {
		return err
	}
	esf, cnt := isoBin(lines, edgeAt, nPix)
	lsf := isoDerivative(esf)
	cen, halfWin, err := isoWindow(lsf)
	if err != nil {
		return err
	}
	dx := 1 / math.Sqrt(1+b*b) / isoOversample // bin spacing along the normal, px
	val, se := isoDFT(lsf, cnt, cen, halfWin, dx, freq, sd, shape)
	isoDerivativeCorrection(val, se, freq, dx)
	m.Curve.Freq, m.Curve.Value = freq, val
	m.SE = se
	m.ESF, m.LSF = isoProfiles(esf, lsf, cen, dx)
	return nil
}

// isoOversample is the number of bins per pixel of the edge spread
// function (ISO 12233:2017, edge-based SFR annex: 4x oversampling).
const isoOversample = 4

// isoLine is one line of pixels across the edge: its index along the
// edge's major axis, the position of its first pixel across it, and the
// pixel values.
type isoLine struct {
	idx, start int
	vals       []float64
}

// isoLines takes the lines across the edge (step 1): pixel rows for an
// edge nearer vertical, columns for one nearer horizontal, each a window of
// nPix pixels centred where the region's nominal edge crosses it.
func isoLines(p *plane.Plane, r Region) (lines []isoLine, nPix int) {
	tx, ty, nx, ny := r.axes()
	vertical := math.Abs(ty) >= math.Abs(tx) // edge nearer the vertical: rows cross it
	// get(line, pos) reads the image with the line index along the edge's
	// major axis and pos across it.
	get := func(line, pos int) float64 { return float64(p.Pix[line*p.W+pos]) }
	nLineMax, nPosMax := p.H, p.W
	// Nominal crossing of line i: position (continuous) where the region's
	// centre line crosses the line's centre.
	cx, cy := r.X, r.Y
	slope := tx / ty // pos shift per line
	across := math.Abs(nx)
	if !vertical {
		get = func(line, pos int) float64 { return float64(p.Pix[pos*p.W+line]) }
		nLineMax, nPosMax = p.W, p.H
		cx, cy = r.Y, r.X
		slope = ty / tx
		across = math.Abs(ny)
	}
	half := int(math.Floor(r.HalfWidth / across)) // window half-length along a line, px
	nPix = 2 * half
	span := r.HalfLen * math.Abs(1/math.Sqrt(1+slope*slope)) // lines covered, either side
	first := int(math.Ceil(cy - span - 0.5))
	last := int(math.Floor(cy + span - 0.5))
	first = max(first, 0)
	last = min(last, nLineMax-1)
	for i := first; i <= last; i++ {
		c := cx + (float64(i)+0.5-cy)*slope // crossing, continuous coordinate
		start := int(math.Round(c - float64(half)))
		if start < 0 || start+nPix > nPosMax {
			continue
		}
		vals := make([]float64, nPix)
		for j := range vals {
			vals[j] = get(i, start+j)
		}
		lines = append(lines, isoLine{i, start, vals})
	}
	return lines, nPix
}

// isoCentroid is the edge location on one line (step 2): the centroid of
// the derivative [-1/2, +1/2] weighted by a Hamming window centred at
// centre. deriv is scratch space of nPix values.
func isoCentroid(l isoLine, centre float64, nPix int, deriv []float64) (float64, bool) {
	// Derivative d[j] = v[j+1] - v[j] at position start + j + 1
	// (between pixel centres start+j+0.5 and start+j+1.5).
	var s, sw float64
	for j := 0; j+1 < nPix; j++ {
		deriv[j] = l.vals[j+1] - l.vals[j]
		pos := float64(l.start+j) + 1
		w := hamming(pos-centre, float64(nPix)/2)
		s += deriv[j] * w * pos
		sw += deriv[j] * w
	}
	if sw == 0 {
		return 0, false
	}
	return s / sw, true
}

// isoFitEdge fits the edge through the lines' centroids (step 2): a
// straight line twice (the second time with each centroid window centred
// on the first line), then a second-order polynomial twice (ISO
// 12233:2017), about the middle line for conditioning. It returns the
// edge's position on each line and the slope at the middle, which sets the
// phase cycles and the bin spacing.
func isoFitEdge(lines []isoLine, nPix int) (edgeAt func(isoLine) float64, slope float64, err error) {
	deriv := make([]float64, nPix)
	fitLine := func(centre func(l isoLine) float64) (a, b float64, ok bool) {
		var st lineStats
		for _, l := range lines {
			if loc, ok := isoCentroid(l, centre(l), nPix, deriv); ok {
				st.add(float64(l.idx)+0.5, loc)
			}
		}
		if st.n < 8 {
			return 0, 0, false
		}
		a, b = st.coef()
		return a, b, true
	}
	a, b, ok := fitLine(func(l isoLine) float64 { return float64(l.start) + float64(nPix)/2 })
	if !ok {
		return nil, 0, ErrNoEdge
	}
	a, b, ok = fitLine(func(l isoLine) float64 { return a + b*(float64(l.idx)+0.5) })
	if !ok {
		return nil, 0, ErrNoEdge
	}
	ym := 0.5 * (float64(lines[0].idx) + float64(lines[len(lines)-1].idx) + 1)
	edgeAt = func(l isoLine) float64 { return a + b*(float64(l.idx)+0.5) }
	for range 2 {
		var ps planeStats
		for _, l := range lines {
			if loc, ok := isoCentroid(l, edgeAt(l), nPix, deriv); ok {
				y := float64(l.idx) + 0.5 - ym
				ps.add(y, y*y, loc)
			}
		}
		c, ok := ps.coef()
		if !ok {
			return nil, 0, ErrNoEdge
		}
		edgeAt = func(l isoLine) float64 {
			y := float64(l.idx) + 0.5 - ym
			return c[0] + c[1]*y + c[2]*y*y
		}
		b = c[1]
	}
	return edgeAt, b, nil
}

// isoWholeCycles keeps the middle lines that make a whole number of phase
// cycles of the slant b (step 3), so every bin receives data evenly.
func isoWholeCycles(lines []isoLine, b float64) ([]isoLine, error) {
	cycles := math.Floor(float64(len(lines)) * math.Abs(b))
	if cycles < 1 {
		return nil, errTooFewPhases
	}
	use := int(math.Round(cycles / math.Abs(b)))
	use = min(use, len(lines))
	skip := (len(lines) - use) / 2
	return lines[skip : skip+use], nil
}

// isoBin puts each pixel at its distance from the fitted edge along the
// line into bins of 1/isoOversample px (step 4): the bin means are the
// oversampled edge spread function, an empty bin the average of its
// nearest filled neighbours; cnt holds each bin's pixel count.
func isoBin(lines []isoLine, edgeAt func(isoLine) float64, nPix int) (esf, cnt []float64) {
	const nb = isoOversample
	nBins := nb * nPix
	off := nBins / 2
	sum := make([]float64, nBins)
	cnt = make([]float64, nBins)
	for _, l := range lines {
		edge := edgeAt(l)
		for j, v := range l.vals {
			dist := float64(l.start+j) + 0.5 - edge
			k := int(math.Floor(dist*nb)) + off
			if k >= 0 && k < nBins {
				sum[k] += v
				cnt[k]++
			}
		}
	}
	esf = make([]float64, nBins)
	for k := range esf {
		if cnt[k] > 0 {
			esf[k] = sum[k] / cnt[k]
		} else {
			esf[k] = math.NaN()
		}
	}
	for k := range esf { // empty bins: average of the neighbours
		if math.IsNaN(esf[k]) {
			l, r := k-1, k+1
			for l >= 0 && math.IsNaN(esf[l]) {
				l--
			}
			for r < nBins && math.IsNaN(esf[r]) {
				r++
			}
			switch {
			case l >= 0 && r < nBins:
				esf[k] = 0.5 * (esf[l] + esf[r])
			case l >= 0:
				esf[k] = esf[l]
			case r < nBins:
				esf[k] = esf[r]
			}
		}
	}
	return esf, cnt
}

// isoDerivative is the line spread function (step 5): the central
// difference [-1/2, 0, +1/2] of the edge spread function, its ends copied
// from their neighbours, made positive for a falling edge.
func isoDerivative(esf []float64) []float64 {
	nBins := len(esf)
	lsf := make([]float64, nBins)
	for k := 1; k < nBins-1; k++ {
		lsf[k] = 0.5 * (esf[k+1] - esf[k-1])
	}
	lsf[0], lsf[nBins-1] = lsf[1], lsf[nBins-2]
	if esf[nBins-1] < esf[0] { // falling edge: make the LSF positive
		for k := range lsf {
			lsf[k] = -lsf[k]
		}
	}
	return lsf
}

// isoWindow multiplies the line spread function by a Hamming window
// centred on its centroid (step 5), reaching to the farther end, and
// returns the centroid (in bins) and the window's half-width.
func isoWindow(lsf []float64) (cen, halfWin float64, err error) {
	var s1, s0 float64
	for k, v := range lsf {
		s1 += v * float64(k)
		s0 += v
	}
	if s0 <= 0 {
		return 0, 0, ErrNoEdge
	}
	cen = s1 / s0
	halfWin = math.Max(cen, float64(len(lsf)-1)-cen)
	for k := range lsf {
		lsf[k] *= 0.54 + 0.46*math.Cos(math.Pi*(float64(k)-cen)/halfWin)
	}
	return cen, halfWin, nil
}

// isoDFT is the magnitude of the windowed line spread function's discrete
// Fourier transform at freq (cycles/pixel; bins dx px apart, centred at
// cen), normalised to 1 at zero frequency (step 6), with the standard
// error of each value from the noise sd per pixel spread over the bins'
// counts cnt, through the central difference and the window, and the
// noise's shape (never below white).
func isoDFT(lsf, cnt []float64, cen, halfWin, dx float64, freq []float64, sd float64, shape noiseShape) (val, se []float64) {
	nBins := len(lsf)
	val = make([]float64, len(freq))
	se = make([]float64, len(freq))
	var x0 float64
	for _, v := range lsf {
		x0 += v
	}
	win := make([]float64, nBins)
	for k := range win {
		win[k] = 0.54 + 0.46*math.Cos(math.Pi*(float64(k)-cen)/halfWin)
	}
	er, ei := make([]float64, nBins), make([]float64, nBins)
	for j, f := range freq {
		var re, im float64
		for k, v := range lsf {
			s, c := math.Sincos(-2 * math.Pi * f * (float64(k) - cen) * dx)
			er[k], ei[k] = c, s
			re += v * c
			im += v * s
		}
		var pn float64
		for k := 1; k < nBins-1; k++ {
			// Bin k enters lsf[k-1] with +1/2 and lsf[k+1] with -1/2.
			ar := 0.5 * (win[k-1]*er[k-1] - win[k+1]*er[k+1])
			ai := 0.5 * (win[k-1]*ei[k-1] - win[k+1]*ei[k+1])
			pn += sd * sd / math.Max(cnt[k], 1) * (ar*ar + ai*ai)
		}
		pn *= math.Max(shape.factor(f), 1) // conservative, as in stieltjes
		val[j] = math.Hypot(re, im) / x0
		if j > 0 {
			se[j] = math.Sqrt(pn/2) / x0
		}
	}
	return val, se
}

// isoDerivativeCorrection divides each value and its standard error by the
// transfer function of the central difference over bins dx px apart,
// sin(2 pi f dx)/(2 pi f dx) (step 6), held at 0.1 or more.
func isoDerivativeCorrection(val, se, freq []float64, dx float64) {
	for j, f := range freq {
		arg := 2 * math.Pi * f * dx
		if arg > 0 {
			corr := math.Max(math.Sin(arg)/arg, 0.1)
			val[j] /= corr
			se[j] /= corr
		}
	}
}

// isoProfiles returns the edge spread and line spread functions for
// display, normalised like the refined ones: x in px from the centroid,
// the ESF from 0 (dark) to 1 (light), the LSF to a peak of 1.
func isoProfiles(esf, lsf []float64, cen, dx float64) (Profile, Profile) {
	nBins := len(esf)
	lo, hi := esf[0], esf[nBins-1]
	if hi < lo {
		lo, hi = hi, lo
	}
	peak := 0.0
	for _, v := range lsf {
		peak = math.Max(peak, v)
	}
	var e, l Profile
	for k := range esf {
		x := (float64(k) - cen) * dx
		e.X = append(e.X, x)
		v := (esf[k] - lo) / (hi - lo)
		if esf[nBins-1] < esf[0] {
			v = 1 - v
		}
		e.V = append(e.V, v)
		l.X = append(l.X, x)
		l.V = append(l.V, lsf[k]/peak)
	}
	return e, l
}

var errTooFewPhases = errors.New("edge: the edge is too close to a pixel axis for a whole phase cycle (iso method)")

// hamming is the Hamming window 0.54 + 0.46 cos(pi x / half) for |x| <= half
// (0.08 beyond).
func hamming(x, half float64) float64 {
	if math.Abs(x) >= half {
		return 0.08
	}
	return 0.54 + 0.46*math.Cos(math.Pi*x/half)
}
