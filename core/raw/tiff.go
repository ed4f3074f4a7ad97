package raw

import (
	"encoding/binary"
	"math"
)

// TIFF structure (TIFF Revision 6.0, Adobe 1992, section 2: the 8-byte
// header, IFDs of 12-byte entries, values in place when they fit in 4
// bytes, else at an offset) with the SubIFDs tag of the TIFF Technical
// Notes (Adobe 1995, tag 330), as DNG uses them (DNG Specification 1.4.0.0,
// chapter 3, "File structure"). Every count and offset is checked against
// the file before it is used.

// Field types (TIFF 6.0, section 2, "Types").
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
	typeIFD       = 13 // TIFF Technical Notes: an IFD offset, like LONG
)

var typeSize = [...]int{0, 1, 1, 2, 4, 8, 1, 1, 2, 4, 8, 4, 8, 4}

// Limits of the structure walk.
const (
	maxEntries = 1000    // entries in one IFD
	maxIFDs    = 64      // IFDs visited in one file
	maxValues  = 1 << 22 // values read from one tag (a 120 MP image in 16 x 16 tiles has 470 000)
)

// entry is one IFD entry.
type entry struct {
	tag, typ uint16
	count    uint64
	off      uint64 // offset of the value bytes in the file
}

// ifd is one image file directory: its entries by tag.
type ifd struct {
	off     uint64
	entries map[uint16]entry
	depth   int // 0 for the main chain, 1 for a SubIFD, ...
}

type tiffFile struct {
	data []byte
	bo   binary.ByteOrder
}

func (f *tiffFile) u16(o uint64) uint16 { return f.bo.Uint16(f.data[o:]) }
func (f *tiffFile) u32(o uint64) uint32 { return f.bo.Uint32(f.data[o:]) }

// parseHeader reads the 8-byte TIFF header and returns the first IFD offset.
func parseHeader(data []byte) (*tiffFile, uint64, error) {
	if len(data) < 8 {
		return nil, 0, FormatError("not a DNG file (too short for a TIFF header)")
	}
	f := &tiffFile{data: data}
	switch string(data[:2]) {
	case "II":
		f.bo = binary.LittleEndian
	case "MM":
		f.bo = binary.BigEndian
	default:
		return nil, 0, FormatError("not a DNG file (no TIFF byte-order mark)")
	}
	if f.u16(2) != 42 {
		return nil, 0, FormatError("not a DNG file (TIFF magic number 42 missing)")
	}
	return f, uint64(f.u32(4)), nil
}

// readIFD reads the IFD at off and returns it and the next IFD's offset.
func (f *tiffFile) readIFD(off uint64, depth int) (*ifd, uint64, error) {
	n := uint64(len(f.data))
	if off < 8 || off+2 > n {
		return nil, 0, formatf("IFD offset %d outside the file (%d bytes)", off, n)
	}
	cnt := uint64(f.u16(off))
	if cnt == 0 || cnt > maxEntries {
		return nil, 0, formatf("IFD at %d declares %d entries", off, cnt)
	}
	end := off + 2 + 12*cnt
	if end+4 > n {
		return nil, 0, formatf("IFD at %d runs past the end of the file", off)
	}
	d := &ifd{off: off, entries: make(map[uint16]entry, cnt), depth: depth}
	for i := uint64(0); i < cnt; i++ {
		p := off + 2 + 12*i
		e := entry{tag: f.u16(p), typ: f.u16(p + 2), count: uint64(f.u32(p + 4))}
		if e.typ == 0 || int(e.typ) >= len(typeSize) {
			continue // unknown types are skipped, as TIFF 6.0 asks readers to
		}
		size := e.count * uint64(typeSize[e.typ])
		if size <= 4 {
			e.off = p + 8
		} else {
			e.off = uint64(f.u32(p + 8))
			if e.off+size > n || e.off+size < e.off {
				// Kept but marked unreadable: only an error if the tag is used.
				e.off = math.MaxUint64
			}
		}
		d.entries[e.tag] = e
	}
	return d, uint64(f.u32(end)), nil
}

// has reports whether the IFD holds tag.
func (d *ifd) has(tag uint16) bool { _, ok := d.entries[tag]; return ok }

// ints returns the values of an integer tag (BYTE, SHORT, LONG, their signed
// forms, IFD); ok is false if the tag is absent, of another type, or its
// values lie outside the file.
func (f *tiffFile) ints(d *ifd, tag uint16) ([]int64, bool) {
	e, found := d.entries[tag]
	if !found || e.off == math.MaxUint64 || e.count > maxValues {
		return nil, false
	}
	out := make([]int64, e.count)
	for i := range out {
		p := e.off + uint64(i)*uint64(typeSize[e.typ])
		switch e.typ {
		case typeByte, typeUndefined:
			out[i] = int64(f.data[p])
		case typeSByte:
			out[i] = int64(int8(f.data[p]))
		case typeShort:
			out[i] = int64(f.u16(p))
		case typeSShort:
			out[i] = int64(int16(f.u16(p)))
		case typeLong, typeIFD:
			out[i] = int64(f.u32(p))
		case typeSLong:
			out[i] = int64(int32(f.u32(p)))
		default:
			return nil, false
		}
	}
	return out, true
}

// int1 returns the first value of an integer tag, or def if it is absent.
func (f *tiffFile) int1(d *ifd, tag uint16, def int64) (int64, bool) {
	v, ok := f.ints(d, tag)
	if !ok || len(v) == 0 {
		if d.has(tag) {
			return def, false
		}
		return def, true
	}
	return v[0], true
}

// reals returns the values of a numeric tag of any type as float64.
func (f *tiffFile) reals(d *ifd, tag uint16) ([]float64, bool) {
	e, found := d.entries[tag]
	if !found || e.off == math.MaxUint64 || e.count > maxValues {
		return nil, false
	}
	switch e.typ {
	case typeRational, typeSRational, typeFloat, typeDouble:
	default:
		v, ok := f.ints(d, tag)
		if !ok {
			return nil, false
		}
		out := make([]float64, len(v))
		for i, x := range v {
			out[i] = float64(x)
		}
		return out, true
	}
	out := make([]float64, e.count)
	for i := range out {
		p := e.off + uint64(i)*uint64(typeSize[e.typ])
		switch e.typ {
		case typeRational:
			num, den := f.u32(p), f.u32(p+4)
			if den == 0 {
				return nil, false
			}
			out[i] = float64(num) / float64(den)
		case typeSRational:
			num, den := int32(f.u32(p)), int32(f.u32(p+4))
			if den == 0 {
				return nil, false
			}
			out[i] = float64(num) / float64(den)
		case typeFloat:
			out[i] = float64(math.Float32frombits(f.u32(p)))
		case typeDouble:
			out[i] = math.Float64frombits(f.bo.Uint64(f.data[p:]))
		}
		if math.IsNaN(out[i]) || math.IsInf(out[i], 0) {
			return nil, false
		}
	}
	return out, true
}

// ascii returns an ASCII tag's text up to its first NUL, cut to 256 bytes
// and stripped of control characters.
func (f *tiffFile) ascii(d *ifd, tag uint16) string {
	e, found := d.entries[tag]
	if !found || e.off == math.MaxUint64 || (e.typ != typeASCII && e.typ != typeByte) {
		return ""
	}
	b := f.data[e.off : e.off+min(e.count, 256)]
	out := make([]byte, 0, len(b))
	for _, c := range b {
		if c == 0 {
			break
		}
		if c >= 0x20 && c < 0x7F {
			out = append(out, c)
		}
	}
	for len(out) > 0 && out[len(out)-1] == ' ' {
		out = out[:len(out)-1]
	}
	return string(out)
}

// walk collects IFD0, the IFDs chained after it and every SubIFD (to depth
// 2), in the order met, refusing loops and more than maxIFDs directories.
func (f *tiffFile) walk(first uint64) ([]*ifd, error) {
	seen := map[uint64]bool{}
	var out []*ifd
	var visit func(off uint64, depth int) error
	visit = func(off uint64, depth int) error {
		for off != 0 {
			if seen[off] {
				return formatf("IFD at offset %d is reached twice (a loop of IFDs)", off)
			}
			seen[off] = true
			if len(out) >= maxIFDs {
				return formatf("more than %d IFDs", maxIFDs)
			}
			d, next, err := f.readIFD(off, depth)
			if err != nil {
				return err
			}
			out = append(out, d)
			if subs, ok := f.ints(d, tagSubIFDs); ok && depth < 2 {
				for _, s := range subs {
					if err := visit(uint64(s), depth+1); err != nil {
						return err
					}
				}
			}
			if depth > 0 {
				return nil // a SubIFD's own chain is not followed
			}
			off = next
		}
		return nil
	}
	if err := visit(first, 0); err != nil {
		return nil, err
	}
	return out, nil
}
