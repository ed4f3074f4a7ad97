// Package exif reads the few Exif tags Sagitta needs (camera, lens, exposure
// and the focal-plane resolution that gives the pixel pitch) from JPEG files,
// TIFF files and raw TIFF-structured blocks, and writes a minimal Exif block
// for the simulated camera's demo photos.
//
// The layout follows TIFF Revision 6.0 (Adobe, 1992), section 2 (image file
// header, image file directories, field types), and the Exif standard,
// CIPA DC-008 (Exif 2.3), section 4.6 (tag structure, the Exif IFD pointer
// 0x8769 in IFD0) and section 4.7 (APP1 marker segment "Exif\0\0" in JPEG).
// See https://www.cipa.jp/std/documents/e/DC-008-2012_E.pdf.
//
// The reader is bounded: every offset and count is checked against the
// buffer, at most MaxEntries entries are read from one IFD, IFD loops are
// detected, strings are cut at MaxString bytes, and nothing allocates more
// than the size of the input. Malformed input gives a FormatError, never a
// panic. Tags of an unexpected type or with impossible values (a zero
// denominator, an orientation outside 1..8) are skipped, not reported as
// errors, because cameras and editors disagree on details.
package exif

import "fmt"

// Limits of the reader.
const (
	// MaxEntries is the largest entry count accepted for one IFD; real
	// IFDs hold a few dozen entries.
	MaxEntries = 1000
	// MaxString is the longest ASCII value kept, in bytes; longer values
	// are cut.
	MaxString = 256
)

// Tag IDs read and written by this package, as listed in CIPA DC-008
// (Exif 2.3), table 4 (TIFF tags in IFD0) and table 7 (Exif IFD tags).
// The TIFF tags (0x010F, 0x0110, 0x0112) also appear in TIFF 6.0, section 8.
// IDs marked "from memory" were recalled, not checked against a copy of the
// standard.
const (
	tagMake            = 0x010F // ASCII, TIFF 6.0 and CIPA DC-008
	tagModel           = 0x0110 // ASCII, TIFF 6.0 and CIPA DC-008
	tagOrientation     = 0x0112 // SHORT 1..8, TIFF 6.0 and CIPA DC-008
	tagExposureTime    = 0x829A // RATIONAL seconds, CIPA DC-008
	tagFNumber         = 0x829D // RATIONAL, CIPA DC-008
	tagExifIFD         = 0x8769 // LONG offset of the Exif IFD, CIPA DC-008
	tagISO             = 0x8827 // SHORT, PhotographicSensitivity (ISOSpeedRatings before 2.3), CIPA DC-008
	tagExifVersion     = 0x9000 // UNDEFINED 4 bytes "0230", CIPA DC-008
	tagExposureBias    = 0x9204 // SRATIONAL EV, CIPA DC-008
	tagFocalLength     = 0x920A // RATIONAL mm, CIPA DC-008
	tagFocalPlaneXRes  = 0xA20E // RATIONAL pixels per unit, CIPA DC-008 (from memory)
	tagFocalPlaneYRes  = 0xA20F // RATIONAL pixels per unit, CIPA DC-008 (from memory)
	tagFocalPlaneUnit  = 0xA210 // SHORT 2 = inch (default), 3 = cm, CIPA DC-008 (from memory)
	tagFocalLength35mm = 0xA405 // SHORT mm, FocalLengthIn35mmFilm, CIPA DC-008 (from memory)
	tagLensModel       = 0xA434 // ASCII, new in Exif 2.3, CIPA DC-008 (from memory)
)

// Focal-plane resolution units (tag 0xA210). CIPA DC-008 defines 2 = inch
// (the default when the tag is absent) and 3 = centimetre; 4 = millimetre
// and 5 = micrometre are the TIFF/EP extension some writers use (from
// memory).
const (
	UnitInch       = 2
	UnitCentimetre = 3
	UnitMillimetre = 4
	UnitMicrometre = 5
)

// Tags holds the Exif values Sagitta uses. A zero value means "not present".
// Strings are cut at MaxString bytes, made valid UTF-8 and stripped of
// control characters and trailing spaces.
type Tags struct {
	Make      string // 0x010F
	Model     string // 0x0110
	LensModel string // 0xA434
	// Orientation (0x0112) is how the stored pixels should be turned for
	// display: 1 = as stored, 3 = 180 degrees, 6 and 8 = quarter turns,
	// 2, 4, 5, 7 = mirrored variants (TIFF 6.0, section 8).
	Orientation     int
	ExposureTimeS   float64 // 0x829A, seconds
	FNumber         float64 // 0x829D
	ExposureBiasEV  float64 // 0x9204, EV (SRATIONAL)
	FocalLengthMM   float64 // 0x920A, mm
	FocalLength35MM int     // 0xA405, mm (35 mm film equivalent)
	ISO             int     // 0x8827
	// FocalPlaneXRes and FocalPlaneYRes (0xA20E, 0xA20F) are sensor pixels
	// per FocalPlaneResUnit along the image width and height.
	FocalPlaneXRes float64
	FocalPlaneYRes float64
	// FocalPlaneResUnit (0xA210): UnitInch, UnitCentimetre, UnitMillimetre
	// or UnitMicrometre; 0 when absent.
	FocalPlaneResUnit int
}

// IsZero reports whether no tag was found.
func (t Tags) IsZero() bool { return t == Tags{} }

// unitUM returns the length of a focal-plane resolution unit in
// micrometres; an absent unit (0) means inch, the CIPA DC-008 default.
func unitUM(unit int) (float64, bool) {
	switch unit {
	case 0, UnitInch:
		return 25400, true // 1 inch = 25.4 mm exactly (international inch, 1959)
	case UnitCentimetre:
		return 10000, true
	case UnitMillimetre:
		return 1000, true
	case UnitMicrometre:
		return 1, true
	}
	return 0, false
}

// PixelPitchUM returns the sensor pixel pitch in micrometres along the
// image width, from the focal-plane X resolution and its unit:
// pitch = unit length / resolution. It reports false when the resolution is
// missing or not positive, or the unit is unknown (1 = "no absolute unit").
// The value describes the full sensor image; it is wrong for files that were
// resized after capture.
func (t Tags) PixelPitchUM() (float64, bool) {
	if !(t.FocalPlaneXRes > 0) {
		return 0, false
	}
	u, ok := unitUM(t.FocalPlaneResUnit)
	if !ok {
		return 0, false
	}
	return u / t.FocalPlaneXRes, true
}

// FormatError reports malformed Exif, TIFF or JPEG structure.
type FormatError string

func (e FormatError) Error() string { return "exif: " + string(e) }

func errorf(format string, a ...any) error { return FormatError(fmt.Sprintf(format, a...)) }
