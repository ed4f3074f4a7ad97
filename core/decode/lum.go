package decode

import (
	"image"
	"image/color"
	"runtime"
	"sync"
	"sync/atomic"

	"sagitta/core/plane"
)

// Rec. ITU-R BT.709-6, item 3.2: Y = 0.2126 R + 0.7152 G + 0.0722 B.
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

// parallelRows runs fn over row ranges [y0, y1) covering [0, h), on
// several goroutines when the image is large and more than one CPU is
// available (never under js/wasm, where GOMAXPROCS is 1).
func parallelRows(w, h int, fn func(y0, y1 int)) {
	n := runtime.GOMAXPROCS(0)
	if n < 2 || w*h < 1<<18 || h < 2 {
		fn(0, h)
		return
	}
	n = min(n, 8, h)
	var wg sync.WaitGroup
	for i := range n {
		y0, y1 := h*i/n, h*(i+1)/n
		wg.Add(1)
		go func() { defer wg.Done(); fn(y0, y1) }()
	}
	wg.Wait()
}

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
		parallelRows(w, h, func(y0, y1 int) {
			for y := y0; y < y1; y++ {
				src, dst := m.Pix[y*m.Stride:y*m.Stride+w], p.Pix[y*w:(y+1)*w]
				for x, v := range src {
					dst[x] = t[v]
				}
			}
		})
	case *image.Gray16:
		t := c.tone.lut16()
		parallelRows(w, h, func(y0, y1 int) {
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
		parallelRows(w, h, func(y0, y1 int) {
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
		parallelRows(w, h, func(y0, y1 int) {
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
		parallelRows(w, h, func(y0, y1 int) {
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
		parallelRows(w, h, func(y0, y1 int) {
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
	case *image.YCbCr:
		c.colour = true
		if b.Min.X < 0 || b.Min.Y < 0 || !c.ycbcr(m, p) {
			c.generic(img, p)
		}
	case *image.CMYK:
		c.colour = true
		t := c.tone.lut8()
		parallelRows(w, h, func(y0, y1 int) {
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
		parallelRows(w, h, func(y0, y1 int) {
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
