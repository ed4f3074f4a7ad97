package chart

import (
	"strings"
	"testing"
)

// TestPastLimit: a failed check never shows the limit itself (issue 18
// item 8: "fills only 85 %" was printed for 84.6 % against 85 %).
func TestPastLimit(t *testing.T) {
	for _, c := range []struct {
		v, limit float64
		want     string
	}{
		{84.6, 85, "84.6"},
		{84.96, 85, "84.9"},
		{80.3, 85, "80"},
		{3.02, 3, "3.1"},
		{4.4, 3, "4"},
		{5.3, 5, "5.3"},
		{12.7, 5, "13"},
	} {
		if got := pastLimit(c.v, c.limit); got != c.want {
			t.Errorf("pastLimit(%g, %g) = %q, want %q", c.v, c.limit, got, c.want)
		}
	}
}

// TestCoverWarningBelowLimit: a photo filled to 84.6 % (limit 85 %) is
// warned about with the figure it has, not the limit.
func TestCoverWarningBelowLimit(t *testing.T) {
	d, err := NewDesign(Code{Aspect: "3:2"})
	if err != nil {
		t.Fatal(err)
	}
	// An orthographic pose whose chart frame covers 84.6 % of a 3000 x 2000
	// frame: frame area ratio = fill^2 for a 3:2 chart in a 3:2 photo.
	w, h := 3000.0, 2000.0
	fill := 0.9198 // fill^2 = 0.8460
	s := fill * h / d.H
	hm := Homography{s, 0, w / 2, 0, s, h / 2, 0, 0, 1}
	inv, _ := hm.Inverse()
	ps := &Pose{Design: d, H: hm, Inv: inv, W: int(w), Hpx: int(h)}
	st := ps.Check(0)
	if st.CoverPct >= 85 || st.CoverPct < 84.5 {
		t.Fatalf("cover %.3f %%, want 84.5..85", st.CoverPct)
	}
	found := false
	for _, m := range st.Warnings {
		if strings.Contains(m, "fills only 84.") {
			found = true
		}
		if strings.Contains(m, "fills only 85 ") {
			t.Errorf("warning shows the limit: %q", m)
		}
	}
	if !found {
		t.Errorf("no cover warning with the figure: %q", st.Warnings)
	}
}
