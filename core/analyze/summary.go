package analyze

import (
	"math"

	"sagitta/core/field"
)

// fieldPoints converts measurements into the field package's points for the
// summaries: position, height, orientation, MTF at the field frequencies
// and MTF50 in cycles/pixel (NaN where not measured).
func fieldPoints(ms []Measurement) []field.Point {
	pts := make([]field.Point, len(ms))
	for i, m := range ms {
		p := field.Point{
			ID: m.ID, Kind: m.Kind, X: m.XPx, Y: m.YPx, HeightMM: m.HeightMM,
			Orientation: m.Orientation, MTF50: float64(m.MTF50),
			MTF: make([]float64, len(m.MTFAtFreqs)),
		}
		for k, v := range m.MTFAtFreqs {
			p.MTF[k] = float64(v)
		}
		if math.IsInf(p.MTF50, 0) {
			p.MTF50 = math.NaN()
		}
		pts[i] = p
	}
	return pts
}
