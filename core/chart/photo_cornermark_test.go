package chart

import "testing"

// TestOnCornerMark: the frame's corner marks (an L of 0.3 mm lines 1.65 mm
// outside each corner, arms 6 mm; layout.go) are recognised as such, and
// nothing inside the frame is.
func TestOnCornerMark(t *testing.T) {
	d, err := NewDesign(Code{Aspect: "3:2"})
	if err != nil {
		t.Fatal(err)
	}
	s := 2000.0 // px per chart unit
	hm := Homography{s, 0, 1600, 0, s, 1100, 0, 0, 1}
	inv, _ := hm.Inverse()
	ps := &Pose{Design: d, H: hm, Inv: inv, W: 3200, Hpx: 2200}
	chartMM := 160.0
	mm := 1 / chartMM // chart units per mm
	off := (CornerOffMM + CornerWidthMM/2) * mm
	for _, c := range []struct {
		u, v float64
		want bool
	}{
		{d.W/2 + off, -d.H/2 - off, true},                    // the vertex of the top-right L
		{d.W/2 - 3*mm, -d.H/2 - off, true},                   // along its horizontal arm
		{-d.W/2 - off, d.H/2 - 5*mm, true},                   // along the bottom-left vertical arm
		{d.W/2 - 3*mm, -d.H/2 + 3*mm, false},                 // inside the frame, near the corner
		{0, -d.H/2 - off, false},                             // outside the frame, mid-side
		{d.W/2 + 20*mm, -d.H/2 - 20*mm, false},               // far beyond the corner
		{-d.W/2 + 0.2*d.W, d.H/2 + off, false},               // outside, along the bottom, away from corners
		{d.Wedge.X, d.Wedge.Y, false},                        // the step wedge
		{d.Squares[0].X, d.Squares[0].Y, false},              // a square
		{-d.W/2 - off, -d.H/2 - off + CornerMarkMM*mm, true}, // the end of an arm
		{-d.W/2 - off, -d.H/2 + CornerMarkMM*mm/2, true},     // an arm beside the frame
	} {
		x, y := hm.Apply(c.u, c.v)
		if got := ps.OnCornerMark(x, y, chartMM); got != c.want {
			t.Errorf("(%.4f, %.4f): OnCornerMark %v, want %v", c.u, c.v, got, c.want)
		}
	}
	if ps.OnCornerMark(1600+s*(d.W/2+off), 1100-s*(d.H/2+off), 0) {
		t.Error("an unknown chart size must not match")
	}
}
