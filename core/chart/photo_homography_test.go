package chart

import (
	"math"
	"testing"
)

// heckbert returns the map of the unit square onto the quadrilateral q
// (corners for (0,0), (1,0), (1,1), (0,1)) in the closed form of P. S.
// Heckbert, "Fundamentals of Texture Mapping and Image Warping", UC Berkeley
// (1989), section 2.2.3 (from memory; the test also checks that it maps the
// four corners where they belong).
func heckbert(q [4][2]float64) Homography {
	sx := q[0][0] - q[1][0] + q[2][0] - q[3][0]
	sy := q[0][1] - q[1][1] + q[2][1] - q[3][1]
	dx1, dx2 := q[1][0]-q[2][0], q[3][0]-q[2][0]
	dy1, dy2 := q[1][1]-q[2][1], q[3][1]-q[2][1]
	den := dx1*dy2 - dx2*dy1
	g := (sx*dy2 - dx2*sy) / den
	h := (dx1*sy - sx*dy1) / den
	return Homography{
		q[1][0] - q[0][0] + g*q[1][0], q[3][0] - q[0][0] + h*q[3][0], q[0][0],
		q[1][1] - q[0][1] + g*q[1][1], q[3][1] - q[0][1] + h*q[3][1], q[0][1],
		g, h, 1,
	}
}

func TestFitHomography(t *testing.T) {
	quads := [][4][2]float64{
		{{0, 0}, {2, 0}, {2, 1}, {0, 1}},                         // affine
		{{100, 120}, {900, 80}, {1000, 700}, {50, 650}},          // perspective
		{{3000, 2000}, {3400, 2100}, {3300, 2500}, {2900, 2450}}, // small, far from the origin
	}
	sq := [][2]float64{{0, 0}, {1, 0}, {1, 1}, {0, 1}}
	for i, q := range quads {
		ref := heckbert(q)
		for k, c := range sq {
			x, y := ref.Apply(c[0], c[1])
			if math.Hypot(x-q[k][0], y-q[k][1]) > 1e-9*(1+math.Abs(q[k][0])) {
				t.Fatalf("quad %d: the reference maps corner %d to (%g, %g), want %v", i, k, x, y, q[k])
			}
		}
		// Four points: the exact solution. More points from the reference:
		// the same map.
		for _, n := range []int{4, 9} {
			src := append([][2]float64(nil), sq...)
			dst := make([][2]float64, 0, n)
			for _, p := range [][2]float64{{0.5, 0.5}, {0.2, 0.9}, {0.7, 0.1}, {0.9, 0.6}, {0.3, 0.3}} {
				if len(src) < n {
					src = append(src, p)
				}
			}
			for _, p := range src {
				x, y := ref.Apply(p[0], p[1])
				dst = append(dst, [2]float64{x, y})
			}
			h, err := FitHomography(src, dst)
			if err != nil {
				t.Fatalf("quad %d, %d points: %v", i, n, err)
			}
			for _, p := range [][2]float64{{0.5, 0.5}, {-0.3, 1.2}, {0.1, 0.8}} {
				x0, y0 := ref.Apply(p[0], p[1])
				x1, y1 := h.Apply(p[0], p[1])
				if e := math.Hypot(x1-x0, y1-y0); e > 1e-7 {
					t.Errorf("quad %d, %d points: (%g, %g) maps %g px off the reference", i, n, p[0], p[1], e)
				}
			}
			inv, ok := h.Inverse()
			if !ok {
				t.Fatal("no inverse")
			}
			u, v := inv.Apply(h.Apply(0.25, 0.75))
			if math.Hypot(u-0.25, v-0.75) > 1e-9 {
				t.Errorf("inverse round trip gives (%g, %g)", u, v)
			}
		}
	}
	// Degenerate sets.
	if _, err := FitHomography([][2]float64{{0, 0}, {1, 0}, {2, 0}, {3, 0}}, [][2]float64{{0, 0}, {1, 0}, {2, 0}, {3, 0}}); err == nil {
		t.Error("collinear points gave a homography")
	}
	if _, err := FitHomography(sq[:3], sq[:3]); err == nil {
		t.Error("three points gave a homography")
	}
}

// TestJacobian compares the analytic derivative with central differences.
func TestJacobian(t *testing.T) {
	h := heckbert([4][2]float64{{100, 120}, {900, 80}, {1000, 700}, {50, 650}})
	const e = 1e-5
	j := h.Jacobian(0.3, 0.6)
	for c := range 2 {
		dx, dy := 0.0, 0.0
		if c == 0 {
			dx = e
		} else {
			dy = e
		}
		x1, y1 := h.Apply(0.3+dx, 0.6+dy)
		x0, y0 := h.Apply(0.3-dx, 0.6-dy)
		if math.Abs((x1-x0)/(2*e)-j[0][c]) > 1e-4 || math.Abs((y1-y0)/(2*e)-j[1][c]) > 1e-4 {
			t.Errorf("column %d: analytic (%g, %g), numeric (%g, %g)", c, j[0][c], j[1][c], (x1-x0)/(2*e), (y1-y0)/(2*e))
		}
	}
}

func TestFitAffine(t *testing.T) {
	want := Homography{2, 0.5, 10, -0.3, 1.5, 20, 0, 0, 1}
	src := [][2]float64{{0, 0}, {1, 0}, {0, 1}, {2, 3}}
	var dst [][2]float64
	for _, p := range src {
		x, y := want.Apply(p[0], p[1])
		dst = append(dst, [2]float64{x, y})
	}
	for _, n := range []int{3, 4} {
		h, err := FitAffine(src[:n], dst[:n])
		if err != nil {
			t.Fatal(err)
		}
		for i := range h {
			if math.Abs(h[i]-want[i]) > 1e-9 {
				t.Fatalf("%d points: %v, want %v", n, h, want)
			}
		}
	}
}
