package draw

import (
	"fmt"
	"math"
	"strings"
	"testing"
)

// dump lists the verbs of p as walk sees them, e.g. "M0,0 L1,0 Z".
func dump(p *Path) string {
	var parts []string
	p.walk(func(v verb, xy []float64) {
		s := string("MLCZ"[v])
		for i := 0; i+1 < len(xy); i += 2 {
			if i > 0 {
				s += ";"
			}
			s += fmt.Sprintf("%g,%g", xy[i], xy[i+1])
		}
		parts = append(parts, s)
	})
	return strings.Join(parts, " ")
}

// Path construction follows the SVG rules (SVG 1.1 §8.3.3): a segment after
// Close starts a new subpath at the closed subpath's start; a segment with
// no current point starts one at its own end point.
func TestPathNormalisation(t *testing.T) {
	tests := []struct {
		name  string
		build func(p *Path)
		want  string
	}{
		{"line without move", func(p *Path) { p.LineTo(1, 2); p.LineTo(3, 4) }, "M1,2 L1,2 L3,4"},
		{"segment after close", func(p *Path) {
			p.MoveTo(0, 0)
			p.LineTo(5, 0)
			p.Close()
			p.LineTo(0, 5)
		}, "M0,0 L5,0 Z M0,0 L0,5"},
		{"close twice and close of a bare move", func(p *Path) {
			p.MoveTo(0, 0)
			p.Close()
			p.LineTo(1, 0)
			p.Close()
			p.Close()
		}, "M0,0 L1,0 Z"},
		{"lone moves dropped", func(p *Path) { p.MoveTo(1, 1); p.MoveTo(2, 2); p.LineTo(3, 3); p.MoveTo(9, 9) }, "M2,2 L3,3"},
		{"NaN subpath dropped", func(p *Path) {
			p.MoveTo(0, 0)
			p.LineTo(math.NaN(), 1)
			p.MoveTo(1, 1)
			p.LineTo(2, 2)
		}, "M1,1 L2,2"},
		{"far subpath dropped", func(p *Path) {
			p.MoveTo(0, 0)
			p.CubicTo(1, 1, 2e9, 2, 3, 3)
			p.MoveTo(1, 1)
			p.LineTo(2, 2)
		}, "M1,1 L2,2"},
		{"rect", func(p *Path) { p.Rect(1, 2, 3, 4) }, "M1,2 L4,2 L4,6 L1,6 Z"},
		{"polygon with odd coordinate", func(p *Path) { p.Polygon(0, 0, 1, 0, 1, 1, 7) }, "M0,0 L1,0 L1,1 Z"},
	}
	for _, tc := range tests {
		var p Path
		tc.build(&p)
		if got := dump(&p); got != tc.want {
			t.Errorf("%s: %s, want %s", tc.name, got, tc.want)
		}
	}
	var p Path
	p.Rect(0, 0, 1, 1)
	p.Reset()
	if !p.Empty() || dump(&p) != "" {
		t.Error("Reset left segments")
	}
	p.MoveTo(1, 1)
	if !p.Empty() {
		t.Error("a lone MoveTo is not empty")
	}
}

// The four-cubic circle with control distance k = 4/3 (sqrt 2 - 1) passes
// through the circle at the ends and middle of each quarter and lies
// outside it in between, by at most 0.027 % of the radius (a standard
// result for this construction, from memory). Sampling every quarter
// finds that maximum.
func TestCircleAccuracy(t *testing.T) {
	var p Path
	p.Circle(3, -2, 10)
	maxErr := 0.0
	var x0, y0 float64
	p.walk(func(v verb, c []float64) {
		switch v {
		case moveTo:
			x0, y0 = c[0], c[1]
		case cubicTo:
			for i := 0; i <= 1000; i++ {
				s := float64(i) / 1000
				u := 1 - s
				x := u*u*u*x0 + 3*u*u*s*c[0] + 3*u*s*s*c[2] + s*s*s*c[4]
				y := u*u*u*y0 + 3*u*u*s*c[1] + 3*u*s*s*c[3] + s*s*s*c[5]
				maxErr = math.Max(maxErr, math.Abs(math.Hypot(x-3, y+2)-10)/10)
			}
			x0, y0 = c[4], c[5]
		}
	})
	if maxErr > 0.00028 || maxErr < 0.00026 {
		t.Errorf("largest radial error %.5f %%, want 0.027 %%", 100*maxErr)
	}
}
