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
func measureISO(m *Measurement, p *plane.Plane, r Region, freq []float64, sd float64, shape noiseShape) error {
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
	nPix := 2 * half
	span := r.HalfLen * math.Abs(1/math.Sqrt(1+slope*slope)) // lines covered, either side
	first := int(math.Ceil(cy - span - 0.5))
	last := int(math.Floor(cy + span - 0.5))
	first = max(first, 0)
	last = min(last, nLineMax-1)
	type line struct {
		idx, start int
		vals       []float64
	}
	var lines []line
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
		lines = append(lines, line{i, start, vals})
	}
	if len(lines) < 8 || nPix < 8 {
		return ErrNoEdge
	}
	// Steps 2: centroid per line, twice.
	deriv := make([]float64, nPix)
	locate := func(l line, centre float64) (float64, bool) {
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
	fitLine := func(centre func(l line) float64) (a, b float64, ok bool) {
		var st lineStats
		for _, l := range lines {
			if loc, ok := locate(l, centre(l)); ok {
				st.add(float64(l.idx)+0.5, loc)
			}
		}
		if st.n < 8 {
			return 0, 0, false
		}
		a, b = st.coef()
		return a, b, true
	}
	a, b, ok := fitLine(func(l line) float64 { return float64(l.start) + float64(nPix)/2 })
	if !ok {
		return ErrNoEdge
	}
	a, b, ok = fitLine(func(l line) float64 { return a + b*(float64(l.idx)+0.5) })
	if !ok {
		return ErrNoEdge
	}
	// Second-order polynomial of the locations (ISO 12233:2017), about the
	// middle line ym for conditioning, centroids windowed on the line
	// first and then on the polynomial itself.
	ym := 0.5 * (float64(lines[0].idx) + float64(lines[len(lines)-1].idx) + 1)
	edgeAt := func(l line) float64 { return a + b*(float64(l.idx)+0.5) }
	for range 2 {
		var ps planeStats
		for _, l := range lines {
			if loc, ok := locate(l, edgeAt(l)); ok {
				y := float64(l.idx) + 0.5 - ym
				ps.add(y, y*y, loc)
			}
		}
		c, ok := ps.coef()
		if !ok {
			return ErrNoEdge
		}
		edgeAt = func(l line) float64 {
			y := float64(l.idx) + 0.5 - ym
			return c[0] + c[1]*y + c[2]*y*y
		}
		b = c[1] // slope at the middle, for the phase cycles and the bin spacing
	}
	// Step 3: whole phase cycles.
	cycles := math.Floor(float64(len(lines)) * math.Abs(b))
	if cycles < 1 {
		return errTooFewPhases
	}
	use := int(math.Round(cycles / math.Abs(b)))
	use = min(use, len(lines))
	skip := (len(lines) - use) / 2
	lines = lines[skip : skip+use]
	// Step 4: 4x binning of the distance along the line.
	const nb = 4
	nBins := nb * nPix
	off := nBins / 2
	sum := make([]float64, nBins)
	cnt := make([]float64, nBins)
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
	esf := make([]float64, nBins)
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
	// Step 5: central difference, Hamming window at the centroid.
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
	var s1, s0 float64
	for k, v := range lsf {
		s1 += v * float64(k)
		s0 += v
	}
	if s0 <= 0 {
		return ErrNoEdge
	}
	cen := s1 / s0
	halfWin := math.Max(cen, float64(nBins-1)-cen)
	for k := range lsf {
		lsf[k] *= 0.54 + 0.46*math.Cos(math.Pi*(float64(k)-cen)/halfWin)
	}
	// Step 6: transform, normalise, correct for the derivative.
	cosSlant := 1 / math.Sqrt(1+b*b)
	dx := cosSlant / nb // bin spacing along the normal, px
	val := make([]float64, len(freq))
	se := make([]float64, len(freq))
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
		mag := math.Hypot(re, im) / x0
		e := math.Sqrt(pn/2) / x0
		arg := 2 * math.Pi * f * dx
		if arg > 0 {
			corr := math.Max(math.Sin(arg)/arg, 0.1)
			mag /= corr
			e /= corr
		}
		val[j] = mag
		if j > 0 {
			se[j] = e
		}
	}
	m.Curve.Freq, m.Curve.Value = freq, val
	m.SE = se
	// Profiles for display, normalised like the refined ones.
	lo, hi := esf[0], esf[nBins-1]
	if hi < lo {
		lo, hi = hi, lo
	}
	peak := 0.0
	for _, v := range lsf {
		peak = math.Max(peak, v)
	}
	m.ESF, m.LSF = Profile{}, Profile{}
	for k := range esf {
		x := (float64(k) - cen) * dx
		m.ESF.X = append(m.ESF.X, x)
		v := (esf[k] - lo) / (hi - lo)
		if esf[nBins-1] < esf[0] {
			v = 1 - v
		}
		m.ESF.V = append(m.ESF.V, v)
		m.LSF.X = append(m.LSF.X, x)
		m.LSF.V = append(m.LSF.V, lsf[k]/peak)
	}
	return nil
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
