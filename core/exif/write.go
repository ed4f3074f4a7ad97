package exif

import (
	"encoding/binary"
	"math"
	"sort"
)

// Encode returns a minimal Exif block for a JPEG APP1 segment: "Exif\0\0"
// followed by a little-endian TIFF structure (CIPA DC-008, 4.7.2) with IFD0
// holding Make, Model, Orientation and the Exif IFD pointer, and an Exif IFD
// holding ExifVersion "0230" and the other non-zero fields of t. Zero fields
// are left out. Reals are stored as a RATIONAL (SRATIONAL for the exposure
// bias) with a denominator of at most 1e6 (see rational); ISO and the 35 mm focal
// length are clamped to 65535 (SHORT), as CIPA DC-008 prescribes for ISO.
// Strings are cleaned as the reader cleans them and cut to MaxString bytes
// plus the terminating NUL, the reader's limit. The result is well under the 65533-byte limit of
// one APP1 segment.
func Encode(t Tags) []byte {
	var ifd0, exifIFD []field
	addString(&ifd0, tagMake, t.Make)
	addString(&ifd0, tagModel, t.Model)
	if t.Orientation >= 1 && t.Orientation <= 8 {
		ifd0 = append(ifd0, shortField(tagOrientation, t.Orientation))
	}
	exifIFD = append(exifIFD, field{tag: tagExifVersion, typ: typeUndefined, count: 4, data: []byte("0230")})
	addRational(&exifIFD, tagExposureTime, t.ExposureTimeS)
	addRational(&exifIFD, tagFNumber, t.FNumber)
	if t.ISO > 0 {
		exifIFD = append(exifIFD, shortField(tagISO, t.ISO))
	}
	if t.ExposureBiasEV != 0 && !math.IsNaN(t.ExposureBiasEV) {
		num, den := srational(t.ExposureBiasEV)
		d := binary.LittleEndian.AppendUint32(nil, uint32(num))
		d = binary.LittleEndian.AppendUint32(d, uint32(den))
		exifIFD = append(exifIFD, field{tag: tagExposureBias, typ: typeSRational, count: 1, data: d})
	}
	addRational(&exifIFD, tagFocalLength, t.FocalLengthMM)
	addRational(&exifIFD, tagFocalPlaneXRes, t.FocalPlaneXRes)
	addRational(&exifIFD, tagFocalPlaneYRes, t.FocalPlaneYRes)
	if t.FocalPlaneResUnit > 0 {
		exifIFD = append(exifIFD, shortField(tagFocalPlaneUnit, t.FocalPlaneResUnit))
	}
	if t.FocalLength35MM > 0 {
		exifIFD = append(exifIFD, shortField(tagFocalLength35mm, t.FocalLength35MM))
	}
	addString(&exifIFD, tagLensModel, t.LensModel)
	ifd0 = append(ifd0, field{tag: tagExifIFD, typ: typeLong, count: 1, data: make([]byte, 4)})

	const base = 8 // IFD0 follows the TIFF header
	exifOff := base + ifdSize(ifd0)
	for i := range ifd0 {
		if ifd0[i].tag == tagExifIFD {
			binary.LittleEndian.PutUint32(ifd0[i].data, uint32(exifOff))
		}
	}
	out := make([]byte, 0, len(exifHeader)+exifOff+ifdSize(exifIFD))
	out = append(out, exifHeader...)
	out = append(out, 'I', 'I', 42, 0, base, 0, 0, 0)
	out = appendIFD(out, base, ifd0)
	out = appendIFD(out, exifOff, exifIFD)
	return out
}

// InsertJPEG returns a copy of a JPEG file with an APP1 segment holding
// Encode(t) placed right after the SOI marker (CIPA DC-008, 4.7.2). It does
// not remove an Exif segment the file may already have, so it is meant for
// freshly encoded files. It returns a FormatError if jpeg does not start
// with SOI.
func InsertJPEG(jpeg []byte, t Tags) ([]byte, error) {
	if len(jpeg) < 2 || jpeg[0] != 0xFF || jpeg[1] != 0xD8 {
		return nil, FormatError("not a JPEG file (no SOI marker)")
	}
	payload := Encode(t)
	out := make([]byte, 0, len(jpeg)+4+len(payload))
	out = append(out, 0xFF, 0xD8, 0xFF, 0xE1)
	out = binary.BigEndian.AppendUint16(out, uint16(2+len(payload)))
	out = append(out, payload...)
	return append(out, jpeg[2:]...), nil
}

// field is one IFD entry to write; data holds count values, little-endian.
type field struct {
	tag, typ uint16
	count    uint32
	data     []byte
}

func shortField(tag uint16, v int) field {
	v = min(max(v, 0), math.MaxUint16)
	return field{tag: tag, typ: typeShort, count: 1, data: binary.LittleEndian.AppendUint16(nil, uint16(v))}
}

func addString(fs *[]field, tag uint16, s string) {
	s = cleanString(s)
	if len(s) > MaxString {
		s = cleanString(s[:MaxString]) // drops a rune cut in half
	}
	if s == "" {
		return
	}
	d := append([]byte(s), 0)
	*fs = append(*fs, field{tag: tag, typ: typeASCII, count: uint32(len(d)), data: d})
}

func addRational(fs *[]field, tag uint16, v float64) {
	if !(v > 0) || math.IsInf(v, 0) {
		return
	}
	num, den := rational(v)
	d := binary.LittleEndian.AppendUint32(nil, num)
	d = binary.LittleEndian.AppendUint32(d, den)
	*fs = append(*fs, field{tag: tag, typ: typeRational, count: 1, data: d})
}

// ifdSize is the byte length of an IFD with its out-of-line values,
// each value padded to an even length (TIFF 6.0: values start on a word
// boundary).
func ifdSize(fs []field) int {
	n := 2 + 12*len(fs) + 4
	for _, f := range fs {
		if len(f.data) > 4 {
			n += len(f.data) + len(f.data)&1
		}
	}
	return n
}

// appendIFD writes fs (sorted by tag, as TIFF 6.0 requires) as an IFD at
// TIFF offset off, followed by its out-of-line values. The next-IFD offset
// is 0.
func appendIFD(out []byte, off int, fs []field) []byte {
	sort.Slice(fs, func(i, j int) bool { return fs[i].tag < fs[j].tag })
	le := binary.LittleEndian
	out = le.AppendUint16(out, uint16(len(fs)))
	dataOff := off + 2 + 12*len(fs) + 4
	var extra []byte
	for _, f := range fs {
		out = le.AppendUint16(out, f.tag)
		out = le.AppendUint16(out, f.typ)
		out = le.AppendUint32(out, f.count)
		if len(f.data) <= 4 {
			var v [4]byte
			copy(v[:], f.data)
			out = append(out, v[:]...)
			continue
		}
		out = le.AppendUint32(out, uint32(dataOff+len(extra)))
		extra = append(extra, f.data...)
		if len(f.data)&1 == 1 {
			extra = append(extra, 0)
		}
	}
	out = le.AppendUint32(out, 0)
	return append(out, extra...)
}

// rational returns the last continued-fraction convergent num/den of v > 0
// with den <= 1e6 and num <= 2^32-1. Convergents are best rational
// approximations: |v - num/den| < 1/den^2 (A. Ya. Khinchin, "Continued
// Fractions", 1964, ch. 1).
func rational(v float64) (num, den uint32) {
	const maxDen = 1e6
	if v >= math.MaxUint32 {
		return math.MaxUint32, 1
	}
	h1, h2 := 1.0, 0.0 // numerators of the last two convergents
	k1, k2 := 0.0, 1.0 // denominators
	x := v
	for range 64 {
		a := math.Floor(x)
		h, k := a*h1+h2, a*k1+k2
		if h > math.MaxUint32 || k > maxDen {
			break
		}
		h1, h2, k1, k2 = h, h1, k, k1
		if x-a < 1e-12 {
			break
		}
		x = 1 / (x - a)
	}
	if k1 == 0 { // v below 1/maxDen: the first convergent 0/1 was not reached
		return 0, 1
	}
	return uint32(h1), uint32(k1)
}

// srational is rational for signed values, |num| and den below 2^31.
func srational(v float64) (num, den int32) {
	a := math.Min(math.Abs(v), math.MaxInt32)
	n, d := rational(a)
	if n > math.MaxInt32 {
		n = math.MaxInt32
	}
	if v < 0 {
		return -int32(n), int32(d)
	}
	return int32(n), int32(d)
}
