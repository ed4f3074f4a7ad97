package draw

import (
	"image"
	"image/color"
	"math"

	"github.com/golang/freetype/raster"
)

// painter composites the coverage spans of freetype's rasteriser onto the
// raster's image in one colour with the source-over operator:
// dst = src*cov + dst*(1 - alpha*cov), on premultiplied 16-bit values, with
// the result rounded to 8 bits.
type painter struct {
	rgba *image.RGBA
	gray *image.Gray
	// r, g, b, a: premultiplied 16-bit colour; y: its premultiplied luma.
	r, g, b, a, y uint32
}

// luma16 returns the luma of 16-bit R'G'B' with the weights of Go's
// color.GrayModel (ITU-R BT.601: 0.299, 0.587, 0.114 in 16-bit fractions).
func luma16(r, g, b uint32) uint32 { return (19595*r + 38470*g + 7471*b + 1<<15) >> 16 }

// setColour sets the paint colour.
func (p *painter) setColour(c color.Color) {
	p.r, p.g, p.b, p.a = c.RGBA()
	p.y = luma16(p.r, p.g, p.b)
}

// to8 rounds a 16-bit value to 8 bits: round(v * 255 / 65535).
func to8(v uint32) uint8 { return uint8((v*255 + 32767) / 65535) }

// Paint implements raster.Painter.
func (p *painter) Paint(ss []raster.Span, done bool) {
	const m = 0xffff
	for _, s := range ss {
		if p.gray != nil {
			if s.Y < 0 || s.Y >= p.gray.Rect.Dy() {
				continue
			}
			x0, x1 := max(s.X0, 0), min(s.X1, p.gray.Rect.Dx())
			row := p.gray.Pix[s.Y*p.gray.Stride:]
			if s.Alpha == m && p.a == m {
				v := to8(p.y)
				for i := x0; i < x1; i++ {
					row[i] = v
				}
				continue
			}
			inv := m - p.a*s.Alpha/m
			src := p.y * s.Alpha / m
			for i := x0; i < x1; i++ {
				row[i] = to8(uint32(row[i])*0x101*inv/m + src)
			}
			continue
		}
		if s.Y < 0 || s.Y >= p.rgba.Rect.Dy() {
			continue
		}
		x0, x1 := max(s.X0, 0), min(s.X1, p.rgba.Rect.Dx())
		row := p.rgba.Pix[s.Y*p.rgba.Stride:]
		inv := m - p.a*s.Alpha/m
		sr, sg, sb, sa := p.r*s.Alpha/m, p.g*s.Alpha/m, p.b*s.Alpha/m, p.a*s.Alpha/m
		for i := 4 * x0; i < 4*x1; i += 4 {
			px := row[i : i+4 : i+4]
			px[0] = to8(uint32(px[0])*0x101*inv/m + sr)
			px[1] = to8(uint32(px[1])*0x101*inv/m + sg)
			px[2] = to8(uint32(px[2])*0x101*inv/m + sb)
			px[3] = to8(uint32(px[3])*0x101*inv/m + sa)
		}
	}
}

// Image draws img over the rectangle (x, y, w, h) in user units (see
// Canvas). Device pixel (i, j) takes the source pixel under its centre
// (i+0.5, j+0.5) (nearest neighbour), composited source-over; pixels whose
// centres lie outside the rectangle are untouched, so a rectangle on pixel
// boundaries with one source pixel per device pixel is copied exactly.
func (c *Raster) Image(x, y, w, h float64, img image.Image) {
	if img == nil || !(finite(x) && finite(y) && w > 0 && h > 0 && finite(x+w) && finite(y+h)) {
		return
	}
	sb := img.Bounds()
	if sb.Empty() {
		return
	}
	px0, py0, px1, py1 := x*c.scale, y*c.scale, (x+w)*c.scale, (y+h)*c.scale
	// Columns i with px0 <= i+0.5 < px1.
	i0 := max(int(math.Ceil(px0-0.5)), 0)
	i1 := min(int(math.Ceil(px1-0.5)), c.w)
	j0 := max(int(math.Ceil(py0-0.5)), 0)
	j1 := min(int(math.Ceil(py1-0.5)), c.h)
	if i0 >= i1 || j0 >= j1 {
		return
	}
	sw, sh := sb.Dx(), sb.Dy()
	c.cols = c.cols[:0]
	for i := i0; i < i1; i++ {
		u := int((float64(i) + 0.5 - px0) / (px1 - px0) * float64(sw))
		c.cols = append(c.cols, sb.Min.X+min(max(u, 0), sw-1))
	}
	sg, srcGray := img.(*image.Gray)
	for j := j0; j < j1; j++ {
		v := int((float64(j) + 0.5 - py0) / (py1 - py0) * float64(sh))
		sy := sb.Min.Y + min(max(v, 0), sh-1)
		if c.gray != nil {
			row := c.gray.Pix[j*c.gray.Stride:]
			if srcGray {
				srow := sg.Pix[(sy-sg.Rect.Min.Y)*sg.Stride-sg.Rect.Min.X:]
				for k, sx := range c.cols {
					row[i0+k] = srow[sx]
				}
				continue
			}
			for k, sx := range c.cols {
				r, g, b, a := img.At(sx, sy).RGBA()
				d := uint32(row[i0+k]) * 0x101
				row[i0+k] = to8(d*(0xffff-a)/0xffff + luma16(r, g, b))
			}
			continue
		}
		row := c.rgba.Pix[j*c.rgba.Stride:]
		for k, sx := range c.cols {
			var r, g, b, a uint32
			if srcGray {
				v := uint32(sg.Pix[(sy-sg.Rect.Min.Y)*sg.Stride+sx-sg.Rect.Min.X]) * 0x101
				r, g, b, a = v, v, v, 0xffff
			} else {
				r, g, b, a = img.At(sx, sy).RGBA()
			}
			px := row[4*(i0+k) : 4*(i0+k)+4 : 4*(i0+k)+4]
			inv := 0xffff - a
			px[0] = to8(uint32(px[0])*0x101*inv/0xffff + r)
			px[1] = to8(uint32(px[1])*0x101*inv/0xffff + g)
			px[2] = to8(uint32(px[2])*0x101*inv/0xffff + b)
			px[3] = to8(uint32(px[3])*0x101*inv/0xffff + a)
		}
	}
}
