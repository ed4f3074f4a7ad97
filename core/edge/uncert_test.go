package edge

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"sagitta/core/sim/simcam"
)

// TestStatedSEMatchesSpread: the standard error stated with each MTF value
// and with MTF50 (propagated from the plateau noise) is compared with the
// spread of the values over many noise seeds of the same edge; their ratio
// is the check (sample standard deviation; its own relative uncertainty
// with n seeds is about 1/sqrt(2(n-1)), 7 % for n = 100: common practice,
// e.g. J. R. Taylor, An Introduction to Error Analysis, 2nd ed., appendix E).
func TestStatedSEMatchesSpread(t *testing.T) {
	const size = 160
	seeds := 120
	if testing.Short() {
		seeds = 50
	}
	freqs := []float64{0.05, 0.15, 0.25, 0.4}
	var tab strings.Builder
	worst := 0.0
	for _, c := range []struct {
		sigma, angle, well float64
		meth               Method
	}{
		{1, 5, 3000, Refined}, {0.6, 22, 20000, Refined}, {2, 12, 3000, Refined},
		{1, 5, 3000, ISO}, {0.6, 22, 20000, ISO},
	} {
		cam := simcam.Camera{W: size, H: size, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: c.sigma, Sigma2: c.sigma}}}
		clean, err := cam.Render(simcam.HalfPlaneScene(size, size, c.angle, 0.08, 0.6))
		if err != nil {
			t.Fatal(err)
		}
		n := len(freqs) + 1
		sum, sum2, se := make([]float64, n), make([]float64, n), make([]float64, n)
		for s := range seeds {
			p := noisySRGB8(clean, c.well, uint64(9000+s))
			m, err := Measure(p, centred(size, c.angle, 60, 30), Options{Method: c.meth})
			if err != nil {
				t.Fatal(err)
			}
			se2 := struct{ Freq, Value []float64 }{m.Curve.Freq, m.SE}
			for k, f := range freqs {
				v := m.Curve.At(f)
				sum[k] += v
				sum2[k] += v * v
				// SE at f by linear interpolation, as the records do.
				i := int(f / (se2.Freq[1] - se2.Freq[0]))
				t0 := (f - se2.Freq[i]) / (se2.Freq[i+1] - se2.Freq[i])
				se[k] += (1-t0)*se2.Value[i] + t0*se2.Value[i+1]
			}
			v := m.Curve.MTF50()
			sum[n-1] += v
			sum2[n-1] += v * v
			se[n-1] += m.Curve.MTF50SE(m.SE)
		}
		fmt.Fprintf(&tab, "sigma %.1f angle %2.0f full well %5.0f %-7s:", c.sigma, c.angle, c.well, c.meth)
		for k := range n {
			N := float64(seeds)
			mean := sum[k] / N
			sd := math.Sqrt((sum2[k] - N*mean*mean) / (N - 1))
			stated := se[k] / N
			r := stated / sd
			name := "MTF50"
			if k < len(freqs) {
				name = fmt.Sprintf("%.2f", freqs[k])
			}
			fmt.Fprintf(&tab, "  %s: stated %.4f spread %.4f (%.2f)", name, stated, sd, r)
			if mean < 3*stated {
				// Where the MTF is within a few standard errors of zero,
				// the subtraction of the noise power (clamped at zero)
				// narrows the spread: the first-order error does not hold.
				tab.WriteString(" [near zero, not judged]")
				continue
			}
			worst = math.Max(worst, math.Abs(r-1))
			// README: stated SE within 35 % of the spread; asserted at 50 %.
			if math.Abs(r-1) > 0.5 {
				t.Errorf("sigma %g angle %g %v at %s: stated SE %.4f, observed spread %.4f", c.sigma, c.angle, c.meth, name, stated, sd)
			}
		}
		tab.WriteString("\n")
	}
	t.Logf("stated standard error against the spread over %d seeds:\n%sworst |stated/spread - 1| %.2f", seeds, tab.String(), worst)
}
