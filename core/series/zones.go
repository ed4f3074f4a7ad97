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

// Zone names, in the order of every per-zone list: the field summary's
// zones (field.Zone), thirds of the distance from the optical centre to the
// farthest corner.
const (
	ZoneCentre = "centre"
	ZoneMiddle = "mid-field"
	ZoneCorner = "corner"
)

// Zones lists the zone names in order.
var Zones = []string{ZoneCentre, ZoneMiddle, ZoneCorner}

// ZoneValue is one zone's median of one quantity, with its standard error
// and the count behind it (field.Zone).
type ZoneValue struct {
	Value Number `json:"value"`
	SE    Number `json:"se"`
	N     int    `json:"n"`
}

// ZoneFigures are a photo's figures per zone, from its field summary's
// zones: the median MTF50 (lp/mm) and the median MTF at each field
// frequency over every measurement in the zone.
type ZoneFigures struct {
	// MTF50LPMM per zone, in the order of Zones.
	MTF50LPMM []ZoneValue `json:"mtf50_lp_mm"`
	// MTF per field frequency (outer), per zone (inner).
	MTF [][]ZoneValue `json:"mtf"`
}

// zoneFigures reads the per-zone figures of a summary.
func zoneFigures(s *field.Summary) (ZoneFigures, error) {
	if len(s.Zones) != len(Zones) {
		return ZoneFigures{}, errorf("the field summary has %d zones, not %d", len(s.Zones), len(Zones))
	}
	z := ZoneFigures{MTF50LPMM: make([]ZoneValue, len(Zones)), MTF: make([][]ZoneValue, len(s.FreqsLPMM))}
	for i, fz := range s.Zones {
		if fz.Name != Zones[i] {
			return ZoneFigures{}, errorf("the field summary's zone %d is %q, not %q", i, fz.Name, Zones[i])
		}
		z.MTF50LPMM[i] = ZoneValue{fz.MTF50LPMM, fz.MTF50SE, fz.MTF50N}
	}
	for k := range s.FreqsLPMM {
		z.MTF[k] = make([]ZoneValue, len(Zones))
		for i, fz := range s.Zones {
			z.MTF[k][i] = ZoneValue{fz.All[k], fz.AllSE[k], fz.N[k]}
		}
	}
	return z, nil
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
	return img.Summary.Field(), nil
}
