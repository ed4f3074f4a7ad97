package jpegdec

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestIDCTConstants derives the fixed-point factors from the cosines
// c_k = cos(k pi / 16) of the Loeffler-Ligtenberg-Moschytz factorisation
// (C. Loeffler, A. Ligtenberg, G. Moschytz, ICASSP 1989): each is a
// combination of them times sqrt(2), times 2^13, rounded.
func TestIDCTConstants(t *testing.T) {
	c := func(k float64) float64 { return math.Cos(k * math.Pi / 16) }
	r2 := math.Sqrt2
	for _, f := range []struct {
		got  int
		want float64
	}{
		{fix0298631336, r2 * (-c(1) + c(3) + c(5) - c(7))},
		{fix0390180644, r2 * (c(3) - c(5))},
		{fix0541196100, r2 * c(6)},
		{fix0765366865, r2 * (c(2) - c(6))},
		{fix0899976223, r2 * (c(3) - c(7))},
		{fix1175875602, r2 * c(3)},
		{fix1501321110, r2 * (c(1) + c(3) - c(5) - c(7))},
		{fix1847759065, r2 * (c(2) + c(6))},
		{fix1961570560, r2 * (c(3) + c(5))},
		{fix2053119869, r2 * (c(1) + c(3) - c(5) + c(7))},
		{fix2562915447, r2 * (c(1) + c(3))},
		{fix3072711026, r2 * (c(1) + c(3) + c(5) - c(7))},
	} {
		if want := int(math.Round(f.want * 8192)); f.got != want {
			t.Errorf("constant %d, want %d (%.9f x 2^13)", f.got, want, f.want)
		}
	}
}

// TestIDCTAgainstFormula compares the integer transform with the inverse
// DCT of ITU-T T.81 A.3.3 computed in float64, level-shifted by 128 and
// rounded: on random blocks of the sizes real files hold, no sample may be
// off by more than 1 (the fixed-point rounding).
func TestIDCTAgainstFormula(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	var q [64]int32
	for i := range q {
		q[i] = 1
	}
	dst := make([]uint8, 64)
	worst := 0.0
	for n := 0; n < 2000; n++ {
		b := make([]int16, 64)
		for i := range b {
			if rng.IntN(3) == 0 {
				b[i] = int16(rng.NormFloat64() * 60 / float64(1+i/4))
			}
		}
		b[0] = int16(rng.IntN(1200) - 600)
		idct(b, &q, dst, 8)
		for y := 0; y < 8; y++ {
			for x := 0; x < 8; x++ {
				s := 0.0
				for v := 0; v < 8; v++ {
					for u := 0; u < 8; u++ {
						cu, cv := 1.0, 1.0
						if u == 0 {
							cu = 1 / math.Sqrt2
						}
						if v == 0 {
							cv = 1 / math.Sqrt2
						}
						s += cu * cv * float64(b[8*v+u]) * math.Cos(float64(2*x+1)*float64(u)*math.Pi/16) * math.Cos(float64(2*y+1)*float64(v)*math.Pi/16)
					}
				}
				want := math.Max(0, math.Min(255, math.Round(s/4+128)))
				worst = math.Max(worst, math.Abs(float64(dst[8*y+x])-want))
			}
		}
	}
	if worst > 1 {
		t.Errorf("a sample differs from T.81's formula by %g", worst)
	}
}
