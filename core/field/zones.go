package field

import "math"

// Zones of image height for the comparison of photos: thirds of the
// distance from the optical centre to the farthest corner (centre [0, 1/3),
// mid-field [1/3, 2/3), corner [2/3, 1]).
var zoneNames = [3]string{"centre", "mid-field", "corner"}

// Zone is one third of the image height with the median MTF of the
// measurements in it. Medians resist the odd poorly placed edge.
type Zone struct {
	// Name is "centre", "mid-field" or "corner".
	Name string
	// FromMM and ToMM bound the zone's image heights, mm (FromMM included,
	// ToMM excluded except for the corner zone).
	FromMM float64
	ToMM   float64
	// All, Sagittal and Tangential are the median MTF at each field
	// frequency (in Summary.FreqsLPMM's order) of every measurement in the
	// zone, of the sagittal ones and of the tangential ones; null when
	// there is none.
	All        []Number
	Sagittal   []Number
	Tangential []Number
	// N is the number of measurements behind All at each frequency.
	N []int
	// AllSE is the standard error of each All median (see medianSE).
	AllSE []Number
	// MTF50LPMM is the median MTF50 (lp/mm) of every measurement in the
	// zone, MTF50SE its standard error and MTF50N the count behind it
	// (measurements whose MTF50 was not reached are left out).
	MTF50LPMM Number
	MTF50SE   Number
	MTF50N    int
}

// zones sorts the points into the three zones of image height and takes
// medians at each frequency.
func zones(cornerMM, pitchUM float64, pts []Point, nf int) []Zone {
	out := make([]Zone, 3)
	for z := range out {
		out[z] = Zone{Name: zoneNames[z], FromMM: cornerMM * float64(z) / 3, ToMM: cornerMM * float64(z+1) / 3,
			All: make([]Number, nf), Sagittal: make([]Number, nf), Tangential: make([]Number, nf), N: make([]int, nf),
			AllSE: make([]Number, nf)}
	}
	var mtf50 [3][]float64
	for _, p := range pts {
		if v := p.MTF50 / (pitchUM / 1000); finite(v) {
			z := zoneOf(p.HeightMM, cornerMM)
			mtf50[z] = append(mtf50[z], v)
		}
	}
	for z := range out {
		out[z].MTF50LPMM, out[z].MTF50SE, out[z].MTF50N = Number(median(mtf50[z])), Number(medianSE(mtf50[z])), len(mtf50[z])
	}
	for k := 0; k < nf; k++ {
		var all, sag, tan [3][]float64
		for _, p := range pts {
			v := p.MTF[k]
			if !finite(v) {
				continue
			}
			z := zoneOf(p.HeightMM, cornerMM)
			all[z] = append(all[z], v)
			switch p.Orientation {
			case Sagittal:
				sag[z] = append(sag[z], v)
			case Tangential:
				tan[z] = append(tan[z], v)
			}
		}
		for z := range out {
			out[z].All[k], out[z].Sagittal[k], out[z].Tangential[k] = Number(median(all[z])), Number(median(sag[z])), Number(median(tan[z]))
			out[z].N[k] = len(all[z])
			out[z].AllSE[k] = Number(medianSE(all[z]))
		}
	}
	return out
}

// medianSE is the standard error of the median of v: sqrt(pi/2) s /
// sqrt(n), s the sample standard deviation, the large-sample result for
// data spread normally about the median (M. G. Kendall and A. Stuart, The
// Advanced Theory of Statistics, vol. 1, on the sampling variance of the
// median; common practice). NaN with fewer than two values.
func medianSE(v []float64) float64 {
	n := float64(len(v))
	if n < 2 {
		return math.NaN()
	}
	m := 0.0
	for _, x := range v {
		m += x
	}
	m /= n
	ss := 0.0
	for _, x := range v {
		ss += (x - m) * (x - m)
	}
	return math.Sqrt(math.Pi/2) * math.Sqrt(ss/(n-1)) / math.Sqrt(n)
}

// zoneOf returns the zone (0 centre, 1 mid-field, 2 corner) of image
// height h in a frame whose farthest corner is at cornerMM.
func zoneOf(h, cornerMM float64) int {
	t := h / cornerMM
	switch {
	case t < 1.0/3:
		return 0
	case t < 2.0/3:
		return 1
	}
	return 2
}
