package plane

import "testing"

func TestBilinear(t *testing.T) {
	// Pixel centres sit at half-integers: sampling at a centre returns the
	// pixel, half-way between two centres the mean (linear interpolation).
	p := New(2, 2)
	p.Set(0, 0, 0)
	p.Set(1, 0, 1)
	p.Set(0, 1, 2)
	p.Set(1, 1, 3)
	cases := []struct {
		name       string
		x, y, want float64
	}{
		{"centre of (0,0)", 0.5, 0.5, 0},
		{"centre of (1,1)", 1.5, 1.5, 3},
		{"between (0,0) and (1,0)", 1, 0.5, 0.5},
		{"middle", 1, 1, 1.5},
		{"clamped outside", -5, 0.5, 0},
	}
	for _, c := range cases {
		if got := p.Bilinear(c.x, c.y); got != c.want {
			t.Errorf("%s: %v, want %v", c.name, got, c.want)
		}
	}
	if !p.In(1, 1) || p.In(2, 0) || p.In(0, -1) {
		t.Error("In")
	}
}
