package decode

import (
	"errors"
	"fmt"
	"image"
	"strings"

	"sagitta/core/decode/jpegdec"
	"sagitta/core/exif"
	"sagitta/core/note"
)

// Decoding by another decoder (the browser's). A web page can decode JPEG
// and 8-bit PNG with the browser's own decoder far faster than Go compiled
// to WebAssembly; the pixels then reach the core as 8-bit RGBA. Only files
// whose decoding is exact enough to give the same luminance go that way
// (ForeignDecodable); the file's bytes still give its format, size, Exif
// and tone chunks, and the tone curve is chosen exactly as Decode chooses
// it, so the two paths differ only in the decoders' rounding (the JPEG
// inverse DCT and chroma upsampling; ITU-T T.81 leaves both to the
// decoder within the accuracy of its annex A.3.3, from memory).

// ErrForeignDeclined is returned (wrapped) by FromPixels for a file whose
// pixels must be decoded by Decode.
var ErrForeignDeclined = errors.New("decode: this file is decoded by the core")

// ForeignDecodable reports whether a browser may decode the file for
// FromPixels: a JPEG of 8-bit samples with one (grey) or three (YCbCr or
// RGB) components that core/decode/jpegdec decodes (its pixels are then
// libjpeg-turbo's, the browser's decoder's: chroma at full, half or
// quarter resolution as 4:4:4, 4:2:2, 4:4:0, 4:2:0), or a PNG of 8-bit
// grey, grey+alpha, RGB or RGBA samples, and no Exif orientation other
// than 1 (a browser may apply it). Everything
// else (16-bit PNG, palette PNG, CMYK JPEG, TIFF, DNG, a damaged header) is
// left to Decode.
func ForeignDecodable(data []byte) bool {
	format, err := sniff(data)
	if err != nil {
		return false
	}
	var t exif.Tags
	switch format {
	case FormatJPEG:
		bits, comps, ok := jpegFrame(data)
		if !ok || bits != 8 || (comps != 1 && comps != 3) || !jpegdec.Supported(data) {
			return false // the core's decoder gives the browser's pixels only for these
		}
		t, err = exif.ReadJPEG(data)
	case FormatPNG:
		pi, e := scanPNG(data)
		if e != nil || pi.bitDepth != 8 || pi.colourType == 3 {
			return false
		}
		if pi.exif != nil {
			t, err = exif.Parse(trimExifPrefix(pi.exif))
		}
	default:
		return false
	}
	return err == nil && t.Orientation <= 1
}

// FromPixels builds the Image of a JPEG or PNG file from pixels another
// decoder made of it: 8-bit samples as *image.NRGBA (or *image.RGBA, which
// is un-premultiplied as in Decode), Width x Height of the file's header,
// colour values as stored (no colour conversion), Exif orientation not
// applied. It reads format, size, Exif and tone from data exactly as Decode
// does and returns the same kinds of errors; a file ForeignDecodable
// refuses gives an error wrapping ErrForeignDeclined. pix is never copied;
// a colour photo's is kept (as Decode keeps its decoded image) for
// LinearRGB. A JPEG's ChromaSubsampling is read from its header, as the
// other decoder's pixels are those Decode gives (core/decode/jpegdec gives
// libjpeg-turbo's, the browser's decoder).
func FromPixels(data []byte, pix image.Image, opt Options) (*Image, error) {
	format, w, h, err := checkHeader(data, opt)
	if err != nil {
		return nil, err
	}
	if !ForeignDecodable(data) {
		return nil, fmt.Errorf("%w (%s)", ErrForeignDeclined, format)
	}
	switch pix.(type) {
	case *image.NRGBA, *image.RGBA:
	default:
		return nil, fmt.Errorf("decode: pixels of type %T given for %s; want 8-bit RGBA", pix, strings.ToUpper(format))
	}
	if b := pix.Bounds(); b.Dx() != w || b.Dy() != h {
		return nil, fmt.Errorf("decode: %d x %d pixels given for a %d x %d %s", b.Dx(), b.Dy(), w, h, strings.ToUpper(format))
	}
	out := &Image{Format: format, Width: w, Height: h, BitDepth: 8}
	var pi pngInfo
	if format == FormatPNG {
		if pi, err = scanPNG(data); err != nil {
			return nil, err
		}
		out.BitDepth = pi.bitDepth
	}
	out.Tone, out.ToneSource, out.ToneFrom = chooseTone(opt.Tone, format, pi, out)
	conv := newConverter(out.Tone)
	out.Lum = conv.luminance(pix)
	switch format {
	case FormatPNG:
		out.Colour = pi.colourType&2 != 0
	case FormatJPEG:
		_, comps, _ := jpegFrame(data)
		out.Colour = comps != 1
		if out.Colour {
			out.ChromaSubsampling = jpegSubsampling(data)
		}
	}
	if conv.alpha {
		out.warn(note.AlphaIgnored, alphaText)
	}
	keepColour(out, pix)
	readExif(out, format, data, pi)
	return out, nil
}

// jpegFrame reads the sample precision and the number of components from
// the first start-of-frame marker (ITU-T T.81, B.2.2); ok is false for a
// damaged header or a lossless, hierarchical or arithmetic-coded frame.
func jpegFrame(data []byte) (bits, comps int, ok bool) {
	p := 2
	for p+4 <= len(data) {
		if data[p] != 0xff {
			return 0, 0, false
		}
		m := data[p+1]
		if m == 0xff { // fill byte
			p++
			continue
		}
		n := int(data[p+2])<<8 | int(data[p+3])
		if n < 2 || p+2+n > len(data) {
			return 0, 0, false
		}
		switch {
		case m == 0xc0 || m == 0xc1 || m == 0xc2: // baseline, extended, progressive (Huffman)
			if n < 8 {
				return 0, 0, false
			}
			return int(data[p+4]), int(data[p+9]), true
		case m >= 0xc3 && m <= 0xcf && m != 0xc4 && m != 0xc8 && m != 0xcc:
			return 0, 0, false // lossless, hierarchical or arithmetic
		case m == 0xda || m == 0xd9: // scan or end before a frame
			return 0, 0, false
		}
		p += 2 + n
	}
	return 0, 0, false
}

// jpegSubsampling names the chroma subsampling of a three-component JPEG
// from the sampling factors of its frame header (ITU-T T.81, B.2.2), as
// keepColour names that of a decoded image; "" for full-resolution chroma
// or anything unusual.
func jpegSubsampling(data []byte) string {
	p := 2
	for p+4 <= len(data) {
		if data[p] != 0xff {
			return ""
		}
		m := data[p+1]
		if m == 0xff {
			p++
			continue
		}
		n := int(data[p+2])<<8 | int(data[p+3])
		if n < 2 || p+2+n > len(data) {
			return ""
		}
		if m == 0xc0 || m == 0xc1 || m == 0xc2 {
			if n < 17 || data[p+9] != 3 {
				return ""
			}
			y, cb, cr := data[p+11], data[p+14], data[p+17]
			if cb != cr || cb != 0x11 {
				return ""
			}
			return map[byte]string{0x21: "4:2:2", 0x22: "4:2:0", 0x12: "4:4:0", 0x41: "4:1:1", 0x42: "4:1:0"}[y]
		}
		if m == 0xda || m == 0xd9 {
			return ""
		}
		p += 2 + n
	}
	return ""
}

// LumDiff compares the luminance of a file decoded by Decode with that of
// pixels another decoder made of it (as FromPixels reads them): the
// largest and the mean absolute difference, in linear light with full
// scale 1. It is the check of a browser's decoder against the core's.
func LumDiff(data []byte, pix image.Image, opt Options) (maxDiff, meanDiff float64, err error) {
	a, err := Decode(data, opt)
	if err != nil {
		return 0, 0, err
	}
	b, err := FromPixels(data, pix, opt)
	if err != nil {
		return 0, 0, err
	}
	var sum float64
	for i, v := range a.Lum.Pix {
		d := float64(v - b.Lum.Pix[i])
		if d < 0 {
			d = -d
		}
		sum += d
		maxDiff = max(maxDiff, d)
	}
	return maxDiff, sum / float64(len(a.Lum.Pix)), nil
}
