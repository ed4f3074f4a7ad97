//go:build js && wasm

package main

import (
	"encoding/json"
	"fmt"
	"syscall/js"

	"sagitta/core/analyze"
	"sagitta/core/series"
)

// seriesArgs are the options of sagittaSeries.
type seriesArgs struct {
	FNumbers []float64 `json:"f_numbers"` // aperture: the photos' f-numbers (nil: Exif's)
	TurnDeg  float64   `json:"turn_deg"`  // turned: 90, 180, 270, or 0 to read the turn from the chart
}

// seriesJS answers the questions of several photos (core/series):
//
//	sagittaSeries(kind string, images string (JSON array of analyze.Image), options string (JSON))
//	    -> JSON string of series.Aperture (kind "aperture") or series.Turned (kind "turned")
//
// A set of photos that is not such a series gives an error of one sentence.
func seriesJS(args []js.Value) (any, error) {
	if len(args) < 2 || args[0].Type() != js.TypeString || args[1].Type() != js.TypeString {
		return nil, fmt.Errorf("sagittaSeries(kind, images, options): wrong arguments")
	}
	var imgs []*analyze.Image
	if err := json.Unmarshal([]byte(args[1].String()), &imgs); err != nil {
		return nil, fmt.Errorf("series: the photos' results cannot be read: %v", err)
	}
	var opt seriesArgs
	if len(args) > 2 && args[2].Type() == js.TypeString && args[2].String() != "" {
		if err := json.Unmarshal([]byte(args[2].String()), &opt); err != nil {
			return nil, fmt.Errorf("series options: %v", err)
		}
	}
	var out any
	var err error
	switch kind := args[0].String(); kind {
	case "aperture":
		out, err = series.ApertureSeries(imgs, opt.FNumbers)
	case "turned":
		if len(imgs) != 2 {
			return nil, fmt.Errorf("series: a turned pair is two photos, not %d", len(imgs))
		}
		out, err = series.TurnedPair(imgs[0], imgs[1], opt.TurnDeg)
	default:
		return nil, fmt.Errorf("series: unknown kind %q (aperture or turned)", kind)
	}
	if err != nil {
		return nil, err
	}
	b, err := json.Marshal(out)
	return string(b), err
}
