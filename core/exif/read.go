package exif

import (
	"encoding/binary"
	"math"
	"strings"
	"unicode"
	"unicode/utf8"
)

// TIFF 6.0 field types (section 2, "Types"), with the BYTE count of one
// value. Type 13 (IFD) comes from the later TIFF Technical Note 1 (from
// memory) and is accepted for the Exif IFD pointer.
const (
	typeByte      = 1
	typeASCII     = 2
	typeShort     = 3
	typeLong      = 4
	typeRational  = 5
	typeSByte     = 6
	typeUndefined = 7
	typeSShort    = 8
	typeSLong     = 9
	typeSRational = 10
	typeFloat     = 11
	typeDouble    = 12
	typeIFD       = 13
)

var typeSize = [...]uint64{0, 1, 1, 2, 4, 8, 1, 1, 2, 4, 8, 4, 8, 4}

// exifHeader starts the APP1 payload that carries Exif (CIPA DC-008, 4.7.2).
const exifHeader = "Exif\x00\x00"

// ReadJPEG returns the Exif tags of a JPEG file. It scans the marker
// segments that precede the first scan (ITU-T T.81, annex B) for an APP1
// segment whose payload starts with "Exif\0\0" and parses the TIFF block
// that follows. A JPEG without an Exif segment is not an error: ReadJPEG
// then returns empty Tags and a nil error. Data that does not start with
// the JPEG SOI marker, or whose segments overrun the buffer before an Exif
// segment is found, gives a FormatError.
func ReadJPEG(data []byte) (Tags, error) {
	if len(data) < 2 || data[0] != 0xFF || data[1] != 0xD8 {
		return Tags{}, FormatError("not a JPEG file (no SOI marker)")
	}
	p := 2
	for {
		// Skip fill bytes (0xFF padding before a marker is allowed, T.81 B.1.1.2).
		for p < len(data) && data[p] == 0xFF && p+1 < len(data) && data[p+1] == 0xFF {
			p++
		}
		if p+1 >= len(data) {
			return Tags{}, nil // ran out before any scan: no Exif
		}
		if data[p] != 0xFF {
			return Tags{}, errorf("JPEG marker expected at offset %d", p)
		}
		m := data[p+1]
		p += 2
		switch {
		case m == 0xD9 || m == 0xDA: // EOI, SOS: Exif must come before the first scan
			return Tags{}, nil
		case m == 0x01 || (m >= 0xD0 && m <= 0xD7): // TEM, RSTn: no length field
			continue
		}
		if p+2 > len(data) {
			return Tags{}, FormatError("truncated JPEG segment")
		}
		n := int(binary.BigEndian.Uint16(data[p:]))
		if n < 2 || p+n > len(data) {
			return Tags{}, errorf("JPEG segment at offset %d overruns the file", p-2)
		}
		seg := data[p+2 : p+n]
		p += n
		if m == 0xE1 && len(seg) >= len(exifHeader) && string(seg[:len(exifHeader)]) == exifHeader {
			return Parse(seg[len(exifHeader):])
		}
	}
}

// ReadTIFF returns the Exif tags of a TIFF file: the TIFF tags of the file's
// first IFD and those of its Exif IFD, if any. A TIFF file is itself a
// TIFF-structured block, so this is Parse under a name that says what it
// expects.
func ReadTIFF(data []byte) (Tags, error) { return Parse(data) }

// Parse reads the tags from a TIFF-structured block: the 8-byte header
// ("II" or "MM", 42, offset of IFD0), IFD0 and the Exif IFD it points to
// (tag 0x8769). Offsets are relative to the start of tiff. Only IFD0 and the
// Exif IFD are read; IFD1 (the thumbnail) is not followed.
func Parse(tiff []byte) (Tags, error) {
	if len(tiff) < 8 {
		return Tags{}, FormatError("TIFF header truncated")
	}
	r := reader{buf: tiff}
	switch string(tiff[:2]) {
	case "II":
		r.order = binary.LittleEndian
	case "MM":
		r.order = binary.BigEndian
	default:
		return Tags{}, FormatError("bad TIFF byte order mark")
	}
	if r.order.Uint16(tiff[2:]) != 42 {
		return Tags{}, FormatError("bad TIFF magic number (want 42)")
	}
	var t Tags
	ifd0 := uint64(r.order.Uint32(tiff[4:]))
	exifOff, hasExif, err := r.readIFD(ifd0, &t)
	if err != nil {
		return Tags{}, err
	}
	if hasExif {
		if exifOff == ifd0 {
			return Tags{}, errorf("IFD loop: Exif IFD pointer points back to IFD0 at offset %d", ifd0)
		}
		if _, _, err := r.readIFD(exifOff, &t); err != nil {
			return Tags{}, err
		}
	}
	return t, nil
}

type reader struct {
	buf   []byte
	order binary.ByteOrder
}

// entry is one decoded IFD entry whose value bytes lie inside the buffer.
type entry struct {
	tag, typ uint16
	count    uint64
	val      []byte // count * typeSize[typ] bytes
}

// readIFD reads the IFD at off into t and returns the Exif IFD offset if
// the IFD holds the pointer tag.
func (r *reader) readIFD(off uint64, t *Tags) (exifOff uint64, hasExif bool, err error) {
	size := uint64(len(r.buf))
	if off < 8 || off+2 > size {
		return 0, false, errorf("IFD offset %d outside the %d-byte block", off, size)
	}
	n := uint64(r.order.Uint16(r.buf[off:]))
	if n > MaxEntries {
		return 0, false, errorf("IFD at offset %d has %d entries (limit %d)", off, n, MaxEntries)
	}
	if off+2+12*n > size {
		return 0, false, errorf("IFD at offset %d truncated", off)
	}
	for i := range n {
		p := r.buf[off+2+12*i : off+14+12*i]
		e := entry{tag: r.order.Uint16(p), typ: r.order.Uint16(p[2:]), count: uint64(r.order.Uint32(p[4:]))}
		if e.typ == 0 || int(e.typ) >= len(typeSize) || e.count == 0 {
			continue // unknown type: skip, as TIFF 6.0 section 2 asks readers to
		}
		if !wanted(e.tag) {
			continue // values of other tags (maker notes, thumbnails) are never touched
		}
		total := e.count * typeSize[e.typ] // count < 2^32, size <= 8: no overflow
		if total <= 4 {
			e.val = p[8 : 8+total]
		} else {
			vo := uint64(r.order.Uint32(p[8:]))
			if vo+total > size {
				return 0, false, errorf("value of tag 0x%04X at offset %d overruns the %d-byte block", e.tag, vo, size)
			}
			e.val = r.buf[vo : vo+total]
		}
		if e.tag == tagExifIFD {
			if v, ok := r.uintValue(e); ok && (e.typ == typeLong || e.typ == typeIFD) {
				exifOff, hasExif = v, true
			}
			continue
		}
		r.store(e, t)
	}
	return exifOff, hasExif, nil
}

func wanted(tag uint16) bool {
	switch tag {
	case tagMake, tagModel, tagOrientation, tagExposureTime, tagFNumber, tagExifIFD, tagISO,
		tagExposureBias, tagFocalLength, tagFocalPlaneXRes, tagFocalPlaneYRes, tagFocalPlaneUnit,
		tagFocalLength35mm, tagLensModel:
		return true
	}
	return false
}

// store puts a decoded entry into t. The first occurrence of a tag wins;
// values of the wrong kind or out of range are skipped.
func (r *reader) store(e entry, t *Tags) {
	switch e.tag {
	case tagMake:
		setString(&t.Make, e)
	case tagModel:
		setString(&t.Model, e)
	case tagLensModel:
		setString(&t.LensModel, e)
	case tagOrientation:
		if v, ok := r.uintValue(e); ok && v >= 1 && v <= 8 && t.Orientation == 0 {
			t.Orientation = int(v)
		}
	case tagISO:
		if v, ok := r.uintValue(e); ok && v > 0 && t.ISO == 0 {
			t.ISO = int(v)
		}
	case tagFocalLength35mm:
		if v, ok := r.uintValue(e); ok && v > 0 && t.FocalLength35MM == 0 {
			t.FocalLength35MM = int(v)
		}
	case tagFocalPlaneUnit:
		if v, ok := r.uintValue(e); ok && v >= 1 && v <= 5 && t.FocalPlaneResUnit == 0 {
			t.FocalPlaneResUnit = int(v)
		}
	case tagExposureTime:
		setPositive(&t.ExposureTimeS, r, e)
	case tagFNumber:
		setPositive(&t.FNumber, r, e)
	case tagFocalLength:
		setPositive(&t.FocalLengthMM, r, e)
	case tagFocalPlaneXRes:
		setPositive(&t.FocalPlaneXRes, r, e)
	case tagFocalPlaneYRes:
		setPositive(&t.FocalPlaneYRes, r, e)
	case tagExposureBias:
		if v, ok := r.realValue(e); ok && t.ExposureBiasEV == 0 {
			t.ExposureBiasEV = v
		}
	}
}

func setPositive(dst *float64, r *reader, e entry) {
	if v, ok := r.realValue(e); ok && v > 0 && *dst == 0 {
		*dst = v
	}
}

// uintValue returns the first value of an unsigned integer entry
// (BYTE, SHORT, LONG, IFD).
func (r *reader) uintValue(e entry) (uint64, bool) {
	switch e.typ {
	case typeByte:
		return uint64(e.val[0]), true
	case typeShort:
		return uint64(r.order.Uint16(e.val)), true
	case typeLong, typeIFD:
		return uint64(r.order.Uint32(e.val)), true
	}
	return 0, false
}

// realValue returns the first value of any numeric entry as a float64. A
// rational with a zero denominator and non-finite floats are rejected.
func (r *reader) realValue(e entry) (float64, bool) {
	var v float64
	switch e.typ {
	case typeByte, typeShort, typeLong:
		u, _ := r.uintValue(e)
		return float64(u), true
	case typeSByte:
		return float64(int8(e.val[0])), true
	case typeSShort:
		return float64(int16(r.order.Uint16(e.val))), true
	case typeSLong:
		return float64(int32(r.order.Uint32(e.val))), true
	case typeRational:
		num, den := r.order.Uint32(e.val), r.order.Uint32(e.val[4:])
		if den == 0 {
			return 0, false
		}
		v = float64(num) / float64(den)
	case typeSRational:
		num, den := int32(r.order.Uint32(e.val)), int32(r.order.Uint32(e.val[4:]))
		if den == 0 {
			return 0, false
		}
		v = float64(num) / float64(den)
	case typeFloat:
		v = float64(math.Float32frombits(r.order.Uint32(e.val)))
	case typeDouble:
		v = math.Float64frombits(r.order.Uint64(e.val))
	default:
		return 0, false
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, false
	}
	return v, true
}

// setString stores an ASCII entry: cut at the first NUL and at MaxString
// bytes, invalid UTF-8 and control characters removed, spaces trimmed.
func setString(dst *string, e entry) {
	if e.typ != typeASCII || *dst != "" {
		return
	}
	b := e.val
	if len(b) > MaxString {
		b = b[:MaxString]
	}
	for i, c := range b {
		if c == 0 {
			b = b[:i]
			break
		}
	}
	*dst = cleanString(string(b))
}

func cleanString(s string) string {
	if !utf8.ValidString(s) {
		s = strings.ToValidUTF8(s, "")
	}
	s = strings.Map(func(r rune) rune {
		if unicode.IsControl(r) {
			return -1
		}
		return r
	}, s)
	return strings.TrimSpace(s)
}
