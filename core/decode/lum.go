package decode

import (
	"image"
	"image/color"
	"sync/atomic"

	"sagitta/core/decode/jpegdec"
	"sagitta/core/internal/parallel"
	"sagitta/core/plane"
)

// Rec. ITU-R BT.709-6, part 1 item 3.2 (from memory):
// Y = 0.2126 R + 0.7152 G + 0.0722 B.
const (
	wR = 0.2126
	wG = 0.7152 // = 1 - wR - wB; implied by y709
	wB = 0.0722
)

// y709 returns 0.2126 r + 0.7152 g + 0.0722 b written as
// g + 0.2126 (r - g) + 0.0722 (b - g), which is exact for grey (r = g = b),
// so white is exactly 1 and grey pixels of colour files equal their level.
func y709(r, g, b float32) float32 { return g + wR*(r-g) + wB*(b-g) }

// converter turns a decoded image into luminance with one tone.
type converter struct {
	tone   Tone
	colour bool // the pixels held colour (set by luminance)
	alpha  bool // some pixel was not opaque (set by luminance)
}

func newConverter(t Tone) *converter { return &converter{tone: t} }

// luminance builds the plane. It reads the pixel buffers of the image types
// the standard decoders return directly; other types go through At.
func (c *converter) luminance(img image.Image) *plane.Plane {
	b := img.Bounds()
	w, h := b.Dx(), b.Dy()
	p := plane.New(w, h)
	var notOpaque atomic.Bool
	switch m := img.(type) {
	case *image.Gray:
		t := c.tone.lut8()
		parallel.Rows(h, w, func(y0, y1 int) {
			for y := y0; y < y1; y++ {
				src, dst := m.Pix[y*m.Stride:y*m.Stride+w], p.Pix[y*w:(y+1)*w]
				for x, v := range src {
					dst[x] = t[v]
				}
			}
		})
	case *image.Gray16:
		t := c.tone.lut16()
		parallel.Rows(h, w, func(y0, y1 int) {
			for y := y0; y < y1; y++ {
				src, dst := m.Pix[y*m.Stride:y*m.Stride+2*w], p.Pix[y*w:(y+1)*w]
				for x := range dst {
					dst[x] = t[uint16(src[2*x])<<8|uint16(src[2*x+1])]
				}
			}
		})
	case *image.NRGBA:
		c.colour = true
		t := c.tone.lut8()
		parallel.Rows(h, w, func(y0, y1 int) {
			opaque := true
			for y := y0; y < y1; y++ {
				src, dst := m.Pix[y*m.Stride:y*m.Stride+4*w], p.Pix[y*w:(y+1)*w]
				for x := range dst {
					s := src[4*x : 4*x+4 : 4*x+4]
					dst[x] = y709(t[s[0]], t[s[1]], t[s[2]])
					opaque = opaque && s[3] == 0xff
				}
			}
			if !opaque {
				notOpaque.Store(true)
			}
		})
	case *image.RGBA:
		c.colour = true
		t := c.tone.lut8()
		parallel.Rows(h, w, func(y0, y1 int) {
			opaque := true
			for y := y0; y < y1; y++ {
				src, dst := m.Pix[y*m.Stride:y*m.Stride+4*w], p.Pix[y*w:(y+1)*w]
				for x := range dst {
					s := src[4*x : 4*x+4 : 4*x+4]
					if a := s[3]; a != 0xff {
						opaque = false
						dst[x] = y709(t[unpremul8(s[0], a)], t[unpremul8(s[1], a)], t[unpremul8(s[2], a)])
						continue
					}
					dst[x] = y709(t[s[0]], t[s[1]], t[s[2]])
				}
			}
			if !opaque {
				notOpaque.Store(true)
			}
		})
	case *image.NRGBA64:
		c.colour = true
		t := c.tone.lut16()
		parallel.Rows(h, w, func(y0, y1 int) {
			opaque := true
			for y := y0; y < y1; y++ {
				src, dst := m.Pix[y*m.Stride:y*m.Stride+8*w], p.Pix[y*w:(y+1)*w]
				for x := range dst {
					s := src[8*x : 8*x+8 : 8*x+8]
					dst[x] = y709(t[be16(s[0:])], t[be16(s[2:])], t[be16(s[4:])])
					opaque = opaque && be16(s[6:]) == 0xffff
				}
			}
			if !opaque {
				notOpaque.Store(true)
			}
		})
	case *image.RGBA64:
		c.colour = true
		t := c.tone.lut16()
		parallel.Rows(h, w, func(y0, y1 int) {
			opaque := true
			for y := y0; y < y1; y++ {
				src, dst := m.Pix[y*m.Stride:y*m.Stride+8*w], p.Pix[y*w:(y+1)*w]
				for x := range dst {
					s := src[8*x : 8*x+8 : 8*x+8]
					r, g, bb, a := be16(s[0:]), be16(s[2:]), be16(s[4:]), be16(s[6:])
					if a != 0xffff {
						opaque = false
						r, g, bb = unpremul16(r, a), unpremul16(g, a), unpremul16(bb, a)
					}
					dst[x] = y709(t[r], t[g], t[bb])
				}
			}
			if !opaque {
				notOpaque.Store(true)
			}
		})
	case *jpegdec.YCbCr:
		c.colour = true
		t := c.tone.lut8()
		parallel.Rows(h, w, func(y0, y1 int) {
			var s jpegdec.Scratch
			r, g, bb := make([]uint8, w), make([]uint8, w), make([]uint8, w)
			for y := y0; y < y1; y++ {
				m.Row(y, 0, w, r, g, bb, &s)
				dst := p.Pix[y*w : (y+1)*w]
				for x := range dst {
					dst[x] = y709(t[r[x]], t[g[x]], t[bb[x]])
				}
			}
		})
	case *image.YCbCr:
		c.colour = true
		if b.Min.X < 0 || b.Min.Y < 0 || !c.ycbcr(m, p) {
			c.generic(img, p)
		}
	case *image.CMYK:
		c.colour = true
		t := c.tone.lut8()
		parallel.Rows(h, w, func(y0, y1 int) {
			for y := y0; y < y1; y++ {
				src, dst := m.Pix[y*m.Stride:y*m.Stride+4*w], p.Pix[y*w:(y+1)*w]
				for x := range dst {
					s := src[4*x : 4*x+4 : 4*x+4]
					r, g, bb := color.CMYKToRGB(s[0], s[1], s[2], s[3])
					dst[x] = y709(t[r], t[g], t[bb])
				}
			}
		})
	case *image.Paletted:
		var lum [256]float32
		c.colour = c.palette(m.Palette, &lum)
		if c.alpha {
			notOpaque.Store(true)
		}
		parallel.Rows(h, w, func(y0, y1 int) {
			for y := y0; y < y1; y++ {
				src, dst := m.Pix[y*m.Stride:y*m.Stride+w], p.Pix[y*w:(y+1)*w]
				for x, v := range src {
					dst[x] = lum[v] // indices past the palette read 0 (black)
				}
			}
		})
	default:
		c.colour = true
		c.generic(img, p)
	}
	c.alpha = c.alpha || notOpaque.Load()
	return p
}

func be16(b []byte) uint16 { return uint16(b[0])<<8 | uint16(b[1]) }

// unpremul8 undoes alpha premultiplication, rounding: c * 255 / a.
func unpremul8(c, a uint8) uint8 {
	if a == 0 {
		return 0
	}
	return uint8(min((uint32(c)*255+uint32(a)/2)/uint32(a), 255))
}

func unpremul16(c, a uint16) uint16 {
	if a == 0 {
		return 0
	}
	return uint16(min((uint32(c)*0xffff+uint32(a)/2)/uint32(a), 0xffff))
}

// palette fills lum with the luminance of each palette entry (entries past
// the palette stay 0) and reports whether any entry is not grey.
func (c *converter) palette(pal color.Palette, lum *[256]float32) (colour bool) {
	for i, col := range pal[:min(len(pal), 256)] {
		r, g, b, a := col.RGBA()
		if a != 0xffff {
			c.alpha = true
			r, g, b = uint32(unpremul16(uint16(r), uint16(a))), uint32(unpremul16(uint16(g), uint16(a))), uint32(unpremul16(uint16(b), uint16(a)))
		}
		colour = colour || r != g || g != b
		lr := c.tone.Linearize(float64(r) / 0xffff)
		lg := c.tone.Linearize(float64(g) / 0xffff)
		lb := c.tone.Linearize(float64(b) / 0xffff)
		lum[i] = float32(lg + wR*(lr-lg) + wB*(lb-lg))
	}
	return colour
}

// generic converts any image through At and 16-bit non-premultiplied
// colour; slow, used only for types the standard decoders do not return.
func (c *converter) generic(img image.Image, p *plane.Plane) {
	t := c.tone.lut16()
	b := img.Bounds()
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			n := color.NRGBA64Model.Convert(img.At(x, y)).(color.NRGBA64)
			if n.A != 0xffff {
				c.alpha = true
			}
			p.Pix[(y-b.Min.Y)*p.W+(x-b.Min.X)] = y709(t[n.R], t[n.G], t[n.B])
		}
	}
}

// ycbcrToRGB converts one JFIF YCbCr sample to RGB (JPEG File Interchange
// Format 1.02, section "Conversion to and from RGB"):
//
//	R = Y + 1.402 (Cr-128)
//	G = Y - 0.344136 (Cb-128) - 0.714136 (Cr-128)
//	B = Y + 1.772 (Cb-128)
//
// in 16.16 fixed point with the coefficients and rounding of Go's
// color.YCbCrToRGB (Y scaled by 0x10101, results clamped to [0, 255]), so
// the result equals that function's for every input; the test checks all
// 2^24 of them. It is written out here because that function is not
// inlined and this runs once per pixel.
func ycbcrToRGB(y, cb, cr uint8) (uint8, uint8, uint8) {
	yy := int32(y) * 0x10101
	cb1 := int32(cb) - 128
	cr1 := int32(cr) - 128
	// 1.402 x 65536 = 91881.47; 0.344136 x 65536 = 22553.30 and
	// 0.714136 x 65536 = 46801.62 (Go's integers, 22554 and 46802, round
	// the JFIF coefficients to 5 digits first); 1.772 x 65536 = 116129.79.
	return clamp16(yy + 91881*cr1),
		clamp16(yy - 22554*cb1 - 46802*cr1),
		clamp16(yy + 116130*cb1)
}

// clamp16 returns v / 65536 clamped to [0, 255].
func clamp16(v int32) uint8 {
	v >>= 16
	if v < 0 {
		return 0
	}
	if v > 255 {
		return 255
	}
	return uint8(v)
}

// ycbcr converts a YCbCr image whose bounds start at non-negative
// coordinates; it reports false for an unknown subsampling ratio.
func (c *converter) ycbcr(m *image.YCbCr, p *plane.Plane) bool {
	var hs, vs uint // chroma subsampling as shifts (image.YCbCr.COffset)
	switch m.SubsampleRatio {
	case image.YCbCrSubsampleRatio444:
	case image.YCbCrSubsampleRatio422:
		hs = 1
	case image.YCbCrSubsampleRatio420:
		hs, vs = 1, 1
	case image.YCbCrSubsampleRatio440:
		vs = 1
	case image.YCbCrSubsampleRatio411:
		hs = 2
	case image.YCbCrSubsampleRatio410:
		hs, vs = 2, 1
	default:
		return false
	}
	t := c.tone.lut8()
	b := m.Rect
	w := b.Dx()
	parallel.Rows(b.Dy(), w, func(y0, y1 int) {
		for j := y0; j < y1; j++ {
			y := b.Min.Y + j
			ys := m.Y[j*m.YStride : j*m.YStride+w]
			crow := (y>>vs - b.Min.Y>>vs) * m.CStride
			dst := p.Pix[j*w : (j+1)*w]
			for i := range dst {
				ci := crow + (b.Min.X+i)>>hs - b.Min.X>>hs
				r, g, bb := ycbcrToRGB(ys[i], m.Cb[ci], m.Cr[ci])
				dst[i] = y709(t[r], t[g], t[bb])
			}
		}
	})
	return true
}
