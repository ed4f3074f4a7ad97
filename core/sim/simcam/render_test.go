package simcam

import (
	"math"
	"testing"
)

// halfPlaneFrac returns the exact area of the unit pixel [i, i+1) x [j, j+1)
// on the side n.p > c of the line n.p = c, by integrating the clamped
// cut height column by column: x -> clamp of the y-extent, piecewise linear,
// integrated exactly by the trapezoid rule between its kinks (elementary
// geometry; independent of the renderer's trapezoid formula).
func halfPlaneFrac(i, j int, nx, ny, c float64) float64 {
	x0, x1 := float64(i), float64(i+1)
	y0, y1 := float64(j), float64(j+1)
	// length of {y in [y0, y1] : nx x + ny y > c} at column x
	seg := func(x float64) float64 {
		if ny == 0 {
			if nx*x > c {
				return 1
			}
			return 0
		}
		yc := (c - nx*x) / ny
		if ny > 0 { // y > yc
			return math.Min(1, math.Max(0, y1-math.Max(yc, y0)))
		}
		return math.Min(1, math.Max(0, math.Min(yc, y1)-y0))
	}
	ks := []float64{x0, x1}
	if nx != 0 {
		for _, y := range []float64{y0, y1} {
			x := (c - ny*y) / nx
			if x > x0 && x < x1 {
				ks = append(ks, x)
			}
		}
	}
	for a := 1; a < len(ks); a++ {
		for b := a; b > 0 && ks[b] < ks[b-1]; b-- {
			ks[b], ks[b-1] = ks[b-1], ks[b]
		}
	}
	sum := 0.0
	for a := 0; a+1 < len(ks); a++ {
		xa, xb := ks[a], ks[a+1]
		if ny == 0 { // step in x: evaluate at the middle
			sum += (xb - xa) * seg((xa+xb)/2)
			continue
		}
		sum += (xb - xa) * (seg(xa) + seg(xb)) / 2
	}
	return sum
}

// TestIdealLensAreaFractions renders half-plane scenes through the ideal lens
// and compares every pixel with the independently computed area fraction.
func TestIdealLensAreaFractions(t *testing.T) {
	const w, h = 40, 30
	for _, ang := range []float64{0, 5, 30, 45, -17, 90, 133} {
		s := HalfPlaneScene(w, h, ang, 0, 1)
		cam := Camera{W: w, H: h, Lens: Fixed{Gaussian{}}}
		p := cam.RenderLinear(s)
		sn, cs := math.Sincos(ang * math.Pi / 180)
		c := cs*w/2 + sn*h/2 // light side: n.p > c
		maxd := 0.0
		for j := range h {
			for i := range w {
				want := halfPlaneFrac(i, j, cs, sn, c)
				d := math.Abs(float64(p.At(i, j)) - want)
				maxd = math.Max(maxd, d)
			}
		}
		if maxd > 1e-6 { // float32 output
			t.Errorf("angle %v: max |render - area fraction| = %.2e", ang, maxd)
		}
	}
	// Hand case: a vertical edge through x = 10.3 (dark left, light right):
	// pixel 10 is 0.3 dark, 0.7 light (elementary geometry).
	s := Scene{Background: 1, Polygons: []Polygon{{Pts: [][2]float64{{-50, -50}, {10.3, -50}, {10.3, 80}, {-50, 80}}, Level: 0}}}
	p := (&Camera{W: 20, H: 10}).RenderLinear(s)
	if v := p.At(10, 5); math.Abs(float64(v)-0.7) > 1e-7 {
		t.Errorf("vertical edge at x = 10.3: pixel 10 = %v, want 0.7", v)
	}
}

func TestRoughPolygon(t *testing.T) {
	// A Rough polygon keeps exact values along its sides away from the
	// vertices and differs from the exact rendering only near them (by at
	// most the corner's share of the blur, well under the level step).
	sq := Square(60, 60, 60, 10, 0.1)
	rough := sq
	rough.Rough = true
	cam := Camera{W: 120, H: 120, Lens: Fixed{Gaussian{Sigma1: 1.5, Sigma2: 1.5}}}
	exact := cam.RenderLinear(Scene{Background: 0.8, Polygons: []Polygon{sq}})
	fast := cam.RenderLinear(Scene{Background: 0.8, Polygons: []Polygon{rough}})
	var worst, worstFar float64
	for y := 0; y < 120; y++ {
		for x := 0; x < 120; x++ {
			d := math.Abs(float64(exact.At(x, y) - fast.At(x, y)))
			worst = math.Max(worst, d)
			near := false
			for _, v := range sq.Pts {
				if math.Hypot(float64(x)+0.5-v[0], float64(y)+0.5-v[1]) < 12 {
					near = true
				}
			}
			if !near {
				worstFar = math.Max(worstFar, d)
			}
		}
	}
	if worstFar > 1e-6 {
		t.Errorf("rough square differs by %g away from its vertices", worstFar)
	}
	if worst > 0.25*0.7 || worst == 0 {
		t.Errorf("rough square differs by %g near its vertices (want small but nonzero)", worst)
	}
}
