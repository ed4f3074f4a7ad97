// Package decode turns image file bytes into a linear-light luminance plane:
// it detects the format (PNG, JPEG, TIFF) from its magic bytes, refuses
// oversized images from the header before allocating pixels, decodes (JPEG
// with the core's own decoder, core/decode/jpegdec, which gives the pixels
// of libjpeg-turbo's defaults; the rest with the standard decoders), undoes
// the tone curve and forms luminance.
//
// Tone curves: sRGB decoding per IEC 61966-2-1:1999 (section 5.2), a pure
// power law L = V^G, or linear data L = V, with V the code value divided by
// the largest code value. With ToneAuto the file decides: a PNG gAMA chunk
// of 1.0 means linear, another gAMA value g means L = V^(100000/g), unless
// an sRGB or iCCP chunk is present, which take precedence (PNG, ISO/IEC
// 15948:2004 and https://www.w3.org/TR/png/, sections 11.3.3.2 gAMA,
// 11.3.3.3 iCCP, 11.3.3.5 sRGB; section numbers from memory). Everything
// else is taken as sRGB, and Image.ToneSource says which rule applied.
//
// Luminance is Y = 0.2126 R + 0.7152 G + 0.0722 B on linear values: the
// coefficients of Rec. ITU-R BT.709-6 (part 1, item 3.2, from memory),
// which are also the Y row of the linear RGB -> XYZ matrix of
// IEC 61966-2-1 (sRGB shares the BT.709 primaries). Grey images are
// linearised directly. Alpha is ignored: nothing is composited, colour
// channels are used as stored (premultiplied data is un-premultiplied
// first) and a warning is added.
//
// Pixels are returned as stored: the Exif orientation is reported, not
// applied, because measurements refer to the sensor's own geometry.
// A full-scale code value decodes to exactly 1 (see package plane).
package decode

import (
	"bytes"
	"fmt"
	"image"
	"image/jpeg"
	"image/png"
	"strings"

	"golang.org/x/image/tiff"

	"sagitta/core/decode/jpegdec"
	"sagitta/core/exif"
	"sagitta/core/note"
	"sagitta/core/plane"
	"sagitta/core/raw"
)

// DefaultMaxPixels is the pixel limit used when Options.MaxPixels is 0:
// 120 megapixels, above any current still camera's image and below the
// memory a browser tab can be expected to give (4 bytes per pixel for the
// plane plus up to 8 for the decoded image).
const DefaultMaxPixels = 120_000_000

// Options controls Decode. The zero value decodes with ToneAuto and the
// default pixel limit.
type Options struct {
	// Tone overrides the file's tone curve unless it is ToneAuto.
	Tone Tone
	// MaxPixels is the largest width x height accepted; 0 means
	// DefaultMaxPixels.
	MaxPixels int
}

// Image is a decoded photo as linear-light luminance.
type Image struct {
	Format        string // FormatPNG, FormatJPEG, FormatTIFF or FormatDNG
	Width, Height int    // px
	// BitDepth is the bits per sample stored in the file (PNG IHDR, TIFF
	// BitsPerSample; 8 for JPEG, as Go decodes only 8-bit JPEG). For a
	// palette PNG it is the index depth.
	BitDepth int
	// Colour reports whether the file holds colour: RGB, YCbCr or CMYK
	// data, or a palette with at least one non-grey entry.
	Colour bool
	// Tone is the tone curve actually applied (never ToneAuto) and
	// ToneSource says why, in plain words: "user", "file: PNG gAMA 1.0",
	// "default: sRGB", ...; ToneFrom is its code (note.ToneUser,
	// note.ToneFile or note.ToneDefault).
	Tone       Tone
	ToneSource string
	ToneFrom   note.Code
	// Lum is the linear-light luminance, Width x Height, full scale = 1.
	Lum *plane.Plane
	// Exif holds the tags read from a JPEG APP1 segment, a TIFF file's
	// IFD0 and Exif IFD, or a PNG eXIf chunk; empty if there are none.
	Exif exif.Tags
	// Raw is the DNG as read by core/raw (the colour filter array mosaic,
	// or linear RGB planes, with black 0 and white 1), nil for other
	// formats. Lum is then derived from it (see decodeDNG).
	Raw *raw.Image
	// ChromaSubsampling names a JPEG's chroma subsampling ("4:2:0",
	// "4:2:2", ...) when its colour is stored at a lower resolution than
	// its luminance, "" otherwise: colour measured per channel (LinearRGB)
	// is then blurred and shifted by the decoder's upsampling of chroma.
	ChromaSubsampling string
	// src is the decoded image of a colour file, kept for LinearRGB
	// (colour.go); nil for grey files and DNG.
	src image.Image
	// Warnings are plain-language notes about choices made while
	// decoding (assumed tone, ignored alpha, unreadable Exif, ...);
	// WarningCodes holds their codes, aligned (core/note).
	Warnings     []string
	WarningCodes []note.Code
}

// warn adds a warning with its code.
func (im *Image) warn(c note.Code, text string) {
	im.Warnings = append(im.Warnings, text)
	im.WarningCodes = append(im.WarningCodes, c)
}

// checkHeader checks the options' tone and reads the file's format and
// size from its header, refusing an image over the options' pixel limit
// before anything is allocated for it.
func checkHeader(data []byte, opt Options) (format string, w, h int, err error) {
	if err := opt.Tone.Check(); err != nil {
		return "", 0, 0, err
	}
	if format, w, h, err = Config(data); err != nil {
		return "", 0, 0, err
	}
	limit := opt.MaxPixels
	if limit <= 0 {
		limit = DefaultMaxPixels
	}
	if int64(w)*int64(h) > int64(limit) {
		return "", 0, 0, &TooLargeError{Width: w, Height: h, MaxPixels: limit}
	}
	return format, w, h, nil
}

// Config returns the format and the size in px of an image from its header,
// without decoding pixels. Errors are *FormatError or *UnsupportedError.
func Config(data []byte) (format string, w, h int, err error) {
	format, err = sniff(data)
	if err != nil {
		return "", 0, 0, err
	}
	if format == FormatTIFF && raw.IsDNG(data) {
		w, h, err = configDNG(data)
		if err != nil {
			return "", 0, 0, err
		}
		return FormatDNG, w, h, nil
	}
	if format == FormatTIFF {
		if ti := scanTIFF(data); ti.rawCamera || ti.reducedRes {
			return "", 0, 0, unsupportedErr("raw camera files are not supported (the first TIFF page is a preview); export a TIFF, PNG or JPEG", nil)
		}
	}
	var cfg image.Config
	err = guard(format, func() (e error) {
		r := bytes.NewReader(data)
		switch format {
		case FormatPNG:
			cfg, e = png.DecodeConfig(r)
		case FormatJPEG:
			cfg, e = jpeg.DecodeConfig(r)
		case FormatTIFF:
			cfg, e = tiff.DecodeConfig(r)
		}
		return e
	})
	if err != nil {
		return "", 0, 0, err
	}
	if cfg.Width <= 0 || cfg.Height <= 0 {
		return "", 0, 0, formatErr(fmt.Sprintf("%s declares an empty %d x %d image", strings.ToUpper(format), cfg.Width, cfg.Height), nil)
	}
	return format, cfg.Width, cfg.Height, nil
}

// Decode decodes a PNG, JPEG, TIFF or DNG file into linear-light luminance
// (a DNG also keeps its raw planes in Image.Raw).
// The size is checked from the header first: an image above the pixel limit
// gives a *TooLargeError before any pixel memory is allocated. Other errors
// are *FormatError (not an image, corrupt, truncated) or *UnsupportedError
// (a valid file using something not decoded here); an invalid opt.Tone is
// reported as a plain error. Decode never panics on bad data.
//
// A grey image is dropped as soon as the plane is built; a colour image is
// kept as decoded (1.5 to 8 bytes per pixel) for LinearRGB, which converts
// small rectangles of it on demand. The peak memory is that of the decoded
// image plus the plane (4 bytes per pixel).
func Decode(data []byte, opt Options) (*Image, error) {
	format, w, h, err := checkHeader(data, opt)
	if err != nil {
		return nil, err
	}
	if format == FormatDNG {
		return decodeDNG(data, opt)
	}
	out := &Image{Format: format, Width: w, Height: h, BitDepth: 8}
	var pi pngInfo
	switch format {
	case FormatPNG:
		if pi, err = scanPNG(data); err != nil {
			return nil, err
		}
		out.BitDepth = pi.bitDepth
	case FormatTIFF:
		out.BitDepth = scanTIFF(data).bitsPerSample
	}

	var img image.Image
	err = guard(format, func() (e error) {
		r := bytes.NewReader(data)
		switch format {
		case FormatPNG:
			img, e = png.Decode(r)
		case FormatJPEG:
			// The core's decoder gives libjpeg-turbo's pixels (so a
			// browser's decoding agrees); what it refuses (CMYK, RGB,
			// arithmetic coding, 12-bit, damaged data) goes to Go's.
			limit := opt.MaxPixels
			if limit <= 0 {
				limit = DefaultMaxPixels
			}
			if img, e = jpegdec.Decode(data, limit); e != nil {
				img, e = jpeg.Decode(r)
			}
		case FormatTIFF:
			img, e = tiff.Decode(r)
		}
		return e
	})
	if err != nil {
		return nil, err
	}
	if b := img.Bounds(); b.Dx() != w || b.Dy() != h {
		return nil, formatErr(fmt.Sprintf("corrupt %s (header says %d x %d, decoder gave %d x %d)", strings.ToUpper(format), w, h, b.Dx(), b.Dy()), nil)
	}

	out.Tone, out.ToneSource, out.ToneFrom = chooseTone(opt.Tone, format, pi, out)
	conv := newConverter(out.Tone)
	out.Lum = conv.luminance(img)
	out.Colour = conv.colour
	if format == FormatPNG {
		// The PNG colour type is the better witness for grey+alpha, which
		// image/png returns as NRGBA.
		out.Colour = pi.colourType&2 != 0 && (pi.colourType != 3 || conv.colour)
	}
	keepColour(out, img) // kept for LinearRGB when it holds colour (colour.go)
	img = nil            // release grey pixels before anything else allocates
	if conv.alpha {
		out.warn(note.AlphaIgnored, alphaText)
	}
	readExif(out, format, data, pi)
	return out, nil
}

// alphaText is the warning of a photo with an alpha channel.
const alphaText = "alpha channel ignored: colour values used as stored, nothing composited"

// trimExifPrefix drops the JPEG "Exif\0\0" prefix some writers keep in a
// PNG eXIf chunk.
func trimExifPrefix(b []byte) []byte { return bytes.TrimPrefix(b, []byte("Exif\x00\x00")) }

// chooseTone resolves ToneAuto into the tone to apply and its reason.
func chooseTone(user Tone, format string, pi pngInfo, out *Image) (Tone, string, note.Code) {
	if user.Kind != ToneAuto {
		return user, "user", note.ToneUser
	}
	if format == FormatPNG {
		switch {
		case pi.hasSRGB:
			return SRGB, "file: PNG sRGB chunk", note.ToneFile
		case pi.hasICCP:
			out.warn(note.ICCNotRead, "PNG ICC profile not read: decoded as sRGB")
			return SRGB, "file: PNG iCCP chunk (profile not read; assumed sRGB)", note.ToneFile
		case pi.hasGAMA && pi.gama == 100000:
			return Linear, "file: PNG gAMA 1.0", note.ToneFile
		case pi.hasGAMA && pi.gama > 0:
			file := float64(pi.gama) / 100000 // the encoding exponent, 11.3.3.2
			g := 1 / file
			if t := Gamma(g); t.Check() == nil {
				return t, fmt.Sprintf("file: PNG gAMA %.5g (decoding gamma %.4g)", file, g), note.ToneFile
			}
			out.warn(note.GammaIgnored, fmt.Sprintf("PNG gAMA %.5g ignored: decoding gamma %.4g is outside [%v, %v]", file, g, MinGamma, MaxGamma))
		case pi.hasGAMA:
			out.warn(note.GammaZero, "PNG gAMA of 0 ignored")
		}
	}
	if out.BitDepth == 16 {
		out.warn(note.NoToneCurve, "16-bit file declares no tone curve: decoded as sRGB; choose linear if it holds linear data from a raw converter")
	}
	return SRGB, "default: sRGB", note.ToneDefault
}

// readExif fills out.Exif; an unreadable Exif block is a warning, not a
// failure, since the pixels are fine.
func readExif(out *Image, format string, data []byte, pi pngInfo) {
	var (
		t   exif.Tags
		err error
	)
	switch format {
	case FormatJPEG:
		t, err = exif.ReadJPEG(data)
	case FormatTIFF:
		t, err = exif.ReadTIFF(data)
	case FormatPNG:
		if pi.exif != nil {
			// Some writers keep the JPEG "Exif\0\0" prefix in eXIf.
			t, err = exif.Parse(trimExifPrefix(pi.exif))
		}
	}
	if err != nil {
		out.warn(note.ExifUnreadable, "Exif data unreadable ("+err.Error()+")")
		return
	}
	out.Exif = t
	if t.Orientation > 1 {
		out.warn(note.OrientationNotApplied, fmt.Sprintf("Exif orientation %d not applied: pixels analysed as stored on the sensor", t.Orientation))
	}
}
