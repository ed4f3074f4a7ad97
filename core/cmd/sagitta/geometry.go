package main

import (
	"fmt"
	"io"

	"sagitta/core/analyze"
	"sagitta/core/plot"
)

// writeGeometryText prints a photo's distortion and light fall-off, or why
// they were not measured, with their cautions.
func writeGeometryText(w io.Writer, img *analyze.Image) {
	if d := img.Distortion; d != nil {
		if d.Measured {
			fmt.Fprintf(w, "distortion: %s, %s %% at the corner, %s %% at the end of the long side (%d chart targets, %s px rms about the curve)\n",
				d.Kind, fix(d.CornerPct, 2), fix(d.LongEdgePct, 2), d.Points, fix(d.ResidualPx, 2))
			fmt.Fprintln(w, d.Text)
			for _, c := range d.Cautions {
				fmt.Fprintln(w, "note: "+c)
			}
		} else {
			fmt.Fprintln(w, "distortion: "+d.Reason)
		}
	}
	if f := img.Falloff; f != nil {
		if f.Measured {
			fmt.Fprintf(w, "light fall-off: %s EV at the corner, %s EV at the end of the long side (%d patches of paper, %s EV rms about the curve)\n",
				fix(f.CornerEV, 2), fix(f.LongEdgeEV, 2), f.Points, fix(f.ResidualEV, 3))
			for _, c := range f.Cautions {
				fmt.Fprintln(w, "note: "+c)
			}
		} else {
			fmt.Fprintln(w, "light fall-off: "+f.Reason)
		}
	}
}

// geometryFigures returns a photo's distortion and light fall-off plots,
// where they were measured.
func geometryFigures(img *analyze.Image) []namedFigure {
	var out []namedFigure
	if d := img.Distortion; d != nil && d.Measured {
		out = append(out, namedFigure{"distortion", plot.Distortion(d, img.File)})
	}
	if f := img.Falloff; f != nil && f.Measured {
		out = append(out, namedFigure{"light-fall-off", plot.Falloff(img, img.File)})
	}
	return out
}

// geometryPhoto returns a photo's distortion and fall-off for a
// comparison, and whether either was measured.
func geometryPhoto(img *analyze.Image) (plot.GeometryPhoto, bool) {
	p := plot.GeometryPhoto{Label: img.File, Distortion: img.Distortion, Falloff: img.Falloff}
	return p, img.Distortion != nil && img.Distortion.Measured || img.Falloff != nil && img.Falloff.Measured
}
