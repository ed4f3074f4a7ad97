package decode

import (
	"image"
	"image/color"

	"sagitta/core/decode/jpegdec"
	"sagitta/core/plane"
)

// Colour on demand. The luminance plane is built once for the whole frame;
// the colour channels are needed only where something is measured per
// channel (an edge's region), so the decoded image is kept as the decoder
// returned it (1.5 bytes per pixel for a 4:2:0 JPEG, 4 for 8-bit RGBA) and
// LinearRGB converts a small rectangle of it to three linear planes with
// the same tone curve as Lum (the one sRGB transfer of core/decode/srgb, or
// the gamma or linear tone chosen). No full-frame float planes of colour
// are ever made (a 24 MP frame would take 288 MB).

// LinearRGB returns the linear red, green and blue samples of the pixels of
// rectangle r (image coordinates) that lie inside the photo: three planes
// of r's size clipped to the frame, whose pixel (0, 0) is the rectangle's
// top-left pixel (origin returns it). ok is false when the photo holds no
// colour to give (a grey file, a raw mosaic, whose planes core/edge reads
// itself) or when r misses the frame. The planes are new on every call.
func (im *Image) LinearRGB(r image.Rectangle) (R, G, B *plane.Plane, ok bool) {
	return im.rgb(r, im.Tone)
}

// StoredRGB is LinearRGB without the tone curve: the stored code values
// over the largest code (0 to 1), as the file encodes them. A JPEG
// subsamples its colour in these values (ITU-T T.81 with JFIF's YCbCr), so
// a position found from the area under an edge profile is kept there by
// the decoder's smoothing of colour, and not in linear light (the
// smoothing of a gamma-encoded difference does not keep linear areas).
func (im *Image) StoredRGB(r image.Rectangle) (R, G, B *plane.Plane, ok bool) {
	if im.Raw != nil {
		return im.rgb(r, im.Tone) // raw data are linear as stored
	}
	return im.rgb(r, Linear)
}

// rgb converts rectangle r of the kept image with tone t.
func (im *Image) rgb(r image.Rectangle, t Tone) (R, G, B *plane.Plane, ok bool) {
	r = r.Intersect(image.Rect(0, 0, im.Width, im.Height))
	if r.Empty() {
		return nil, nil, nil, false
	}
	w, h := r.Dx(), r.Dy()
	if im.Raw != nil {
		if im.Raw.CFA || len(im.Raw.RGB) != 3 {
			return nil, nil, nil, false
		}
		var out [3]*plane.Plane
		for c, p := range im.Raw.RGB {
			out[c] = plane.New(w, h)
			for y := 0; y < h; y++ {
				copy(out[c].Pix[y*w:(y+1)*w], p.Pix[(r.Min.Y+y)*p.W+r.Min.X:])
			}
		}
		return out[0], out[1], out[2], true
	}
	if im.src == nil {
		return nil, nil, nil, false
	}
	R, G, B = plane.New(w, h), plane.New(w, h), plane.New(w, h)
	b := im.src.Bounds()
	t8, t16 := t.lut8(), t.lut16()
	set8 := func(i int, r, g, bb uint8) {
		R.Pix[i], G.Pix[i], B.Pix[i] = t8[r], t8[g], t8[bb]
	}
	switch m := im.src.(type) {
	case *jpegdec.YCbCr:
		var s jpegdec.Scratch
		rr, gg, bb := make([]uint8, w), make([]uint8, w), make([]uint8, w)
		for y := 0; y < h; y++ {
			m.Row(r.Min.Y+y, r.Min.X, r.Max.X, rr, gg, bb, &s)
			for x := range rr {
				set8(y*w+x, rr[x], gg[x], bb[x])
			}
		}
	case *image.YCbCr:
		for y := 0; y < h; y++ {
			for x := 0; x < w; x++ {
				px, py := b.Min.X+r.Min.X+x, b.Min.Y+r.Min.Y+y
				yi, ci := m.YOffset(px, py), m.COffset(px, py)
				rr, gg, bb := ycbcrToRGB(m.Y[yi], m.Cb[ci], m.Cr[ci])
				set8(y*w+x, rr, gg, bb)
			}
		}
	case *image.RGBA:
		for y := 0; y < h; y++ {
			for x := 0; x < w; x++ {
				o := m.PixOffset(b.Min.X+r.Min.X+x, b.Min.Y+r.Min.Y+y)
				s := m.Pix[o : o+4 : o+4]
				if a := s[3]; a != 0xff {
					set8(y*w+x, unpremul8(s[0], a), unpremul8(s[1], a), unpremul8(s[2], a))
					continue
				}
				set8(y*w+x, s[0], s[1], s[2])
			}
		}
	case *image.NRGBA:
		for y := 0; y < h; y++ {
			for x := 0; x < w; x++ {
				o := m.PixOffset(b.Min.X+r.Min.X+x, b.Min.Y+r.Min.Y+y)
				set8(y*w+x, m.Pix[o], m.Pix[o+1], m.Pix[o+2])
			}
		}
	case *image.CMYK:
		for y := 0; y < h; y++ {
			for x := 0; x < w; x++ {
				o := m.PixOffset(b.Min.X+r.Min.X+x, b.Min.Y+r.Min.Y+y)
				rr, gg, bb := color.CMYKToRGB(m.Pix[o], m.Pix[o+1], m.Pix[o+2], m.Pix[o+3])
				set8(y*w+x, rr, gg, bb)
			}
		}
	default: // 16-bit and other types, through 16-bit non-premultiplied colour
		for y := 0; y < h; y++ {
			for x := 0; x < w; x++ {
				n := color.NRGBA64Model.Convert(im.src.At(b.Min.X+r.Min.X+x, b.Min.Y+r.Min.Y+y)).(color.NRGBA64)
				i := y*w + x
				R.Pix[i], G.Pix[i], B.Pix[i] = t16[n.R], t16[n.G], t16[n.B]
			}
		}
	}
	return R, G, B, true
}

// keepColour decides whether the decoded image is kept for LinearRGB
// (colour files only: grey and grey-palette images hold nothing more than
// Lum) and notes a JPEG's chroma subsampling.
func keepColour(out *Image, img image.Image) {
	if !out.Colour {
		return
	}
	out.src = img
	switch m := img.(type) {
	case *image.YCbCr:
		out.ChromaSubsampling = subsampleName(m.SubsampleRatio)
	case *jpegdec.YCbCr:
		out.ChromaSubsampling = subsampleName(m.SubsampleRatio)
	}
}

// subsampleName names a chroma subsampling in the usual J:a:b notation
// (common practice), "" for full-resolution chroma (4:4:4).
func subsampleName(r image.YCbCrSubsampleRatio) string {
	switch r {
	case image.YCbCrSubsampleRatio422:
		return "4:2:2"
	case image.YCbCrSubsampleRatio420:
		return "4:2:0"
	case image.YCbCrSubsampleRatio440:
		return "4:4:0"
	case image.YCbCrSubsampleRatio411:
		return "4:1:1"
	case image.YCbCrSubsampleRatio410:
		return "4:1:0"
	}
	return ""
}
