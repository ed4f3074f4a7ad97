package plot

import (
	"math"
	"slices"
	"testing"
)

// TestNiceNum: the nice numbers are 1, 2 and 5 times powers of ten
// (Heckbert 1990), the smallest not below the input.
func TestNiceNum(t *testing.T) {
	for _, tc := range []struct {
		in, want float64
	}{{0.7, 1}, {1, 1}, {1.2, 2}, {3, 5}, {21.63, 50}, {6, 10}, {0.013, 0.02}, {500, 500}} {
		if got := niceNum(tc.in); math.Abs(got-tc.want) > 1e-12*tc.want {
			t.Errorf("niceNum(%g) = %g, want %g", tc.in, got, tc.want)
		}
	}
}

func TestNiceTicks(t *testing.T) {
	for _, tc := range []struct {
		name   string
		lo, hi float64
		want   int
		ticks  []float64
		labels []string
	}{
		// A full-frame field curve axis ends at the corner, 21.63 mm.
		{"full frame heights", 0, 21.63, 5, []float64{0, 5, 10, 15, 20}, []string{"0", "5", "10", "15", "20"}},
		{"MTF", 0, 1, 6, []float64{0, 0.2, 0.4, 0.6, 0.8, 1}, []string{"0.0", "0.2", "0.4", "0.6", "0.8", "1.0"}},
		{"profile", -12, 12, 3, []float64{-10, 0, 10}, []string{"-10", "0", "10"}},
		{"gap", -0.3, 0.3, 5, []float64{-0.3, -0.2, -0.1, 0, 0.1, 0.2, 0.3}, []string{"-0.3", "-0.2", "-0.1", "0.0", "0.1", "0.2", "0.3"}},
		{"quarter steps", 0, 1, 3, []float64{0, 0.5, 1}, []string{"0.0", "0.5", "1.0"}},
		{"small sensor", 0, 4.33, 5, []float64{0, 1, 2, 3, 4}, []string{"0", "1", "2", "3", "4"}},
	} {
		got, step := niceTicks(tc.lo, tc.hi, tc.want)
		if !slices.EqualFunc(got, tc.ticks, func(a, b float64) bool { return math.Abs(a-b) < 1e-9 }) {
			t.Errorf("%s: ticks %v, want %v", tc.name, got, tc.ticks)
			continue
		}
		for i, v := range got {
			if l := tickLabel(v, step); l != tc.labels[i] {
				t.Errorf("%s: label %q, want %q", tc.name, l, tc.labels[i])
			}
		}
	}
	if got, _ := niceTicks(1, 1, 5); got != nil {
		t.Errorf("empty range gave ticks %v", got)
	}
}

// TestClipSegment checks Liang-Barsky clipping against intersections
// worked out by hand.
func TestClipSegment(t *testing.T) {
	r := box{0, 0, 10, 10}
	for _, tc := range []struct {
		name   string
		in     [4]float64
		want   [4]float64
		inside bool
	}{
		{"inside", [4]float64{1, 1, 9, 9}, [4]float64{1, 1, 9, 9}, true},
		{"crosses right", [4]float64{5, 5, 15, 5}, [4]float64{5, 5, 10, 5}, true},
		{"diagonal through", [4]float64{-5, 5, 5, -5}, [4]float64{0, 0, 0, 0}, true},
		{"both ends out", [4]float64{-2, 4, 12, 11}, [4]float64{0, 5, 10, 10}, true},
		{"outside", [4]float64{11, 0, 20, 5}, [4]float64{}, false},
		{"parallel outside", [4]float64{0, -1, 10, -1}, [4]float64{}, false},
	} {
		ax, ay, bx, by, ok := clipSegment(tc.in[0], tc.in[1], tc.in[2], tc.in[3], r)
		if ok != tc.inside {
			t.Errorf("%s: inside %v, want %v", tc.name, ok, tc.inside)
			continue
		}
		if ok {
			got := [4]float64{ax, ay, bx, by}
			for i := range got {
				if math.Abs(got[i]-tc.want[i]) > 1e-12 {
					t.Errorf("%s: %v, want %v", tc.name, got, tc.want)
					break
				}
			}
		}
	}
}

// TestClipPolygon: a 20 x 20 square centred on a 10 x 10 box clips to the
// box (area 100); a triangle half outside keeps the part inside.
func TestClipPolygon(t *testing.T) {
	area := func(p []pt) float64 {
		var a float64
		for i := range p {
			q := p[(i+1)%len(p)]
			a += p[i].x*q.y - q.x*p[i].y
		}
		return math.Abs(a) / 2
	}
	r := box{0, 0, 10, 10}
	if a := area(clipPolygon([]pt{{-5, -5}, {15, -5}, {15, 15}, {-5, 15}}, r)); math.Abs(a-100) > 1e-9 {
		t.Errorf("square: area %g, want 100", a)
	}
	// Triangle (0,0) (20,0) (0,10) cut at x = 10: the part inside is a
	// trapezoid with parallel sides 10 and 5, width 10: area 75.
	if a := area(clipPolygon([]pt{{0, 0}, {20, 0}, {0, 10}}, r)); math.Abs(a-75) > 1e-9 {
		t.Errorf("triangle: area %g, want 75", a)
	}
	if p := clipPolygon([]pt{{20, 20}, {30, 20}, {30, 30}}, r); len(p) != 0 {
		t.Errorf("outside: %v", p)
	}
}
