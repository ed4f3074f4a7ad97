package plot

import (
	"math"
	"strconv"
)

// niceNum returns the smallest "nice" number not below x: 1, 2 or 5 times a
// power of ten (P. S. Heckbert, "Nice numbers for graph labels", Graphics
// Gems, 1990; his rounding variant is not needed here).
func niceNum(x float64) float64 {
	if !(x > 0) || math.IsInf(x, 0) {
		return 1
	}
	e := math.Floor(math.Log10(x))
	p := math.Pow(10, e)
	switch f := x / p; {
	case f <= 1:
		return p
	case f <= 2:
		return 2 * p
	case f <= 5:
		return 5 * p
	}
	return 10 * p
}

// niceTicks returns at least want (when the range allows) tick positions
// at multiples of a nice step inside [lo, hi], and the step. Heckbert's
// "loose" labelling extends the range to the ticks; here the axis range is
// fixed (a field curve ends at the corner), so the step is the largest nice
// number (1, 2 or 5 times a power of ten) that puts want ticks inside it.
func niceTicks(lo, hi float64, want int) ([]float64, float64) {
	if !(hi > lo) || math.IsInf(hi-lo, 0) {
		return nil, 1
	}
	step := niceNum(hi - lo)
	for i := 0; i < 60; i++ {
		if n := math.Floor(hi/step+1e-9) - math.Ceil(lo/step-1e-9) + 1; n >= float64(want) {
			break
		}
		step = lowerNice(step) // 10 -> 5 -> 2 -> 1 -> 0.5 ...
	}
	var out []float64
	start := math.Ceil(lo/step-1e-9) * step
	for v := start; v <= hi+step*1e-9; v += step {
		t := math.Round(v/step) * step
		if t == 0 {
			t = 0 // no negative zero
		}
		out = append(out, t)
		if len(out) > 1000 {
			break
		}
	}
	return out, step
}

// lowerNice returns the largest nice number strictly below the nice number
// x: 5 -> 2, 2 -> 1, 1 -> 0.5.
func lowerNice(x float64) float64 {
	e := math.Floor(math.Log10(x) + 1e-9)
	p := math.Pow(10, e)
	switch f := math.Round(x / p); {
	case f >= 5:
		return 2 * p
	case f >= 2:
		return p
	}
	return p / 2
}

// tickLabel formats a tick value with as many decimals as the step needs.
func tickLabel(v, step float64) string {
	d := 0
	if step > 0 && step < 1 {
		d = int(math.Ceil(-math.Log10(step) - 1e-9))
		// A step of 0.25 or 2.5 needs one more decimal than its power.
		if s := step * math.Pow10(d); math.Abs(s-math.Round(s)) > 1e-6 {
			d++
		}
	} else if step >= 1 && math.Abs(step-math.Round(step)) > 1e-9 {
		d = 1
	}
	if math.Abs(v) < step*1e-9 {
		v = 0
	}
	return strconv.FormatFloat(v, 'f', d, 64)
}
