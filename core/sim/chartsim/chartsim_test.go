package chartsim_test

import (
	"math"
	"testing"

	"sagitta/core/chart"
	"sagitta/core/sim/chartsim"
)

// TestViewHomography checks View.Homography against the camera it stands
// for, projecting chart points directly: a chart point (X, Y) is the 3D
// point X r_right + Y r_down on a plane through (0, 0, z), turned by the
// view's angles, and images at (f x / z + cx, f y / z + cy) (the pinhole
// camera, Hartley and Zisserman, 2nd ed., section 6.1). The rotations are
// built here independently, one elementary turn at a time, as the view
// documents them: pitch about the chart's horizontal axis (bottom away),
// then yaw about its vertical axis (right side away), then roll about the
// optical axis (from +x towards +y).
func TestViewHomography(t *testing.T) {
	d, _ := chart.NewDesign(chart.Code{Aspect: "3:2"})
	for _, v := range []chartsim.View{
		{W: 1200, H: 800, Fill: 0.9, RollDeg: 7, YawDeg: 12, PitchDeg: -5, FocalPx: 2500, ShiftX: 30, ShiftY: -20},
		{W: 900, H: 600, RollDeg: 180, YawDeg: -20, FocalPx: 900},
	} {
		scale := v.Fill
		if scale == 0 {
			scale = 1
		}
		scale *= math.Min(float64(v.W)/d.W, float64(v.H)/d.H)
		z := v.FocalPx / scale
		h := v.Homography(d)
		for _, p := range [][2]float64{{0, 0}, {0.7, -0.4}, {-0.6, 0.45}, {0.1, 0.3}} {
			x, y, zz := p[0], p[1], 0.0
			// Pitch: the bottom (y > 0) moves away (z grows).
			s, c := math.Sincos(v.PitchDeg * math.Pi / 180)
			y, zz = c*y, s*p[1]
			// Yaw: the right side (x > 0) moves away.
			s, c = math.Sincos(v.YawDeg * math.Pi / 180)
			x, zz = c*x-s*zz, s*x+c*zz
			// Roll: from +x towards +y.
			s, c = math.Sincos(v.RollDeg * math.Pi / 180)
			x, y = c*x-s*y, s*x+c*y
			zz += z
			wantX := v.FocalPx*x/zz + float64(v.W)/2 + v.ShiftX
			wantY := v.FocalPx*y/zz + float64(v.H)/2 + v.ShiftY
			gx, gy := h.Apply(p[0], p[1])
			if math.Hypot(gx-wantX, gy-wantY) > 1e-9 {
				t.Errorf("view %+v: (%g, %g) maps to (%.6f, %.6f), pinhole (%.6f, %.6f)", v, p[0], p[1], gx, gy, wantX, wantY)
			}
		}
		// Right side away for positive yaw: it images smaller.
		if v.YawDeg > 0 {
			jl, jr := h.Jacobian(-0.7, 0), h.Jacobian(0.7, 0)
			if !(jl[1][1] > jr[1][1]) {
				t.Errorf("positive yaw: the right side is not the smaller")
			}
		}
	}
}

// TestSceneTargets checks the scene's counts and that a view without
// perspective keeps the sine patterns' geometry: a star's radius and a
// grating's frequency scale with the view, and the patterns' phase follows
// the chart (the grating's cosine peaks at its centre).
func TestSceneTargets(t *testing.T) {
	d, _ := chart.NewDesign(chart.Code{Aspect: "4:3"})
	v := chartsim.View{W: 800, H: 600, Fill: 1, RollDeg: 30}
	s := chartsim.Scene(d, v.Homography(d), chartsim.Print{Paper: 0.9, Dark: 0.25})
	if err := s.Validate(); err != nil {
		t.Fatal(err)
	}
	if len(s.Stars) != len(d.Stars) || len(s.Gratings) != len(d.Gratings) {
		t.Fatalf("%d stars, %d gratings; want %d, %d", len(s.Stars), len(s.Gratings), len(d.Stars), len(d.Gratings))
	}
	scale := 600.0 // px per chart unit: the 4:3 chart's short side fills 600 px
	for i, st := range s.Stars {
		if math.Abs(st.Radius-d.Stars[i].Radius*scale) > 1e-9 {
			t.Errorf("star %d radius %g px, want %g", i, st.Radius, d.Stars[i].Radius*scale)
		}
		if math.Abs(st.Mean-0.9*1.25/2) > 1e-12 || math.Abs(st.Amplitude-0.9*0.75/2) > 1e-12 {
			t.Errorf("star %d mean %g amplitude %g", i, st.Mean, st.Amplitude)
		}
	}
	for i, g := range s.Gratings {
		dg := d.Gratings[i]
		if math.Abs(g.FreqCyPx-dg.FreqPerUnit/scale) > 1e-12 {
			t.Errorf("grating %d: %g cy/px, want %g", i, g.FreqCyPx, dg.FreqPerUnit/scale)
		}
		cx, cy := v.Homography(d).Apply(dg.X, dg.Y)
		a := g.DirectionDeg * math.Pi / 180
		ph := 2*math.Pi*g.FreqCyPx*(cx*math.Cos(a)+cy*math.Sin(a)) + g.PhaseDeg*math.Pi/180
		if math.Abs(math.Cos(ph)-1) > 1e-9 {
			t.Errorf("grating %d: cos at the centre is %g, want 1", i, math.Cos(ph))
		}
	}
}
