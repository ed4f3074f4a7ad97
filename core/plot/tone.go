package plot

import (
	"fmt"

	"sagitta/core/analyze"
)

// ToneCurve plots the tone curve fitted to the chart's grey steps
// (analyze.ToneFit): the decoded value relative to the paper against the
// linear reflectance it stands for, the steps as measured, and the line a
// photo that matches its decoding tone would follow (reflectance equal to
// the decoded value).
func ToneCurve(tf *analyze.ToneFit, label string) *Figure {
	f := &Figure{Title: "Tone curve from the chart's grey steps: " + label, Width: 620, Height: 460}
	f.Data = Table{Caption: "Grey steps and fitted tone curve of " + label, Columns: []string{"Curve", "Decoded, relative to paper", "Reflectance"}}
	p := &Panel{
		X: Axis{Title: "Decoded value, relative to the paper", Min: 0, Max: 1.1},
		Y: Axis{Title: "Reflectance, relative to the paper", Min: 0, Max: 1.1},
	}
	var cx, cy []float64
	for _, c := range tf.Curve {
		cx, cy = append(cx, c[0]), append(cy, c[1])
		f.Data.Rows = append(f.Data.Rows, []string{"Fitted curve", cell(c[0], 3), cell(c[1], 4)})
	}
	var sx, sy []float64
	for _, s := range tf.Steps {
		sx, sy = append(sx, s.Measured), append(sy, s.Reflectance)
		f.Data.Rows = append(f.Data.Rows, []string{"Grey step", cell(s.Measured, 4), cell(s.Reflectance, 4)})
	}
	p.Series = []Series{
		{Name: "As decoded", X: []float64{0, 1.1}, Y: []float64{0, 1.1}, Colour: ReferenceColour, Width: 1.4, Dash: referenceDash},
		{Name: "Fitted curve", X: cx, Y: cy, Colour: InkColour, Width: 1.8},
		{Name: "Grey steps", X: sx, Y: sy, Colour: InkColour, Marker: Square, MarkerSize: 4},
	}
	f.Panels = []*Panel{p}
	f.Legend = []LegendEntry{
		{Label: "Grey steps (measured)", Colour: InkColour, Marker: Square},
		{Label: "Fitted curve", Colour: InkColour, Width: 1.8},
		{Label: "Decoding tone taken as right", Colour: ReferenceColour, Width: 1.4, Dash: referenceDash},
	}
	used := "not applied: the tone was chosen in the settings"
	if tf.Applied {
		used = "the photo was linearised with it"
	}
	f.Notes = []string{fmt.Sprintf("Largest difference from the decoding tone: %s in reflectance; %s.", cell(tf.MaxDiff, 3), used)}
	f.Description = "The photo's tone curve read from the chart's 12 grey steps, against the decoding tone."
	return f
}
