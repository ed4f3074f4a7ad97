package analyze

import (
	"context"
	"math"
	"testing"

	"sagitta/core/field"
	"sagitta/core/sim/demo"
	"sagitta/core/sim/simcam"
)

// side is one straight side of a square in the simulated sheet.
type side struct {
	x0, y0, x1, y1 float64
	found          bool
}

func sidesOf(s simcam.Scene) []*side {
	var out []*side
	for _, p := range s.Polygons {
		for i := range p.Pts {
			a, b := p.Pts[i], p.Pts[(i+1)%len(p.Pts)]
			out = append(out, &side{x0: a[0], y0: a[1], x1: b[0], y1: b[1]})
		}
	}
	return out
}

// match returns the side a measurement lies on: within 3 px of its line,
// inside its length, with the normal perpendicular to it within 2 degrees.
func match(sides []*side, m Measurement) *side {
	for _, s := range sides {
		dx, dy := s.x1-s.x0, s.y1-s.y0
		l := math.Hypot(dx, dy)
		tx, ty := dx/l, dy/l
		u := (m.XPx-s.x0)*tx + (m.YPx-s.y0)*ty
		d := math.Abs(-(m.XPx-s.x0)*ty + (m.YPx-s.y0)*tx)
		if d > 3 || u < 0 || u > l {
			continue
		}
		nx, ny := math.Cos(m.NormalDeg*math.Pi/180), math.Sin(m.NormalDeg*math.Pi/180)
		if math.Abs(nx*tx+ny*ty) > math.Sin(2*math.Pi/180) {
			continue
		}
		return s
	}
	return nil
}

// TestWholePhoto checks the whole-photo analysis of the demo scenario: a
// simulated full-frame camera whose lens PSF is an anisotropic Gaussian,
// tangential and sagittal widths growing differently with image height,
// with photon noise and JPEG compression. The truth at every edge is the
// analytic system MTF of the simulation (simcam.TrueMTF: Gaussian OTF x
// pixel aperture; Goodman ch. 6, Boreman ch. 2).
func TestWholePhoto(t *testing.T) {
	reduce := 1
	if testing.Short() {
		reduce = 2
	}
	sc := demo.PortraitSmall(reduce)
	photo, err := sc.SquaresPhoto()
	if err != nil {
		t.Fatal(err)
	}
	img, err := Run(context.Background(), "demo.jpg", photo, Settings{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if img.PitchSource != "Exif focal-plane resolution" || math.Abs(img.PitchUM-sc.PitchUM) > 1e-6 {
		t.Errorf("pitch %g from %q, want %g from Exif", img.PitchUM, img.PitchSource, sc.PitchUM)
	}
	sides := sidesOf(sc.Sheet())
	geo := field.NewGeometry(sc.W, sc.H, sc.PitchUM)
	var falseEdges, clear, clearRight int
	var worst [2]float64
	for _, m := range img.Measurements {
		s := match(sides, m)
		if s == nil {
			falseEdges++
			t.Errorf("measurement %d at (%.0f, %.0f) normal %.1f matches no side", m.ID, m.XPx, m.YPx, m.NormalDeg)
			continue
		}
		s.found = true
		// Orientation against the truth: the side's normal against the
		// radius at the measurement, clear cases only (within 10 degrees).
		_, ang := geo.Classify(m.XPx, m.YPx, m.NormalDeg)
		want := field.Mixed
		switch {
		case ang < 10:
			want = field.Tangential
		case ang > 80:
			want = field.Sagittal
		}
		if want != field.Mixed {
			clear++
			if m.Orientation == want {
				clearRight++
			}
		}
		for k, lpmm := range img.FreqsLPMM {
			f := lpmm * sc.PitchUM / 1000
			truth := simcam.TrueMTF(sc.Lens, m.XPx, m.YPx, m.NormalDeg, f)
			e := math.Abs(float64(m.MTFAtFreqs[k]) - truth)
			worst[k] = math.Max(worst[k], e)
			// README: largest error 0.004 at 10 and 0.008 at 30 lp/mm on
			// the 24 MP photo; asserted at twice that. The -short run's
			// 6 MP photo (pixels twice as large, so 30 lp/mm is twice the
			// cycles/pixel, where JPEG and noise weigh more) measured 0.007
			// and 0.037: asserted at 0.014 and 0.05.
			lim := 2 * []float64{0.004, 0.008}[k]
			if testing.Short() {
				lim = []float64{0.014, 0.05}[k]
			}
			if e > lim {
				t.Errorf("edge %d at h %.1f mm: MTF at %g lp/mm %.4f, truth %.4f (limit %.3f)", m.ID, m.HeightMM, lpmm, float64(m.MTFAtFreqs[k]), truth, lim)
			}
		}
	}
	found := 0
	for _, s := range sides {
		if s.found {
			found++
		}
	}
	recall := float64(found) / float64(len(sides))
	t.Logf("%d x %d px: %d measurements, %d set aside; recall %d/%d = %.1f %%; false edges %d; orientation right %d/%d; worst MTF error %.3f at %g lp/mm, %.3f at %g lp/mm",
		sc.W, sc.H, len(img.Measurements), len(img.Rejected), found, len(sides), 100*recall, falseEdges,
		clearRight, clear, worst[0], img.FreqsLPMM[0], worst[1], img.FreqsLPMM[1])
	// README: all 216 square sides found and the orientation right for
	// every clearly sagittal or tangential region (measured so at both sizes).
	if found != len(sides) {
		t.Errorf("recall %d/%d: README says every side is found", found, len(sides))
	}
	if clear == 0 || clearRight != clear {
		t.Errorf("orientation right for %d of %d clear edges", clearRight, clear)
	}
	// Corner radius of a 36 x 24 mm sensor: sqrt(18^2 + 12^2) = 21.63 mm
	// (common practice).
	if math.Abs(img.CornerMM-21.633) > 0.01 {
		t.Errorf("corner radius %.3f mm, want 21.63", img.CornerMM)
	}
}
