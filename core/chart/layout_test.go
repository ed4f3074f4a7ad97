package chart

import (
	"math"
	"strings"
	"testing"

	"sagitta/core/draw"
)

// TestLayoutFits places the chart on every sheet, in both orientations, at
// every aspect ratio, with and without a scale correction, and checks in the
// file's coordinates that the frame with its corner marks, the rulers and
// every line of text lie inside the margins, that the strip lies below the
// frame without touching its corner marks, and that the ruler and the text
// do not overlap.
func TestLayoutFits(t *testing.T) {
	type box struct{ x0, y0, x1, y1 float64 }
	for _, paper := range PaperNames() {
		for _, orient := range []string{"landscape", "portrait"} {
			for _, a := range aspects {
				for _, ruler := range []float64{0, 97, 103} {
					opt := Options{Paper: paper, Orientation: orient, Aspect: a.name, RulerMM: ruler}
					l, err := NewLayout(opt)
					if err != nil {
						t.Errorf("%+v: %v", opt, err)
						continue
					}
					file := func(b box) box {
						x0, y0 := l.FileXY(b.x0, b.y0)
						x1, y1 := l.FileXY(b.x1, b.y1)
						return box{x0, y0, x1, y1}
					}
					w, h := l.ChartMM()
					out := cornerOffMM + cornerWidthMM
					frame := box{l.CentreMM[0] - w/2 - out, l.CentreMM[1] - h/2 - out, l.CentreMM[0] + w/2 + out, l.CentreMM[1] + h/2 + out}
					r := box{l.RulerMM0[0] - 1, l.RulerMM0[1] - RulerTickMM, l.RulerMM0[0] - 1 + rulerWidthMM, l.RulerMM0[1] - RulerTickMM + rulerHeightMM}
					tw := 0.0
					for _, s := range l.Lines {
						tw = math.Max(tw, draw.TextWidth(s, draw.TextStyle{Size: l.TextSizeMM, Bold: true}))
					}
					text := box{l.TextAt[0], l.TextAt[1] - l.TextSizeMM, l.TextAt[0] + tw, l.TextAt[1] + float64(len(l.Lines)-1)*lineStepMM + 0.3*l.TextSizeMM}
					const m, eps = DefaultMarginMM, 1e-9
					for name, b := range map[string]box{"frame": frame, "ruler": r, "text": text} {
						f := file(b)
						if f.x0 < m-eps || f.y0 < m-eps || f.x1 > l.PageW-m+eps || f.y1 > l.PageH-m+eps {
							t.Errorf("%+v: %s [%.1f %.1f %.1f %.1f] leaves the %g mm margins of %g x %g", opt, name, f.x0, f.y0, f.x1, f.y1, float64(m), l.PageW, l.PageH)
						}
					}
					if r.y0 < frame.y1 || text.y0 < frame.y1 {
						t.Errorf("%+v: the strip reaches into the frame", opt)
					}
					if !(r.x1 <= text.x0 || r.y1 <= text.y0) {
						t.Errorf("%+v: ruler [%.1f..%.1f] and text [%.1f..%.1f] overlap", opt, r.x0, r.x1, text.x0, text.x1)
					}
				}
			}
		}
	}
}

// TestNotes: at 300 dpi on A4 (chart short side 164.9 mm) the 720-cycle
// grating has 164.9 / 720 / (25.4 / 300) = 2.7 dots per cycle, fewer than
// printLimitDots, and is named; the 360-cycle one has 5.4 and is not; at
// 600 dpi nothing is named.
func TestNotes(t *testing.T) {
	l, err := NewLayout(Options{DPI: 300})
	if err != nil {
		t.Fatal(err)
	}
	n := l.Notes()
	if len(n) != 1 || !strings.Contains(n[0], "720-cycle") {
		t.Errorf("notes at 300 dpi: %q (unit %.2f mm)", n, l.UnitMM)
	}
	if l, _ = NewLayout(Options{DPI: 600}); len(l.Notes()) != 0 {
		t.Errorf("notes at 600 dpi: %q", l.Notes())
	}
}
