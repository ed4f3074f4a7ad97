package simcam

import (
	"image"
	"math"

	"sagitta/core/plane"
)

// Lateral chromatic aberration: a lens whose magnification differs by
// wavelength images red, green and blue at slightly different scales about
// its optical centre, so an edge off the centre lies at a different place
// in each channel, displaced along the radius by the difference of the
// magnifications times the image height (the displacement ISO 19084:2015
// measures). The camera renders each channel of the scene scaled about
// ChannelCentre by 1 + ChannelMag[c]; the PSF stays the lens's own.

// colourCA reports whether the camera renders channels separately.
func (c *Camera) colourCA() bool {
	return c.Colour && c.ChannelMag != [3]float64{}
}

// channelCentre is the centre of the channels' magnification, px.
func (c *Camera) channelCentre() (float64, float64) {
	if c.ChannelCentre != [2]float64{} {
		return c.ChannelCentre[0], c.ChannelCentre[1]
	}
	return float64(c.W) / 2, float64(c.H) / 2
}

// ScaleScene returns scene s magnified by k about (cx, cy): every vertex,
// star and grating moved away from the centre by the factor k, sizes
// scaled, grating frequencies divided by k. Levels are unchanged.
func ScaleScene(s Scene, cx, cy, k float64) Scene {
	at := func(x, y float64) (float64, float64) { return cx + k*(x-cx), cy + k*(y-cy) }
	out := Scene{Background: s.Background}
	for _, p := range s.Polygons {
		q := Polygon{Level: p.Level, Rough: p.Rough, Pts: make([][2]float64, len(p.Pts))}
		for i, v := range p.Pts {
			q.Pts[i][0], q.Pts[i][1] = at(v[0], v[1])
		}
		out.Polygons = append(out.Polygons, q)
	}
	for _, st := range s.Stars {
		st.X, st.Y = at(st.X, st.Y)
		st.Radius *= k
		st.FadePx *= k
		out.Stars = append(out.Stars, st)
	}
	for _, g := range s.Gratings {
		for i, v := range g.Corners {
			g.Corners[i][0], g.Corners[i][1] = at(v[0], v[1])
		}
		// The level at a scaled point equals the original's at the point it
		// came from: the phase origin moves with the centre.
		sn, cs := math.Sincos(g.DirectionDeg * math.Pi / 180)
		g.PhaseDeg += 360 * g.FreqCyPx * (1 - 1/k) * (cx*cs + cy*sn)
		g.FreqCyPx /= k
		out.Gratings = append(out.Gratings, g)
	}
	return out
}

// channelPlanes renders, adds noise to and encodes each colour channel of
// scene s in turn (one float plane at a time) into an 8- or 16-bit RGB
// image.
func (c *Camera) channelPlanes(s Scene) (image.Image, error) {
	cx, cy := c.channelCentre()
	r := image.Rect(0, 0, c.W, c.H)
	var img8 *image.RGBA
	var img16 *image.RGBA64
	if c.Encoding.sixteen() {
		img16 = image.NewRGBA64(r)
	} else {
		img8 = image.NewRGBA(r)
	}
	for ch := range 3 {
		p, err := c.Render(ScaleScene(s, cx, cy, 1+c.ChannelMag[ch]))
		if err != nil {
			return nil, err
		}
		cc := *c
		cc.Seed = c.Seed ^ uint64(0x9e3779b97f4a7c15*uint64(ch+1))
		cc.addNoise(p)
		v := c.encodeValues(p)
		c.quantiseInto(v, ch, img8, img16)
	}
	if img16 != nil {
		return img16, nil
	}
	return img8, nil
}

// quantiseInto writes encoded values v into channel ch of img8 or img16
// (whichever is not nil) and makes the pixels opaque.
func (c *Camera) quantiseInto(v []float64, ch int, img8 *image.RGBA, img16 *image.RGBA64) {
	if img16 != nil {
		for i, x := range v {
			k := uint16(math.Round(x * 65535))
			img16.Pix[8*i+2*ch], img16.Pix[8*i+2*ch+1] = byte(k>>8), byte(k)
			img16.Pix[8*i+6], img16.Pix[8*i+7] = 0xFF, 0xFF
		}
		return
	}
	for i, x := range v {
		img8.Pix[4*i+ch] = uint8(math.Round(x * 255))
		img8.Pix[4*i+3] = 0xFF
	}
}

// mosaicPlane renders scene s for a raw mosaic with lateral chromatic
// aberration: each photosite takes the value of its own colour's channel,
// rendered through that channel's magnification. o must have its defaults
// applied.
func (c *Camera) mosaicPlane(s Scene, o DNG) (*plane.Plane, error) {
	cx, cy := c.channelCentre()
	out := plane.New(c.W, c.H)
	for ch := range 3 {
		p, err := c.Render(ScaleScene(s, cx, cy, 1+c.ChannelMag[ch]))
		if err != nil {
			return nil, err
		}
		for y := 0; y < c.H; y++ {
			for x := 0; x < c.W; x++ {
				if colourIndex(o.Pattern[(y%2)*2+x%2]) == ch {
					out.Pix[y*c.W+x] = p.Pix[y*c.W+x]
				}
			}
		}
	}
	return out, nil
}
