// Package series answers the questions people shoot several photos for:
// at which aperture a lens is sharpest (Aperture), and whether a softer side
// belongs to the lens or to the set-up (Turned, from a pair of photos with
// the camera turned about the lens axis between them).
//
// It works on measured photos (analyze.Image) and never looks at pixels:
// every figure comes from the field summary the core already made, so the
// page, the command-line tool and the report read the same numbers.
package series

import (
	"math"

	"sagitta/core/analyze"
	"sagitta/core/field"
)

// Number is a float that is null in JSON when it is not finite.
type Number = field.Number

// Zone names, in the order of every per-zone list.
const (
	ZoneCentre = "centre"
	ZoneMiddle = "middle"
	ZoneCorner = "corner"
)

// Zones are the three parts of the field a series compares, by image height
// as a fraction of the corner height C: the centre [0, C/3), the middle
// [C/3, 2C/3) and the corners [2C/3, C].
var Zones = []string{ZoneCentre, ZoneMiddle, ZoneCorner}

// zoneOf returns the index in Zones of image height h (mm) for corner height
// c (mm).
func zoneOf(h, c float64) int {
	switch {
	case h < c/3:
		return 0
	case h < 2*c/3:
		return 1
	}
	return 2
}

// ZoneValue is the mean of one quantity over the measurements in one zone,
// with its standard error (the sample standard deviation over sqrt(N): it
// includes the spread between repeated targets) and the count behind it.
type ZoneValue struct {
	Value Number `json:"value"`
	SE    Number `json:"se"`
	N     int    `json:"n"`
}

// ZoneFigures are a photo's figures per zone: MTF50 (lp/mm) and the MTF at
// each field frequency, both orientations pooled. Measurements of mixed
// orientation and those the field curves treated as outliers (weight 0) are
// left out.
type ZoneFigures struct {
	// MTF50LPMM per zone, in the order of Zones.
	MTF50LPMM []ZoneValue `json:"mtf50_lp_mm"`
	// MTF per field frequency (outer), per zone (inner).
	MTF [][]ZoneValue `json:"mtf"`
}

// zoneFigures computes the per-zone figures of a summary.
func zoneFigures(s *field.Summary) ZoneFigures {
	z := ZoneFigures{MTF50LPMM: make([]ZoneValue, len(Zones)), MTF: make([][]ZoneValue, len(s.FreqsLPMM))}
	mtf50 := make([][]float64, len(Zones))
	mtf := make([][][]float64, len(s.FreqsLPMM))
	for k := range mtf {
		mtf[k] = make([][]float64, len(Zones))
	}
	for _, p := range s.Points {
		if p.Orientation == field.Mixed {
			continue
		}
		i := zoneOf(p.HeightMM, s.CornerMM)
		kept := false
		for k := range s.FreqsLPMM {
			if k >= len(p.MTF) || k >= len(p.Weight) {
				break
			}
			v, w := float64(p.MTF[k]), float64(p.Weight[k])
			if finite(v) && w > 0 {
				mtf[k][i] = append(mtf[k][i], v)
				kept = true
			}
		}
		if v := float64(p.MTF50LPMM); kept && finite(v) {
			mtf50[i] = append(mtf50[i], v)
		}
	}
	for i := range Zones {
		z.MTF50LPMM[i] = meanSE(mtf50[i])
	}
	for k := range s.FreqsLPMM {
		z.MTF[k] = make([]ZoneValue, len(Zones))
		for i := range Zones {
			z.MTF[k][i] = meanSE(mtf[k][i])
		}
	}
	return z
}

// meanSE returns the mean of v with its standard error (null with fewer
// than two values).
func meanSE(v []float64) ZoneValue {
	n := len(v)
	if n == 0 {
		return ZoneValue{Value: Number(math.NaN()), SE: Number(math.NaN())}
	}
	m := 0.0
	for _, x := range v {
		m += x
	}
	m /= float64(n)
	if n < 2 {
		return ZoneValue{Value: Number(m), SE: Number(math.NaN()), N: n}
	}
	ss := 0.0
	for _, x := range v {
		ss += (x - m) * (x - m)
	}
	return ZoneValue{Value: Number(m), SE: Number(math.Sqrt(ss / float64(n-1) / float64(n))), N: n}
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// summaryOf returns the photo's field summary or an error naming the photo.
func summaryOf(img *analyze.Image) (*field.Summary, error) {
	if img == nil || img.Summary == nil {
		name := "a photo"
		if img != nil {
			name = img.File
		}
		return nil, errorf("%s has no field summary (nothing was measured across the frame)", name)
	}
	return img.Summary, nil
}
