package jpegdec

import (
	"image"
	"image/color"
)

// YCbCr is a decoded colour JPEG: the luma and chroma planes at their own
// resolution (the embedded image.YCbCr; its At replicates chroma as Go's
// image package does), and Row, which gives the RGB libjpeg-turbo gives.
//
// Chroma stored at half the luma resolution is interpolated with a
// triangle filter: each output sample lies a quarter of an input sample
// from the nearest one, so it takes 3/4 of it and 1/4 of the next nearest
// (in both directions for 4:2:0, as 9/16, 3/16, 3/16, 1/16), with
// libjpeg-turbo's rounding: the two outputs of one input alternate a bias
// below and above one half, so that rounding errors do not accumulate in
// one direction. At the image's edges the missing neighbour is the edge
// sample itself. libjpeg-turbo uses plain replication instead when the
// chroma is at most 2 samples wide for horizontal halving; so does Row.
type YCbCr struct {
	image.YCbCr
	hs, vs int // 1 when chroma is halved horizontally, vertically
	cw, ch int // chroma samples inside the image
	fancyH bool
	fancyV bool
}

func (m *YCbCr) init() {
	w, h := m.Rect.Dx(), m.Rect.Dy()
	switch m.SubsampleRatio {
	case image.YCbCrSubsampleRatio422:
		m.hs = 1
	case image.YCbCrSubsampleRatio420:
		m.hs, m.vs = 1, 1
	case image.YCbCrSubsampleRatio440:
		m.vs = 1
	}
	m.cw, m.ch = (w+m.hs)>>m.hs, (h+m.vs)>>m.vs
	switch {
	case m.hs == 1 && m.vs == 0, m.hs == 1 && m.vs == 1:
		m.fancyH = m.cw > 2
		m.fancyV = m.vs == 1 && m.fancyH
	case m.vs == 1:
		m.fancyV = true
	}
}

// NewYCbCr wraps planes decoded elsewhere (with chroma planes of
// ceil(w/2) or w samples per row as the ratio says): for tests and tools.
func NewYCbCr(m *image.YCbCr) *YCbCr {
	out := &YCbCr{YCbCr: *m}
	out.Rect = image.Rect(0, 0, m.Rect.Dx(), m.Rect.Dy())
	out.init()
	return out
}

// ColorModel returns RGBA: At gives the converted colour.
func (m *YCbCr) ColorModel() color.Model { return color.RGBAModel }

// At returns the colour of pixel (x, y) as Row gives it.
func (m *YCbCr) At(x, y int) color.Color {
	if !(image.Point{x, y}).In(m.Rect) {
		return color.RGBA{}
	}
	var r, g, b [1]uint8
	m.Row(y, x, x+1, r[:], g[:], b[:], nil)
	return color.RGBA{r[0], g[0], b[0], 255}
}

// Scratch holds the per-row buffers of Row; reuse one per goroutine.
type Scratch struct{ cb, cr []int32 }

// Row writes the RGB of pixels x0 <= x < x1 of row y (0 <= x0 < x1 <= width,
// 0 <= y < height) to r, g, b[:x1-x0]. s may be nil.
func (m *YCbCr) Row(y, x0, x1 int, r, g, b []uint8, s *Scratch) {
	if s == nil {
		s = &Scratch{}
	}
	n := x1 - x0
	if cap(s.cb) < n {
		s.cb, s.cr = make([]int32, n), make([]int32, n)
	}
	cb, cr := s.cb[:n], s.cr[:n]
	m.chromaRow(m.Cb, y, x0, x1, cb)
	m.chromaRow(m.Cr, y, x0, x1, cr)
	ys := m.Y[y*m.YStride+x0 : y*m.YStride+x1]
	r, g, b = r[:n], g[:n], b[:n]
	cb, cr = cb[:len(ys)], cr[:len(ys)]
	for i, yv := range ys {
		Y := int32(yv)
		cbv, crv := uint8(cb[i]), uint8(cr[i])
		r[i] = clamp255(Y + crR[crv])
		g[i] = clamp255(Y + (cbG[cbv]+crG[crv])>>16)
		b[i] = clamp255(Y + cbB[cbv])
	}
}

func clamp255(v int32) uint8 {
	if uint32(v) > 255 {
		if v < 0 {
			return 0
		}
		return 255
	}
	return uint8(v)
}

// chromaRow upsamples one chroma plane for pixels [x0, x1) of row y.
func (m *YCbCr) chromaRow(p []uint8, y, x0, x1 int, out []int32) {
	cy := y >> m.vs
	row := p[cy*m.CStride : cy*m.CStride+m.cw]
	if m.vs == 1 && !m.fancyV { // replication both ways (narrow 4:2:0)
		for i := range out {
			out[i] = int32(row[(x0+i)>>m.hs])
		}
		return
	}
	if m.vs == 1 {
		ny := cy - 1 // the nearer chroma row: above for even rows
		if y&1 == 1 {
			ny = cy + 1
		}
		ny = min(max(ny, 0), m.ch-1)
		nrow := p[ny*m.CStride : ny*m.CStride+m.cw]
		if m.hs == 0 { // 4:4:0: vertical triangle only
			bias := int32(1)
			if y&1 == 1 {
				bias = 2
			}
			for i := range out {
				x := x0 + i
				out[i] = (3*int32(row[x]) + int32(nrow[x]) + bias) >> 2
			}
			return
		}
		// 4:2:0: column sums of 3 x near + far, then the horizontal triangle.
		last := m.cw - 1
		if x0 == 0 && len(out) >= 2*last+1 {
			// whole row: each column sum is formed once
			cur := 3*int32(row[0]) + int32(nrow[0])
			prev := cur
			for c := 0; c < last; c++ {
				next := 3*int32(row[c+1]) + int32(nrow[c+1])
				out[2*c] = (3*cur + prev + 8) >> 4
				out[2*c+1] = (3*cur + next + 7) >> 4
				prev, cur = cur, next
			}
			out[2*last] = (3*cur + prev + 8) >> 4
			if len(out) > 2*last+1 {
				out[2*last+1] = (4*cur + 7) >> 4
			}
			return
		}
		for i := range out {
			x := x0 + i
			c := x >> 1
			o := c - 1
			bias := int32(8)
			if x&1 == 1 {
				o, bias = c+1, 7
			}
			o = min(max(o, 0), last)
			cs := 3*int32(row[c]) + int32(nrow[c])
			os := 3*int32(row[o]) + int32(nrow[o])
			out[i] = (3*cs + os + bias) >> 4
		}
		return
	}
	if m.hs == 0 {
		for i := range out {
			out[i] = int32(row[x0+i])
		}
		return
	}
	if !m.fancyH {
		for i := range out {
			out[i] = int32(row[(x0+i)>>1])
		}
		return
	}
	last := m.cw - 1
	if x0 == 0 && len(out) >= 2*last+1 {
		// whole row
		prev, cur := int32(row[0]), int32(row[0])
		for c := 0; c < last; c++ {
			next := int32(row[c+1])
			out[2*c] = (3*cur + prev + 1) >> 2
			out[2*c+1] = (3*cur + next + 2) >> 2
			prev, cur = cur, next
		}
		out[2*last] = (3*cur + prev + 1) >> 2
		if len(out) > 2*last+1 {
			out[2*last+1] = cur
		}
		return
	}
	for i := range out {
		x := x0 + i
		c := x >> 1
		o := c - 1
		bias := int32(1)
		if x&1 == 1 {
			o, bias = c+1, 2
		}
		o = min(max(o, 0), last)
		out[i] = (3*int32(row[c]) + int32(row[o]) + bias) >> 2
	}
}

// YCbCr -> RGB (JPEG File Interchange Format 1.02):
//
//	R = Y + 1.402 (Cr-128)
//	G = Y - 0.34414 (Cb-128) - 0.71414 (Cr-128)
//	B = Y + 1.772 (Cb-128)
//
// with the factors times 2^16 rounded, R and B terms rounded to integers
// per chroma value, the two G terms summed before rounding, and the sums
// clamped to [0, 255], as libjpeg-turbo's tables do.
var crR, cbB, crG, cbG [256]int32

func init() {
	fix := func(x float64) int64 { return int64(x*65536 + 0.5) }
	for i := 0; i < 256; i++ {
		x := int64(i - 128)
		crR[i] = int32((fix(1.40200)*x + 1<<15) >> 16)
		cbB[i] = int32((fix(1.77200)*x + 1<<15) >> 16)
		crG[i] = int32(-fix(0.71414) * x)
		cbG[i] = int32(-fix(0.34414)*x + 1<<15)
	}
}
