package falloff

import (
	"math"
	"slices"
	"testing"

	"sagitta/core/note"
)

// patches returns patches on a 13 x 9 grid over a 1500 x 1000 frame (not
// reaching its corners, as on a chart) lit by level(x, y).
func patches(level func(x, y float64) float64) []Patch {
	var ps []Patch
	for j := range 9 {
		for i := range 13 {
			x, y := 40+float64(i)*118, 40+float64(j)*115
			ps = append(ps, Patch{XPx: x, YPx: y, Level: level(x, y)})
		}
	}
	return ps
}

// TestCos4: the cosine-fourth law, E = E0 cos^4(theta) (W. J. Smith,
// Modern Optical Engineering, 4th ed., section 10.9, chapter from memory),
// tan(theta) = r / f, is reproduced within 0.01 EV from the centre to the
// frame's corner, for an exit pupil one and two half-diagonals away; the
// curve extrapolates from the last patch (s = 0.93) to the corner.
func TestCos4(t *testing.T) {
	fr := Frame{W: 1500, H: 1000, CentreX: 750, CentreY: 500}
	R := math.Hypot(1500, 1000) / 2
	for _, f := range []float64{R, 2 * R} {
		law := func(r float64) float64 { return 4 * math.Log2(math.Cos(math.Atan(r/f))) }
		res, err := Measure(patches(func(x, y float64) float64 { return 0.6 * math.Exp2(law(math.Hypot(x-750, y-500))) }), fr, 24)
		if err != nil {
			t.Fatal(err)
		}
		worst := 0.0
		for i, s := range res.HeightS {
			worst = math.Max(worst, math.Abs(res.EV[i]-law(s*R)))
		}
		t.Logf("f = %.0f px: corner %.4f EV (law %.4f), worst %.4f EV", f, res.CornerEV, law(R), worst)
		if worst > 0.01 {
			t.Errorf("f = %.0f px: off the law by %.4f EV", f, worst)
		}
		if len(res.Cautions) != 1 || res.Cautions[0].Code != note.FalloffLighting {
			t.Errorf("cautions %v, want the lighting caution alone", res.Cautions)
		}
	}
}

// TestUnevenAndClipped: light falling off by 0.3 EV from left to right is
// called uneven; patches at the file's limit are left out and said so;
// too few patches give ErrFewPatches.
func TestUnevenAndClipped(t *testing.T) {
	fr := Frame{W: 1500, H: 1000, CentreX: 750, CentreY: 500}
	res, err := Measure(patches(func(x, y float64) float64 { return 0.5 * math.Exp2(-0.3*x/1500) }), fr, 24)
	if err != nil {
		t.Fatal(err)
	}
	codes := func(ns []note.Note) []note.Code {
		var out []note.Code
		for _, n := range ns {
			out = append(out, n.Code)
		}
		return out
	}
	if !slices.Contains(codes(res.Cautions), note.FalloffUneven) {
		t.Errorf("gradient: uneven %.3f EV, cautions %v", res.Uneven, codes(res.Cautions))
	}
	res, err = Measure(patches(func(x, y float64) float64 { return math.Min(1, 1.2-0.3*math.Hypot(x-750, y-500)/900) }), fr, 24)
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Contains(codes(res.Cautions), note.FalloffClipped) || slices.Contains(codes(res.Cautions), note.FalloffUneven) {
		t.Errorf("clipped centre: cautions %v", codes(res.Cautions))
	}
	if _, err := Measure(patches(func(x, y float64) float64 { return 0.5 })[:MinPatches-1], fr, 24); err != ErrFewPatches {
		t.Errorf("%d patches: %v", MinPatches-1, err)
	}
}
