package chart

import (
	"image"
	"math"

	"sagitta/core/draw"
)

// The sine stars and gratings are raster images at the printer's
// resolution, one image pixel per printer dot, on the page's own dot grid
// (dot (i, j) covers [i, i+1) x [j, j+1) / (dpi/25.4) mm from the page's
// top-left corner). Each dot holds the pattern's linear reflectance averaged
// over the dot, written as an sRGB code (see printCode). Vector drawing
// cannot express a sine; every writer embeds the same dots.

// pattern is a sine target ready to rasterise.
type pattern struct {
	x0, y0, x1, y1 float64 // bounding box, chart units
	// value returns the reflectance averaged over a square dot of side pix
	// chart units centred on (u, v) chart units; outside the target it is
	// the paper's, 1.
	value func(u, v, pix float64) float64
}

// PrintLimitDots is the fewest printer dots per cycle a sine is printed
// with: finer detail (near a star's centre) would alias into false
// patterns on the dot grid, so it fades to the mean grey instead. A star
// has no modulation inside the radius where a cycle spans PrintLimitDots
// dots and full modulation from StarFadeEnd times that radius on.
const (
	PrintLimitDots = 4
	StarFadeEnd    = 1.25
	printLimitDots = PrintLimitDots
)

// starPattern returns star s as a pattern for layout l. Reflectance runs
// from the dark level to the paper's white: mean (1 + dark) / 2, amplitude
// (1 - dark) / 2, in linear terms. Where a cycle spans fewer than
// printLimitDots dots (radius below r0 = printLimitDots * Cycles * dot /
// (2 pi)) the modulation is zero, rising linearly to full at 1.25 r0. Each
// dot is the mean of 2 x 2 samples.
func starPattern(l *Layout, s Star) pattern {
	dark := l.DarkReflectance()
	mean, amp := (1+dark)/2, (1-dark)/2
	n := float64(s.Cycles)
	return pattern{
		x0: s.X - s.Radius, y0: s.Y - s.Radius, x1: s.X + s.Radius, y1: s.Y + s.Radius,
		value: func(u, v, pix float64) float64 {
			r0 := printLimitDots * n * pix / (2 * math.Pi)
			var sum float64
			for _, o := range [4][2]float64{{-1, -1}, {1, -1}, {-1, 1}, {1, 1}} {
				x, y := u+o[0]*pix/4-s.X, v+o[1]*pix/4-s.Y
				r := math.Hypot(x, y)
				if r > s.Radius {
					sum++
					continue
				}
				t := math.Min(math.Max((r-r0)/((StarFadeEnd-1)*r0), 0), 1)
				sum += mean + amp*t*math.Cos(n*math.Atan2(y, x))
			}
			return sum / 4
		},
	}
}

// gratingPattern returns grating g as a pattern: mean and amplitude as for
// stars; the dot average of cos(2 pi f d) over a dot of width w along the
// modulation is cos(2 pi f d) sinc(f w), sinc(x) = sin(pi x) / (pi x), and
// dots across the rectangle's border blend with the paper by the fraction
// they cover.
func gratingPattern(l *Layout, g Grating) pattern {
	dark := l.DarkReflectance()
	mean, amp := (1+dark)/2, (1-dark)/2
	return pattern{
		x0: g.X - g.W/2, y0: g.Y - g.H/2, x1: g.X + g.W/2, y1: g.Y + g.H/2,
		value: func(u, v, pix float64) float64 {
			cov := overlap(u-pix/2, u+pix/2, g.X-g.W/2, g.X+g.W/2) * overlap(v-pix/2, v+pix/2, g.Y-g.H/2, g.Y+g.H/2) / (pix * pix)
			if cov <= 0 {
				return 1
			}
			d := u - g.X
			if g.DirDeg == 90 {
				d = v - g.Y
			}
			val := mean + amp*math.Cos(2*math.Pi*g.FreqPerUnit*d)*sinc(g.FreqPerUnit*pix)
			return cov*val + (1 - cov)
		},
	}
}

// overlap returns the length of [a0, a1] within [b0, b1].
func overlap(a0, a1, b0, b1 float64) float64 { return math.Max(0, math.Min(a1, b1)-math.Max(a0, b0)) }

func sinc(x float64) float64 {
	if x == 0 {
		return 1
	}
	return math.Sin(math.Pi*x) / (math.Pi * x)
}

// drawPattern rasterises pt on the page's dot grid and places it on c.
func (l *Layout) drawPattern(c draw.Canvas, pt pattern) {
	ppm := l.DPI / draw.MMPerInch // dots per file millimetre
	fx0, fy0 := l.FileXY(l.PageXY(pt.x0, pt.y0))
	fx1, fy1 := l.FileXY(l.PageXY(pt.x1, pt.y1))
	i0, j0 := int(math.Floor(fx0*ppm)), int(math.Floor(fy0*ppm))
	i1, j1 := int(math.Ceil(fx1*ppm)), int(math.Ceil(fy1*ppm))
	if i1 <= i0 || j1 <= j0 {
		return
	}
	img := image.NewGray(image.Rect(0, 0, i1-i0, j1-j0))
	pix := 1 / ppm / (l.Scale * l.UnitMM) // one dot, chart units
	cx, cy := l.PageW/2, l.PageH/2
	for j := j0; j < j1; j++ {
		fy := (float64(j) + 0.5) / ppm
		v := (cy + (fy-cy)/l.Scale - l.CentreMM[1]) / l.UnitMM
		row := img.Pix[(j-j0)*img.Stride:]
		for i := i0; i < i1; i++ {
			fx := (float64(i) + 0.5) / ppm
			u := (cx + (fx-cx)/l.Scale - l.CentreMM[0]) / l.UnitMM
			row[i-i0] = printCode(pt.value(u, v, pix))
		}
	}
	c.Image(float64(i0)/ppm, float64(j0)/ppm, float64(i1-i0)/ppm, float64(j1-j0)/ppm, img)
}
