package decode

import (
	"image"

	"sagitta/core/plane"
)

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
	parallelRows(w, b.Dy(), func(y0, y1 int) {
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
