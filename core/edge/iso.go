package edge

import (
	"errors"
	"math"

	"sagitta/core/plane"
)

// measureISO follows the e-SFR procedure of ISO 12233:2017, Annex D
// (edge-based SFR; Burns, PICS 2000), one function per published step:
//
//   - linearisation: the plane is already linear light (core/decode applies
//     the file's tone curve, the inverse of its OECF, before any step here);
//   - isoLines: lines across the edge;
//   - isoCentroid and isoFitEdge: the edge location per line, and the
//     straight line fitted through them, twice;
//   - isoWholeCycles: a whole number of phase cycles of the slant;
//   - isoBin: 4x oversampled binning into the edge spread function;
//   - isoDerivative: the line spread function by central difference;
//   - isoWindow: the Hamming window centred on its centroid;
//   - isoDFT: the magnitude of its discrete Fourier transform;
//   - isoDerivativeCorrection: division by the difference's own transfer.
//
// Bin spacing along the edge normal is cos(slant)/4 px, which sets the
// frequency scale.
func measureISO(m *Measurement, p *plane.Plane, r Region, freq []float64) error {
	lines, nPix := isoLines(p, r)
	if len(lines) < 8 || nPix < 8 {
		return ErrNoEdge
	}
	a, b, err := isoFitEdge(lines, nPix)
	if err != nil {
		return err
	}
	if lines, err = isoWholeCycles(lines, b); err != nil {
		return err
	}
	esf := isoBin(lines, a, b, nPix)
	lsf := isoDerivative(esf)
	cen, err := isoWindow(lsf)
	if err != nil {
		return err
	}
	dx := 1 / math.Sqrt(1+b*b) / isoOversample // bin spacing along the normal, px
	val := isoDFT(lsf, cen, dx, freq)
	isoDerivativeCorrection(val, freq, dx)
	m.Curve.Freq, m.Curve.Value = freq, val
	m.ESF, m.LSF = isoProfiles(esf, lsf, cen, dx)
	return nil
}

// isoOversample is the number of bins per pixel of the edge spread
// function (ISO 12233:2017, Annex D: 4x oversampling).
const isoOversample = 4

// isoLine is one line of pixels across the edge: its index along the
// edge's major axis, the position of its first pixel across it, and the
// pixel values.
type isoLine struct {
	idx, start int
	vals       []float64
}

// isoLines takes the lines across the edge (ISO 12233:2017, Annex D: the
// region of interest read row by row): pixel rows for an edge nearer
// vertical, columns for one nearer horizontal. Each line is a window of
// fixed length nPix centred where the region's nominal edge crosses it.
// (Deviation: the standard's region is one axis-aligned rectangle; here
// each line's window follows the slant so the region can be an oriented
// strip in a full chart. The pixels used near the edge are the same.)
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

// isoCentroid is the edge location on one line (ISO 12233:2017, Annex D):
// the centroid of the line's derivative [-1/2, +1/2], weighted by a Hamming
// window of the line's length centred at centre. The derivative
// d[j] = v[j+1] - v[j] lies at position start + j + 1 (between the pixel
// centres start+j+0.5 and start+j+1.5); its factor 1/2 cancels in the
// centroid. False when the weighted derivative sums to 0.
func isoCentroid(l isoLine, centre float64) (float64, bool) {
	nPix := len(l.vals)
	var s, sw float64
	for j := 0; j+1 < nPix; j++ {
		d := l.vals[j+1] - l.vals[j]
		pos := float64(l.start+j) + 1
		w := hamming(pos-centre, float64(nPix)/2)
		s += d * w * pos
		sw += d * w
	}
	if sw == 0 {
		return 0, false
	}
	return s / sw, true
}

// isoFitEdge fits the edge as the straight line pos = a + b (idx + 1/2)
// through the lines' centroids by least squares (ISO 12233:2017, Annex D),
// first with each line's window centred on the line, then again with it
// centred on the first fitted edge.
func isoFitEdge(lines []isoLine, nPix int) (a, b float64, err error) {
	fit := func(centre func(l isoLine) float64) (a, b float64, ok bool) {
		var st lineStats
		for _, l := range lines {
			if loc, ok := isoCentroid(l, centre(l)); ok {
				st.add(float64(l.idx)+0.5, loc)
			}
		}
		if st.n < 8 {
			return 0, 0, false
		}
		a, b = st.coef()
		return a, b, true
	}
	a, b, ok := fit(func(l isoLine) float64 { return float64(l.start) + float64(nPix)/2 })
	if !ok {
		return 0, 0, ErrNoEdge
	}
	a, b, ok = fit(func(l isoLine) float64 { return a + b*(float64(l.idx)+0.5) })
	if !ok {
		return 0, 0, ErrNoEdge
	}
	return a, b, nil
}

// isoWholeCycles keeps the middle lines that make a whole number of phase
// cycles of the slant b (pixels of edge shift per line), so that every
// quarter-pixel bin receives data evenly (ISO 12233:2017, Annex D).
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

// isoBin forms the oversampled edge spread function (ISO 12233:2017,
// Annex D): each pixel's distance from the fitted edge pos = a + b (idx +
// 1/2) along its line is put into bins of 1/4 pixel, and the bin means are
// the ESF. An empty bin takes the average of its nearest filled
// neighbours (the one filled neighbour at an end).
func isoBin(lines []isoLine, a, b float64, nPix int) []float64 {
	nBins := isoOversample * nPix
	off := nBins / 2
	sum := make([]float64, nBins)
	cnt := make([]float64, nBins)
	for _, l := range lines {
		edge := a + b*(float64(l.idx)+0.5)
		for j, v := range l.vals {
			dist := float64(l.start+j) + 0.5 - edge
			k := int(math.Floor(dist*isoOversample)) + off
			if k >= 0 && k < nBins {
				sum[k] += v
				cnt[k]++
			}
		}
	}
	esf := make([]float64, nBins)
	for k := range esf {
		if cnt[k] > 0 {
			esf[k] = sum[k] / cnt[k]
		} else {
			esf[k] = math.NaN()
		}
	}
	for k := range esf {
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
	return esf
}

// isoDerivative is the line spread function (ISO 12233:2017, Annex D): the
// central difference [-1/2, 0, +1/2] of the edge spread function, its end
// values copied from their neighbours, and its sign turned so that a
// falling edge gives a positive LSF.
func isoDerivative(esf []float64) []float64 {
	nBins := len(esf)
	lsf := make([]float64, nBins)
	for k := 1; k < nBins-1; k++ {
		lsf[k] = 0.5 * (esf[k+1] - esf[k-1])
	}
	lsf[0], lsf[nBins-1] = lsf[1], lsf[nBins-2]
	if esf[nBins-1] < esf[0] {
		for k := range lsf {
			lsf[k] = -lsf[k]
		}
	}
	return lsf
}

// isoWindow multiplies the LSF by a Hamming window 0.54 + 0.46 cos(pi (k -
// cen) / h) centred on its centroid cen, h reaching the farther end (ISO
// 12233:2017, Annex D), and returns cen.
func isoWindow(lsf []float64) (cen float64, err error) {
	var s1, s0 float64
	for k, v := range lsf {
		s1 += v * float64(k)
		s0 += v
	}
	if s0 <= 0 {
		return 0, ErrNoEdge
	}
	cen = s1 / s0
	halfWin := math.Max(cen, float64(len(lsf)-1)-cen)
	for k := range lsf {
		lsf[k] *= 0.54 + 0.46*math.Cos(math.Pi*(float64(k)-cen)/halfWin)
	}
	return cen, nil
}

// isoDFT is the magnitude of the discrete Fourier transform of the LSF at
// each frequency of freq (cycles/px), with the LSF's bins dx px apart and
// its phase origin at the centroid cen, normalised to 1 at zero frequency
// (ISO 12233:2017, Annex D). The transform is evaluated directly at the
// output frequencies: the same transform as the zero-padded DFT.
func isoDFT(lsf []float64, cen, dx float64, freq []float64) []float64 {
	val := make([]float64, len(freq))
	var x0 float64
	for _, v := range lsf {
		x0 += v
	}
	for j, f := range freq {
		var re, im float64
		for k, v := range lsf {
			s, c := math.Sincos(-2 * math.Pi * f * (float64(k) - cen) * dx)
			re += v * c
			im += v * s
		}
		val[j] = math.Hypot(re, im) / x0
	}
	return val
}

// isoDerivativeCorrection divides the SFR by the transfer function of the
// central difference, sin(2 pi f dx)/(2 pi f dx) for bin spacing dx (ISO
// 12233:2017, Annex D), floored at 0.1 so that it never amplifies beyond
// 10x.
func isoDerivativeCorrection(val, freq []float64, dx float64) {
	for j, f := range freq {
		arg := 2 * math.Pi * f * dx
		if arg > 0 {
			corr := math.Sin(arg) / arg
			val[j] /= math.Max(corr, 0.1)
		}
	}
}

// isoProfiles returns the ESF and the windowed LSF for display, against the
// distance from the centroid in px, normalised like the refined method's:
// the ESF from 0 (dark) to 1 (light), the LSF to a peak of 1.
func isoProfiles(esf, lsf []float64, cen, dx float64) (e, l Profile) {
	nBins := len(esf)
	lo, hi := esf[0], esf[nBins-1]
	if hi < lo {
		lo, hi = hi, lo
	}
	peak := 0.0
	for _, v := range lsf {
		peak = math.Max(peak, v)
	}
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
