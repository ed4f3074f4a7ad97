package simcam

import (
	"math"

	"sagitta/core/plane"
)

// Distortion is a lens's radial distortion: the image point an ideal
// (distortion-free) lens would form at distance r_u from the optical centre
// lands at
//
//	r_d = r_u (1 + K1 s^2 + K2 s^4),  s = r_u / R,
//
// R the frame's half-diagonal, hypot(W, H)/2 px: the even polynomial
// (Brown-Conrady) model of radial distortion (D. C. Brown, "Decentering
// distortion of lenses", Photogrammetric Engineering 32 (1966) 444-462,
// radial terms only). K1 < 0 is barrel distortion, K1 > 0 pincushion; K1 and
// K2 of opposite signs make a moustache. The displacement relative to the
// ideal height is 100 (K1 s^2 + K2 s^4) %.
//
// The camera maps every polygon vertex, star centre and grating centre of
// the scene through it (Render). Polygon sides longer than maxSidePx (64
// px) are first cut into equal pieces, so that straight lines bend; each
// piece stays straight between its mapped ends, within
// |K1| 6 s L^2 / (8 R) px of the true curve for a piece of L px at height s
// (0.07 px for 64 px at the corner of a 1500 x 1000 frame with K1 = -0.02).
// Stars and gratings are moved, not bent.
type Distortion struct {
	K1, K2 float64
	// CentreX, CentreY is the optical centre, px; both 0 means the frame's
	// centre (W/2, H/2).
	CentreX, CentreY float64
}

// maxSidePx is the longest polygon side mapped as a straight line.
const maxSidePx = 64

// centre returns the optical centre in a w x h frame.
func (d Distortion) centre(w, h int) (float64, float64) {
	if d.CentreX == 0 && d.CentreY == 0 {
		return float64(w) / 2, float64(h) / 2
	}
	return d.CentreX, d.CentreY
}

// Map returns where the ideal image point (x, y) px lands in a w x h frame.
func (d Distortion) Map(x, y float64, w, h int) (float64, float64) {
	cx, cy := d.centre(w, h)
	s2 := ((x-cx)*(x-cx) + (y-cy)*(y-cy)) / halfDiag2(w, h)
	m := 1 + d.K1*s2 + d.K2*s2*s2
	return cx + (x-cx)*m, cy + (y-cy)*m
}

// DisplacementPct returns the radial displacement 100 (r_d - r_u) / r_u at
// the ideal image height s = r_u / R (fraction of the half-diagonal).
func (d Distortion) DisplacementPct(s float64) float64 {
	return 100 * (d.K1*s*s + d.K2*s*s*s*s)
}

func halfDiag2(w, h int) float64 { return (float64(w)*float64(w) + float64(h)*float64(h)) / 4 }

// distort returns scene s seen through the distortion in a w x h frame.
func (d Distortion) distort(s Scene, w, h int) Scene {
	out := Scene{Background: s.Background}
	for _, p := range s.Polygons {
		q := p
		q.Pts = make([][2]float64, 0, len(p.Pts))
		for i, a := range p.Pts {
			b := p.Pts[(i+1)%len(p.Pts)]
			n := 1
			if l := math.Hypot(b[0]-a[0], b[1]-a[1]); !p.Rough && l > maxSidePx {
				n = int(math.Ceil(l / maxSidePx))
			}
			for k := range n {
				t := float64(k) / float64(n)
				x, y := d.Map(a[0]+t*(b[0]-a[0]), a[1]+t*(b[1]-a[1]), w, h)
				q.Pts = append(q.Pts, [2]float64{x, y})
			}
		}
		out.Polygons = append(out.Polygons, q)
	}
	cx, cy := d.centre(w, h)
	for _, st := range s.Stars {
		x, y := d.Map(st.X, st.Y, w, h)
		// The local scale along the radius: d r_d / d r_u.
		s2 := ((st.X-cx)*(st.X-cx) + (st.Y-cy)*(st.Y-cy)) / halfDiag2(w, h)
		m := 1 + 3*d.K1*s2 + 5*d.K2*s2*s2
		st.X, st.Y, st.Radius, st.FadePx = x, y, st.Radius*m, st.FadePx*m
		out.Stars = append(out.Stars, st)
	}
	for _, g := range s.Gratings {
		gx := (g.Corners[0][0] + g.Corners[2][0]) / 2
		gy := (g.Corners[0][1] + g.Corners[2][1]) / 2
		x, y := d.Map(gx, gy, w, h)
		dx, dy := x-gx, y-gy
		for i := range g.Corners {
			g.Corners[i][0] += dx
			g.Corners[i][1] += dy
		}
		sd, cd := math.Sincos(g.DirectionDeg * math.Pi / 180)
		g.PhaseDeg = math.Mod(g.PhaseDeg-360*g.FreqCyPx*(dx*cd+dy*sd), 360)
		out.Gratings = append(out.Gratings, g)
	}
	return out
}

// Falloff is a lens's light fall-off (vignetting): the irradiance at image
// distance r from the optical centre is the centre's times
//
//	cos^4(atan(r / Cos4FocalPx)) * 2^(-CornerEV s^4),  s = r / R,
//
// R the frame's half-diagonal. The first factor is the cosine-fourth law of
// natural vignetting for a distant object (W. J. Smith, Modern Optical
// Engineering, 4th ed. (2008), section 10.9, chapter from memory), with the
// exit pupil Cos4FocalPx px from the sensor (0: no such term); the second
// an extra, smooth fall-off of CornerEV stops at the frame's corner (s = 1),
// standing in for the lens barrel's vignetting. The camera multiplies
// every rendered pixel by it at the pixel's centre (Render), after the
// blur: exact on flat areas, within the change of the factor across the PSF
// near edges.
type Falloff struct {
	Cos4FocalPx float64
	CornerEV    float64
	// CentreX, CentreY is the optical centre, px; both 0 means the frame's
	// centre (W/2, H/2).
	CentreX, CentreY float64
}

// Gain returns the factor at image point (x, y) px of a w x h frame.
func (f Falloff) Gain(x, y float64, w, h int) float64 {
	cx, cy := f.CentreX, f.CentreY
	if cx == 0 && cy == 0 {
		cx, cy = float64(w)/2, float64(h)/2
	}
	r2 := (x-cx)*(x-cx) + (y-cy)*(y-cy)
	g := 1.0
	if f.Cos4FocalPx > 0 {
		c2 := 1 / (1 + r2/(f.Cos4FocalPx*f.Cos4FocalPx)) // cos^2 of the field angle
		g = c2 * c2
	}
	if f.CornerEV != 0 {
		s2 := r2 / halfDiag2(w, h)
		g *= math.Exp2(-f.CornerEV * s2 * s2)
	}
	return g
}

// shade multiplies p by the fall-off.
func (f Falloff) shade(p *plane.Plane) {
	for j := range p.H {
		for i := range p.W {
			p.Pix[j*p.W+i] *= float32(f.Gain(float64(i)+0.5, float64(j)+0.5, p.W, p.H))
		}
	}
}

// validGeometry checks the distortion and fall-off parameters.
func (c *Camera) validGeometry() error {
	if d := c.Distortion; d != nil {
		if !finite(d.K1) || !finite(d.K2) || !finite(d.CentreX) || !finite(d.CentreY) {
			return invalidf("distortion has a non-finite parameter")
		}
		// The mapping must stay monotonic out to the corner: d r_d / d r_u > 0.
		for s := 0.0; s <= 1.5; s += 0.01 {
			if 1+3*d.K1*s*s+5*d.K2*s*s*s*s <= 0 {
				return invalidf("distortion K1 %g, K2 %g folds the image before 1.5 half-diagonals", d.K1, d.K2)
			}
		}
	}
	if f := c.Falloff; f != nil {
		if !finite(f.Cos4FocalPx) || f.Cos4FocalPx < 0 || !finite(f.CornerEV) || !finite(f.CentreX) || !finite(f.CentreY) {
			return invalidf("fall-off needs a finite focal length >= 0 and finite stops")
		}
	}
	return nil
}
