package field

import (
	"math"
	"math/rand/v2"
	"sort"
	"testing"
)

// TestLOWESSWorkedExample checks the local fit against values worked out
// by hand (exact rational arithmetic) from the definition in Cleveland
// (1979), section 2: tricube weights over the q nearest points, weighted
// least-squares line, no robustness pass.
func TestLOWESSWorkedExample(t *testing.T) {
	x := []float64{0, 1, 2, 3, 4}
	y := []float64{1, 3, 2, 5, 4}
	s := newSmooth(x, y)
	s.fitSpan(1, 0) // q = 5: every point in every neighbourhood
	for _, tc := range []struct {
		name    string
		x0      float64
		want    float64
		tol     float64
		comment string
	}{
		// At x0 = 2, h = 2: weights 0, (7/8)^3, 1, (7/8)^3, 0, symmetric, so
		// the line's value is the weighted mean (3 w + 2 + 5 w)/(2 w + 1),
		// w = 343/512.
		{"middle", 2, 3.1452420701168613, 1e-12, "by hand"},
		// At x0 = 0, h = 4: weights 1, (63/64)^3, (7/8)^3, (37/64)^3, 0.
		{"left end", 0, 1.2917927706870431, 1e-12, "by hand, exact fractions"},
		// Between data points, h = 3.5.
		{"between", 0.5, 1.7226664900511428, 1e-12, "by hand, exact fractions"},
	} {
		got, _ := s.at(tc.x0)
		if math.Abs(got-tc.want) > tc.tol {
			t.Errorf("%s: fit at %g = %.15g, want %.15g (%s)", tc.name, tc.x0, got, tc.want, tc.comment)
		}
	}
}

// TestLOWESSLine: a local linear fit reproduces a straight line exactly at
// every span (Cleveland 1979, section 2: locally linear fitting has no bias
// for linear functions), and its standard error is then zero.
func TestLOWESSLine(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	var x, y []float64
	for i := 0; i < 60; i++ {
		xi := 20 * rng.Float64()
		x, y = append(x, xi), append(y, 0.9-0.03*xi)
	}
	for _, span := range Spans {
		s := newSmooth(x, y)
		s.fitSpan(span, RobustIterations)
		for _, x0 := range []float64{0.5, 3, 10.25, 19} {
			v, se := s.at(x0)
			if want := 0.9 - 0.03*x0; math.Abs(v-want) > 1e-12 || se > 1e-12 {
				t.Errorf("span %g: at %g got %.15g +/- %g, want %.15g exactly", span, x0, v, se, want)
			}
		}
	}
}

// TestLOWESSParabola: a local quadratic reproduces a parabola exactly at
// every span (Cleveland and Devlin 1988, section 2: local fitting of degree
// p has no bias for polynomials of degree p), also at the ends of the range
// where a local line is biased.
func TestLOWESSParabola(t *testing.T) {
	f := func(x float64) float64 { return 0.9 - 0.002*x*x }
	var x, y []float64
	for i := 0; i < 50; i++ {
		xi := 20 * float64(i) / 49
		x, y = append(x, xi), append(y, f(xi))
	}
	for _, span := range Spans {
		s := newSmooth(x, y)
		s.degree = 2
		s.fitSpan(span, RobustIterations)
		for _, x0 := range []float64{0, 7.3, 20} {
			if v, _ := s.at(x0); math.Abs(v-f(x0)) > 1e-10 {
				t.Errorf("span %g: at %g got %.12g, want %.12g", span, x0, v, f(x0))
			}
		}
	}
	s := newSmooth(x, y)
	s.fitSpan(0.45, 0) // degree 1
	if v, _ := s.at(0); math.Abs(v-f(0)) < 1e-3 {
		t.Errorf("a local line at the end of a parabola should be biased; got %g, truth %g", v, f(0))
	}
	// Cross-validation prefers the parabola here.
	s.chooseSpan(Spans, Degrees, RobustIterations)
	if s.degree != 2 {
		t.Errorf("chose degree %d for an exact parabola", s.degree)
	}
}

// TestLOWESSOutlier: with the bisquare robustness passes, a gross outlier
// gets weight 0 (its residual exceeds six median residuals) and the line
// through the other points is recovered exactly (Cleveland 1979, section 3).
func TestLOWESSOutlier(t *testing.T) {
	var x, y []float64
	for i := 0; i < 30; i++ {
		x, y = append(x, float64(i)), append(y, 0.2+0.01*float64(i))
	}
	y[17] = 0.9 // a bad measurement
	s := newSmooth(x, y)
	s.fitSpan(0.45, RobustIterations)
	if s.rw[17] != 0 {
		t.Errorf("outlier weight %g, want 0", s.rw[17])
	}
	for i := range x {
		if i == 17 {
			continue
		}
		if want := 0.2 + 0.01*x[i]; math.Abs(s.fit[i]-want) > 1e-9 {
			t.Errorf("fit at %g = %.12g, want %.12g", x[i], s.fit[i], want)
		}
	}
	// Without robustness passes the outlier pulls its neighbours.
	s.fitSpan(0.45, 0)
	if math.Abs(s.fit[16]-(0.2+0.16)) < 0.01 {
		t.Errorf("plain local fit at 16 = %g, expected the outlier to pull it", s.fit[16])
	}
}

// TestLOWESSStandardError compares the pointwise standard error with the
// scatter of the fitted value over repeated noisy samples of one curve (a
// Monte Carlo check of se = sigma sqrt(sum l_k^2), Cleveland and Devlin
// 1988, section 2). Noise: normal, sd 0.02; 300 repetitions, fixed seed.
func TestLOWESSStandardError(t *testing.T) {
	const sd, reps = 0.02, 300
	rng := rand.New(rand.NewPCG(3, 4))
	n := 80
	x := make([]float64, n)
	for i := range x {
		x[i] = 20 * float64(i) / float64(n-1)
	}
	truth := func(h float64) float64 { return 0.8 - 0.0003*h*h }
	probes := []float64{0, 5, 10, 20}
	var sum, sum2, seSum [4]float64
	y := make([]float64, n)
	for r := 0; r < reps; r++ {
		for i := range y {
			y[i] = truth(x[i]) + sd*rng.NormFloat64()
		}
		s := newSmooth(x, y)
		s.fitSpan(0.45, RobustIterations)
		for k, x0 := range probes {
			v, se := s.at(x0)
			sum[k] += v
			sum2[k] += v * v
			seSum[k] += se
		}
	}
	for k, x0 := range probes {
		mean := sum[k] / reps
		emp := math.Sqrt(sum2[k]/reps - mean*mean)
		se := seSum[k] / reps
		// The robust scale and the fixed-weight approximation are good to
		// about 20 %; the bias of a quadratic under a local line is far
		// below the noise here.
		if se < 0.75*emp || se > 1.3*emp {
			t.Errorf("at %g: mean se %.5f, empirical sd of the fit %.5f", x0, se, emp)
		}
		if math.Abs(mean-truth(x0)) > 3*emp/math.Sqrt(reps)+0.004 {
			t.Errorf("at %g: mean fit %.5f, truth %.5f", x0, mean, truth(x0))
		}
	}
}

// TestLOWESSSpanChoice: cross-validation picks a wide span for a noisy line
// and a narrow one for a curve that turns several times.
func TestLOWESSSpanChoice(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	var x, yl, yw []float64
	for i := 0; i < 150; i++ {
		xi := 10 * rng.Float64()
		x = append(x, xi)
		yl = append(yl, 0.5+0.02*xi+0.01*rng.NormFloat64())
		yw = append(yw, 0.5+0.3*math.Sin(xi*1.6)+0.01*rng.NormFloat64())
	}
	sl := newSmooth(x, yl)
	sl.chooseSpan(Spans, []int{1}, RobustIterations)
	sw := newSmooth(x, yw)
	sw.chooseSpan(Spans, []int{1}, RobustIterations)
	if sl.span < 0.6 {
		t.Errorf("noisy line: span %g, want a wide one (>= 0.6)", sl.span)
	}
	if sw.span > 0.26 {
		t.Errorf("wavy curve: span %g, want the narrowest (0.25)", sw.span)
	}
}

// TestLOWESSWindow: the neighbourhood is the q nearest points.
func TestLOWESSWindow(t *testing.T) {
	x := []float64{0, 1, 2, 3, 10, 11, 30}
	s := newSmooth(x, make([]float64, len(x)))
	s.q = 3
	for _, tc := range []struct {
		x0   float64
		want int
	}{{-5, 0}, {0.9, 0}, {2.6, 1}, {6.4, 2}, {7, 3}, {10.4, 3}, {25, 4}, {100, 4}} {
		if got := s.window(tc.x0); got != tc.want {
			t.Errorf("window(%g) starts at %d, want %d", tc.x0, got, tc.want)
		}
	}
}

// TestMedian checks the selection-based median against sorting (the
// standard library's sort.Float64s as the reference), with ties.
func TestMedian(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 10))
	for n := 1; n < 60; n++ {
		v := make([]float64, n)
		for i := range v {
			v[i] = float64(rng.IntN(7)) // many ties
		}
		ref := append([]float64(nil), v...)
		sort.Float64s(ref)
		want := ref[n/2]
		if n%2 == 0 {
			want = (ref[n/2-1] + ref[n/2]) / 2
		}
		if got := median(v); got != want {
			t.Fatalf("n %d: median %g, want %g", n, got, want)
		}
	}
}
