//go:build js && wasm

package main

import (
	"encoding/json"
	"fmt"
	"image/color"
	"syscall/js"

	"sagitta/core/analyze"
	"sagitta/core/plot"
	"sagitta/core/series"
)

// plotOptions are the options of sagittaPlot.
type plotOptions struct {
	Label     string    `json:"label"`       // names the photo in the title
	Band      bool      `json:"band"`        // draw uncertainty bands
	Format    string    `json:"format"`      // "svg" (default) or "png"
	Scale     float64   `json:"scale"`       // PNG pixels per px (default 2)
	LPMM      bool      `json:"lp_mm"`       // target: frequency axis in lp/mm
	FNumber   float64   `json:"f_number"`    // target: f-number of the diffraction reference (0: from Exif)
	FreqsLPMM []float64 `json:"freqs_lp_mm"` // compare: the frequencies to plot
}

// plotJS renders one of core/plot's figures:
//
//	sagittaPlot(kind, data, options) -> {svg string | png Uint8Array, table {caption, columns, rows}}
//
// kind and data (JSON): "field", "astigmatism", "map": a photo's summary
// (analyze.Summary, converted to field.Summary for core/plot); "compare": [{label, summary}, ...]; "target": {image
// (analyze.Image), id (a measurement id)}; "series": an aperture series
// (series.Aperture, from sagittaSeries); "ca": {lateral_ca, corner_mm} (a
// photo's colour fringes, analyze.LateralCA); "ca-compare": [{label,
// lateral_ca, corner_mm}, ...]; "distortion", "falloff": one photo
// {image} (analyze.Image: its size, pitch, centre and distortion or falloff
// suffice) or a comparison {photos: [{label, distortion, falloff}, ...]}.
func plotJS(args []js.Value) (any, error) {
	if len(args) < 2 || args[0].Type() != js.TypeString || args[1].Type() != js.TypeString {
		return nil, fmt.Errorf("sagittaPlot(kind, data, options): wrong arguments")
	}
	var opt plotOptions
	if len(args) > 2 && args[2].Type() == js.TypeString && args[2].String() != "" {
		if err := json.Unmarshal([]byte(args[2].String()), &opt); err != nil {
			return nil, fmt.Errorf("plot options: %v", err)
		}
	}
	data := []byte(args[1].String())
	var fig *plot.Figure
	var err error
	switch kind := args[0].String(); kind {
	case "field", "astigmatism", "map":
		var sj analyze.Summary
		if err := json.Unmarshal(data, &sj); err != nil {
			return nil, fmt.Errorf("plot %s: %v", kind, err)
		}
		s := *sj.Field()
		fo := plot.FieldOptions{Label: opt.Label, Band: opt.Band}
		switch kind {
		case "field":
			fig = plot.FieldCurves(&s, fo)
		case "astigmatism":
			fig = plot.Astigmatism(&s, fo)
		default:
			fig = plot.Map(&s, plot.MapOptions{Label: opt.Label})
		}
	case "compare":
		var in []struct {
			Label   string           `json:"label"`
			Summary *analyze.Summary `json:"summary"`
		}
		if err := json.Unmarshal(data, &in); err != nil {
			return nil, fmt.Errorf("plot compare: %v", err)
		}
		// A photo without a summary keeps its place (and so its colour)
		// in the legend; it draws no curve.
		photos := make([]plot.Photo, 0, len(in))
		for _, p := range in {
			if p.Summary != nil {
				photos = append(photos, plot.Photo{Label: p.Label, Summary: p.Summary.Field()})
			} else {
				photos = append(photos, plot.Photo{Label: p.Label})
			}
		}
		fig = plot.Compare(photos, plot.CompareOptions{FreqsLPMM: opt.FreqsLPMM, Band: opt.Band})
	case "ca":
		var in caPhoto
		if err := json.Unmarshal(data, &in); err != nil || in.LateralCA == nil {
			return nil, fmt.Errorf("plot ca: the data must be {lateral_ca, corner_mm}")
		}
		fig = plot.LateralCA(in.LateralCA, in.CornerMM, plot.FieldOptions{Label: opt.Label, Band: opt.Band})
	case "ca-compare":
		var in []caPhoto
		if err := json.Unmarshal(data, &in); err != nil {
			return nil, fmt.Errorf("plot ca-compare: %v", err)
		}
		photos := make([]plot.CAPhoto, len(in))
		for i, p := range in {
			photos[i] = plot.CAPhoto{Label: p.Label, LateralCA: p.LateralCA, CornerMM: p.CornerMM}
		}
		fig = plot.CompareCA(photos, plot.CompareOptions{Band: opt.Band})
	case "series":
		var a series.Aperture
		if err := json.Unmarshal(data, &a); err != nil {
			return nil, fmt.Errorf("plot series: %v", err)
		}
		fig = plot.ApertureSeries(&a)
	case "distortion", "falloff":
		fig, err = geometryPlot(kind, data, opt)
		if err != nil {
			return nil, err
		}
	case "target":
		var in struct {
			Image *analyze.Image `json:"image"`
			ID    int            `json:"id"`
		}
		if err := json.Unmarshal(data, &in); err != nil || in.Image == nil {
			return nil, fmt.Errorf("plot target: the data must be {image, id}")
		}
		var t *plot.TargetData
		for _, m := range in.Image.Measurements {
			if m.ID == in.ID {
				d := plot.TargetFromMeasurement(m, in.Image)
				t = &d
			}
		}
		if t == nil {
			return nil, fmt.Errorf("plot target: no measurement %d", in.ID)
		}
		if opt.FNumber > 0 {
			t.FNumber = opt.FNumber
		}
		fig = plot.Target(*t, plot.TargetOptions{LPMM: opt.LPMM})
	default:
		return nil, fmt.Errorf("plot: unknown kind %q (field, astigmatism, map, compare, series, target, ca, ca-compare, distortion or falloff)", kind)
	}
	tab := fig.Table()
	rows := make([]any, len(tab.Rows))
	for i, r := range tab.Rows {
		rows[i] = jsStrings(r)
	}
	out := map[string]any{"table": map[string]any{"caption": tab.Caption, "columns": jsStrings(tab.Columns), "rows": rows}}
	switch opt.Format {
	case "", "svg":
		out["svg"] = string(fig.SVG())
	case "png":
		scale := opt.Scale
		if scale == 0 {
			scale = 2
		}
		b, err := fig.PNG(scale)
		if err != nil {
			return nil, err
		}
		u8 := js.Global().Get("Uint8Array").New(len(b))
		js.CopyBytesToJS(u8, b)
		out["png"] = u8
	default:
		return nil, fmt.Errorf("plot: unknown format %q (svg or png)", opt.Format)
	}
	return js.ValueOf(out), nil
}

// caPhoto is one photo's colour fringes for the "ca" and "ca-compare"
// plots.
type caPhoto struct {
	Label     string             `json:"label"`
	LateralCA *analyze.LateralCA `json:"lateral_ca"`
	CornerMM  float64            `json:"corner_mm"`
}

// paletteJS returns the project's colours (core/plot) as CSS hex strings, so
// that the page draws with the same visual code as the plots:
//
//	sagittaPalette() -> {sagittal, tangential, mixed, photos [...], scale [33 colours, soft to sharp]}
func paletteJS([]js.Value) (any, error) {
	photos := make([]any, len(plot.PhotoColours))
	for i, c := range plot.PhotoColours {
		photos[i] = hex(c)
	}
	const n = 33
	scale := make([]any, n)
	for i := range scale {
		scale[i] = hex(plot.SharpnessScale.At(float64(i) / (n - 1)))
	}
	return js.ValueOf(map[string]any{
		"sagittal":   hex(plot.SagittalColour),
		"tangential": hex(plot.TangentialColour),
		"mixed":      hex(plot.MixedColour),
		"photos":     photos,
		"scale":      scale,
	}), nil
}

func hex(c color.NRGBA) string { return fmt.Sprintf("#%02x%02x%02x", c.R, c.G, c.B) }

// jsStrings converts a []string for js.ValueOf.
func jsStrings(s []string) []any {
	out := make([]any, len(s))
	for i, v := range s {
		out[i] = v
	}
	return out
}

// geometryPlot draws the distortion or light fall-off of one photo, or
// their comparison across photos.
func geometryPlot(kind string, data []byte, opt plotOptions) (*plot.Figure, error) {
	var in struct {
		Image  *analyze.Image `json:"image"`
		Photos []struct {
			Label      string              `json:"label"`
			Distortion *analyze.Distortion `json:"distortion"`
			Falloff    *analyze.Falloff    `json:"falloff"`
		} `json:"photos"`
	}
	if err := json.Unmarshal(data, &in); err != nil {
		return nil, fmt.Errorf("plot %s: %v", kind, err)
	}
	if in.Image != nil {
		if kind == "distortion" {
			return plot.Distortion(in.Image.Distortion, opt.Label), nil
		}
		return plot.Falloff(in.Image, opt.Label), nil
	}
	if in.Photos == nil {
		return nil, fmt.Errorf("plot %s: the data must be {image} or {photos}", kind)
	}
	photos := make([]plot.GeometryPhoto, len(in.Photos))
	for i, p := range in.Photos {
		photos[i] = plot.GeometryPhoto{Label: p.Label, Distortion: p.Distortion, Falloff: p.Falloff}
	}
	if kind == "distortion" {
		return plot.CompareDistortion(photos), nil
	}
	return plot.CompareFalloff(photos), nil
}
