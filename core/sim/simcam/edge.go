package simcam

import (
	"math"

	"gonum.org/v1/gonum/dsp/fourier"
)

// This file holds the single-edge profile: the value of a pixel whose
// neighbourhood (PSF support) contains one straight edge. With the edge's
// unit normal n = (cos t, sin t) pointing to its "positive" side and u the
// signed distance of the pixel centre from the edge line,
//
//	value = L_neg + (L_pos - L_neg) * F(u),
//	F(u)  = P(n.s + n.g < u),
//
// s uniform over the unit pixel square and g distributed as the PSF. n.s is
// the sum of two uniform variables of widths a = max(|cos t|, |sin t|) and
// b = min(|cos t|, |sin t|) (a trapezoid), n.g has the PSF's edge spread.

// trapCDF returns P(U + V < u) for U, V uniform on [-a/2, a/2] and
// [-b/2, b/2], a >= b >= 0, a > 0: the exact fraction of a unit pixel lying on
// the positive side of a straight line at signed distance u from its centre
// (the ideal-lens edge).
func trapCDF(u, a, b float64) float64 {
	h1, h2 := (a-b)/2, (a+b)/2
	switch {
	case u <= -h2:
		return 0
	case u >= h2:
		return 1
	case u < -h1:
		d := u + h2
		return d * d / (2 * a * b)
	case u > h1:
		d := h2 - u
		return 1 - d*d/(2*a*b)
	}
	return 0.5 + u/a
}

const invSqrt2Pi = 0.3989422804014327 // 1/sqrt(2 pi)

func normPDF(z float64) float64 { return invSqrt2Pi * math.Exp(-z*z/2) }
func normCDF(z float64) float64 { return 0.5 * math.Erfc(-z/math.Sqrt2) }

// gaussEdge returns F(u) for a Gaussian PSF whose standard deviation along
// the normal is s (px), pixel widths a >= b (see trapCDF). With Phi the
// normal CDF, G1(x) = x Phi(x/s) + s phi(x/s) and
// G2(x) = ((x^2 + s^2)/2) Phi(x/s) + (x s / 2) phi(x/s) are the first and
// second antiderivatives of Phi(x/s), and averaging Phi((u + U + V)/s) over
// the two boxes gives the second difference
//
//	F(u) = [G2(u + h2) - G2(u + h1) - G2(u - h1) + G2(u - h2)] / (a b),
//
// h1 = (a - b)/2, h2 = (a + b)/2. To avoid cancellation, the s = 0 part
// (G2 -> max(x, 0)^2 / 2, which gives trapCDF) is split off and only the
// bounded remainder H = G2 - max(x, 0)^2 / 2 is differenced. Limits: s = 0
// is trapCDF exactly; b < 1e-7 is taken as 0 (error < b / (2a) < 1e-7) and
// uses the first difference of G1; b << s uses a Taylor expansion in b.
func gaussEdge(u, s, a, b float64) float64 {
	if s <= 1e-12 {
		return trapCDF(u, a, b)
	}
	if b < 1e-7 {
		b = 0
	}
	if b == 0 || b <= 1e-4*s {
		// g(u) = average over U of Phi((u + U)/s) = (G1(u + a/2) - G1(u - a/2)) / a,
		// plus the b^2/24 g'' term of the average over V (error O(b^4 g'''')).
		g := trapCDF(u, a, 0) + (k1(u+a/2, s)-k1(u-a/2, s))/a
		if b > 0 {
			g2 := (normPDF((u+a/2)/s) - normPDF((u-a/2)/s)) / (a * s)
			g += b * b / 24 * g2
		}
		return g
	}
	h1, h2 := (a-b)/2, (a+b)/2
	return trapCDF(u, a, b) + (hRem(u+h2, s)-hRem(u+h1, s)-hRem(u-h1, s)+hRem(u-h2, s))/(a*b)
}

// k1 returns G1(x) - max(x, 0).
func k1(x, s float64) float64 {
	z := x / s
	if x >= 0 {
		return -x*normCDF(-z) + s*normPDF(z)
	}
	return x*normCDF(z) + s*normPDF(z)
}

// hRem returns G2(x) - max(x, 0)^2 / 2, bounded by s^2 / 2.
func hRem(x, s float64) float64 {
	z := x / s
	if x >= 0 {
		return -x*x/2*normCDF(-z) + s*s/2*normCDF(z) + x*s/2*normPDF(z)
	}
	return (x*x+s*s)/2*normCDF(z) + x*s/2*normPDF(z)
}

// edgeTable is F(u) for a non-Gaussian PSF and one edge normal, tabulated on
// a uniform grid and interpolated by cubic Hermite polynomials.
//
// F is split as F = Fc + Frem: Fc(u) = 1/2 + atan(2 pi u / alpha) / pi is the
// edge spread of the Cauchy kernel whose transform exp(-alpha |f|) has the
// same slope -alpha at f = 0 as K(f) = OTF(f n) sinc(f cos t) sinc(f sin t),
// so it carries K's slowly decaying 1/u tail in closed form; the remainder's
// transform K - exp(-alpha |f|) is then smooth to first order at 0 and its
// edge spread decays as u^-3. Frem is evaluated by its Fourier sine series
// on a period P (Poisson summation: sampling the spectrum at 1/P makes the
// kernel P-periodic, an error of the remainder's tail at distance P - |u|):
//
//	Frem(u) = sum_{j>=1} Krem(j/P) sin(2 pi j u / P) / (pi j),
//	Frem'(u) = (2/P) sum_{j>=1} Krem(j/P) cos(2 pi j u / P),
//
// both from one complex FFT.
type edgeTable struct {
	h     float64   // grid step, px
	m     int       // grid covers u = -m h .. m h
	f, df []float64 // Frem and its derivative at u = (i - m) h
	alpha float64   // Cauchy kink slope, px
}

// newEdgeTable tabulates F for |u| <= rmax px.
func newEdgeTable(p PSF, nx, ny, rmax float64) *edgeTable {
	alpha := kinkSlope(p, nx, ny)
	if alpha < 0 {
		alpha = 0
	}
	fmax := bandLimit(p)
	if math.IsInf(fmax, 1) {
		fmax = maxUnknownFreq
	}
	if alpha > 0 {
		fmax = math.Max(fmax, 37/alpha) // exp(-37) = 8.5e-17
	}
	period := math.Max(8*rmax, 64)
	nj := int(math.Ceil(fmax * period))
	n := nextFast(max(4*nj+4, int(math.Ceil(16*period))))
	h := period / float64(n)

	coef := make([]complex128, n)
	for j := 1; j <= nj; j++ {
		f := float64(j) / period
		k := p.OTF(f*nx, f*ny) * sinc(f*nx) * sinc(f*ny)
		if alpha > 0 {
			k -= math.Exp(-alpha * f)
		}
		cosC := 2 / period * k               // derivative series (cos)
		sinC := k / (math.Pi * float64(j))   // value series (sin)
		coef[j] += complex((cosC+sinC)/2, 0) // with coef[n-j] below: Re = cos series, Im = sin series
		coef[n-j] += complex((cosC-sinC)/2, 0)
	}
	// Sequence computes sum_j c_j exp(+2 pi i j m / n): the pair (c_j, c_{n-j})
	// = ((A+B)/2, (A-B)/2) contributes A cos(th) + i B sin(th).
	out := fourier.NewCmplxFFT(n).Sequence(nil, coef)
	m := int(math.Ceil(rmax/h)) + 2
	if 2*m+1 > n {
		m = (n - 1) / 2
	}
	t := &edgeTable{h: h, m: m, f: make([]float64, 2*m+1), df: make([]float64, 2*m+1), alpha: alpha}
	ramp := 0.0
	if alpha == 0 { // no Cauchy part: the series of F itself has the ramp u/P
		ramp = 1 / period
	}
	for i := -m; i <= m; i++ {
		z := out[(i+n)%n]
		t.f[i+m] = imag(z) + ramp*float64(i)*h
		t.df[i+m] = real(z) + ramp
	}
	return t
}

// eval returns F(u). Beyond the table only the Cauchy part is used (the
// remainder there is below the table's accuracy). Without a kink (alpha = 0)
// the table holds F - 1/2 itself and F is a step beyond it.
func (t *edgeTable) eval(u float64) float64 {
	fc := 0.5
	x := u/t.h + float64(t.m)
	i := int(math.Floor(x))
	if t.alpha > 0 {
		fc += math.Atan(2*math.Pi*u/t.alpha) / math.Pi
	} else if i < 0 || i >= 2*t.m {
		return 0.5 + math.Copysign(0.5, u) // step beyond the table
	}
	if i < 0 || i >= 2*t.m {
		return fc
	}
	s := x - float64(i)
	f0, f1 := t.f[i], t.f[i+1]
	d0, d1 := t.df[i]*t.h, t.df[i+1]*t.h
	s2, s3 := s*s, s*s*s
	v := (2*s3-3*s2+1)*f0 + (s3-2*s2+s)*d0 + (-2*s3+3*s2)*f1 + (s3-s2)*d1
	return fc + v
}

// nextFast returns the smallest n' >= n whose only prime factors are 2, 3
// and 5 (fast sizes for the FFT).
func nextFast(n int) int {
	if n < 1 {
		return 1
	}
	for m := n; ; m++ {
		k := m
		for _, p := range [3]int{2, 3, 5} {
			for k%p == 0 {
				k /= p
			}
		}
		if k == 1 {
			return m
		}
	}
}
