//go:build js && wasm

package main

import (
	"encoding/json"
	"fmt"
	"syscall/js"

	"sagitta/core/optics"
)

// referenceArgs are the arguments of sagittaReference, as JSON.
type referenceArgs struct {
	FNumber     float64   `json:"f_number"`
	PitchUM     float64   `json:"pitch_um"`
	FreqCyPx    []float64 `json:"freq_cy_px"` // where to evaluate the reference
	Measured    []float64 `json:"measured"`   // optional: a measured MTF at FreqCyPx
	MaxCyPx     float64   `json:"max_cy_px"`  // and a smooth curve from 0 to here (0: none)
	CurvePoints int       `json:"curve_points"`
}

// referenceJS gives the reference curve of a measured MTF, a perfect lens
// (optics.PerfectLens):
//
//	sagittaReference(args string (JSON {f_number, pitch_um, freq_cy_px,
//	    measured, max_cy_px, curve_points})) -> string (JSON {wavelength_um,
//	    at_freqs, curve_cy_px, curve, exceeds})
//
// at_freqs is the reference at freq_cy_px; curve samples it at curve_points
// + 1 even steps from 0 to max_cy_px; exceeds says whether measured rises
// above the reference by more than optics.SharpenedMargin (sharpening).
func referenceJS(args []js.Value) (any, error) {
	if len(args) < 1 || args[0].Type() != js.TypeString {
		return nil, fmt.Errorf("sagittaReference(args): wrong arguments")
	}
	var a referenceArgs
	if err := json.Unmarshal([]byte(args[0].String()), &a); err != nil {
		return nil, fmt.Errorf("reference: %v", err)
	}
	at, err := optics.PerfectLens(a.FNumber, a.PitchUM, optics.WavelengthUM, a.FreqCyPx)
	if err != nil {
		return nil, err
	}
	n := a.CurvePoints
	if n < 1 || n > 10000 {
		n = 200
	}
	var xs []float64
	if a.MaxCyPx > 0 {
		for i := 0; i <= n; i++ {
			xs = append(xs, a.MaxCyPx*float64(i)/float64(n))
		}
	}
	curve, err := optics.PerfectLens(a.FNumber, a.PitchUM, optics.WavelengthUM, xs)
	if err != nil {
		return nil, err
	}
	b, err := json.Marshal(map[string]any{
		"wavelength_um": optics.WavelengthUM,
		"at_freqs":      at,
		"curve_cy_px":   nonNil(xs),
		"curve":         nonNil(curve),
		"exceeds":       optics.Exceeds(a.Measured, at),
	})
	return string(b), err
}

func nonNil(v []float64) []float64 {
	if v == nil {
		return []float64{}
	}
	return v
}
