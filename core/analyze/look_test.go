package analyze

import (
	"fmt"
	"image/color"
	"math"
	"os"
	"path/filepath"
	"testing"

	"sagitta/core/draw"
	"sagitta/core/internal/look"
	"sagitta/core/sim/simcam"
)

// TestLookStars is for people, not for the build: with SAGITTA_LOOK set
// it renders the simulated lens of lensScene (plain and sharpened), runs
// the analysis and writes, per photo, the photo and a plot of each star's
// segment curves, its sagittal and tangential curves, the edges of the same
// orientation and the analytic MTF, to look at.
func TestLookStars(t *testing.T) {
	dir := look.Need(t, "analyze")
	lens, sc := lensScene()
	for _, c := range []struct {
		name     string
		sharpen  *simcam.UnsharpMask
		fullWell float64
		jpeg     int
	}{{"plain", nil, 0, 0}, {"sharpened", &simcam.UnsharpMask{Amount: 1.5, RadiusPx: 2}, 0, 0},
		{"noisy-jpeg", &simcam.UnsharpMask{Amount: 0.5, RadiusPx: 1}, 6000, 85}} {
		cam := simcam.Camera{W: 1600, H: 1200, Lens: lens, Encoding: simcam.SRGB8, Sharpen: c.sharpen,
			FullWellE: c.fullWell, Seed: 7, JPEGQuality: c.jpeg}
		img, data := photo(t, cam, sc)
		if err := os.WriteFile(filepath.Join(dir, "stars-"+c.name+".png"), data, 0o644); err != nil {
			t.Fatal(err)
		}
		cv, err := draw.NewRaster(1300, 520, 1, color.RGBAModel)
		if err != nil {
			t.Fatal(err)
		}
		var bg draw.Path
		bg.Rect(0, 0, 1300, 520)
		cv.Path(&bg, draw.Style{Fill: color.White})
		for i, orient := range []string{"tangential", "sagittal"} {
			plotStar(cv, 60+float64(i)*640, 40, 560, 420, img, lens, orient)
		}
		f, err := os.Create(filepath.Join(dir, "stars-"+c.name+"-mtf.png"))
		if err != nil {
			t.Fatal(err)
		}
		if err := draw.EncodePNG(f, cv.Pixels(), 96); err != nil {
			t.Fatal(err)
		}
		f.Close()
		t.Logf("%s: agreement %+v, warnings %q", c.name, img.Agreement, img.Warnings)
		for _, s := range img.Stars {
			t.Logf("  star %d: flags %v, resolved to %.3f cy/px, centre +- %.3f px", s.ID, s.Flags, s.Resolved, s.CentreUncPx)
		}
	}
}

// plotStar draws, in the box (x0, y0, w, h), MTF against cy/px from 0 to
// 0.5: the star's segments (thin, grey), its record of orientation orient
// (thick blue), the edges of that orientation (orange) and the analytic MTF
// at the star (dashed black).
func plotStar(cv draw.Canvas, x0, y0, w, h float64, img *Image, lens simcam.Lens, orient string) {
	const top = 1.4
	px := func(f, v float64) (float64, float64) { return x0 + w*f/0.5, y0 + h*(1-v/top) }
	var p draw.Path
	p.Rect(x0, y0, w, h)
	cv.Path(&p, draw.Style{Stroke: color.Gray{0}, Width: 1})
	for _, v := range []float64{0.25, 0.5, 0.75, 1, 1.25} {
		p.Reset()
		a, b := px(0, v)
		p.MoveTo(a, b)
		a, b = px(0.5, v)
		p.LineTo(a, b)
		cv.Path(&p, draw.Style{Stroke: color.Gray{210}, Width: 1})
		cv.Text(x0-6, b+4, fmt.Sprintf("%.2f", v), draw.TextStyle{Size: 11, Anchor: draw.AnchorEnd})
	}
	for _, f := range []float64{0.1, 0.2, 0.3, 0.4, 0.5} {
		a, b := px(f, 0)
		cv.Text(a, b+16, fmt.Sprintf("%.1f", f), draw.TextStyle{Size: 11, Anchor: draw.AnchorMiddle})
	}
	line := func(fr, v []float64, s draw.Style) {
		p.Reset()
		for i := range fr {
			if fr[i] > 0.5 {
				break
			}
			a, b := px(fr[i], math.Max(0, math.Min(top, v[i])))
			if i == 0 {
				p.MoveTo(a, b)
			} else {
				p.LineTo(a, b)
			}
		}
		cv.Path(&p, s)
	}
	if len(img.Stars) == 0 {
		return
	}
	for _, sg := range img.Stars[0].Segments {
		line(sg.Curve.Freq, sg.Curve.Value, draw.Style{Stroke: color.Gray{150}, Width: 1})
	}
	for _, m := range img.Measurements {
		if m.Kind == "edge" && string(m.Orientation) == orient && len(img.Stars) > 0 &&
			math.Abs(m.HeightMM-img.Stars[0].HeightMM) < 0.5 {
			line(m.Freq, m.MTF, draw.Style{Stroke: color.RGBA{230, 120, 0, 255}, Width: 1.5})
		}
	}
	for _, m := range img.Measurements {
		if m.Kind != "star" || string(m.Orientation) != orient {
			continue
		}
		line(m.Freq, m.MTF, draw.Style{Stroke: color.RGBA{20, 60, 200, 255}, Width: 3})
		var tf, tv []float64
		for f := 0.0; f <= 0.5; f += 0.005 {
			tf = append(tf, f)
			tv = append(tv, simcam.TrueMTF(lens, m.XPx, m.YPx, m.NormalDeg, f))
		}
		line(tf, tv, draw.Style{Stroke: color.Gray{0}, Width: 1.5, Dash: []float64{6, 4}})
		label := fmt.Sprintf("star %s (blue), edges (orange), true (dashed), segments (grey); MTF50 %.3f cy/px", orient, float64(m.MTF50))
		cv.Text(x0, y0-12, label, draw.TextStyle{Size: 12})
	}
}
