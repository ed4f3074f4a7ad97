package draw

import (
	"encoding/binary"
	"hash/crc32"
	"image"
	"image/png"
	"io"
	"math"
)

// pngHeaderLen is the length of the PNG signature (8 bytes) plus the IHDR
// chunk (4 length + 4 type + 13 data + 4 CRC), which always comes first
// (ISO/IEC 15948 §5.2 and §11.2.2).
const pngHeaderLen = 8 + 4 + 4 + 13 + 4

// PxPerMetre returns the pHYs value for dpi: round(dpi / 0.0254) pixels per
// metre (1 in = 0.0254 m exactly); 300 dpi gives 11811.
func PxPerMetre(dpi float64) uint32 { return uint32(math.Round(dpi / 0.0254)) }

// EncodePNG writes img as a PNG with a pHYs chunk that records dpi in both
// directions, so that printing software can reproduce the physical size: the
// chunk holds pixels per metre, round(dpi / 0.0254), with unit specifier 1
// (metre), and is placed right after IHDR, before any IDAT (ISO/IEC 15948
// §11.3.5.3). A dpi that is not positive, or too large for the 32-bit field,
// returns an ArgumentError; encoding errors of image/png are returned as is.
func EncodePNG(w io.Writer, img image.Image, dpi float64) error {
	if !(dpi > 0 && dpi/0.0254 < math.MaxUint32) {
		return ArgumentError("dpi " + fmtFloat(dpi) + " is not positive or too large for pHYs")
	}
	ppm := PxPerMetre(dpi)
	var chunk [4 + 4 + 9 + 4]byte
	binary.BigEndian.PutUint32(chunk[0:], 9)
	copy(chunk[4:], "pHYs")
	binary.BigEndian.PutUint32(chunk[8:], ppm)
	binary.BigEndian.PutUint32(chunk[12:], ppm)
	chunk[16] = 1 // unit: metre
	binary.BigEndian.PutUint32(chunk[17:], crc32.ChecksumIEEE(chunk[4:17]))
	pw := &physWriter{w: w, chunk: chunk[:]}
	if err := png.Encode(pw, img); err != nil {
		return err
	}
	return pw.err
}

// physWriter passes bytes through to w and inserts chunk after the first
// pngHeaderLen bytes.
type physWriter struct {
	w     io.Writer
	n     int // bytes passed so far
	chunk []byte
	err   error
}

func (p *physWriter) Write(b []byte) (int, error) {
	if p.err != nil {
		return 0, p.err
	}
	written := 0
	if p.n < pngHeaderLen {
		k := min(pngHeaderLen-p.n, len(b))
		if _, p.err = p.w.Write(b[:k]); p.err != nil {
			return 0, p.err
		}
		p.n += k
		written, b = k, b[k:]
		if p.n == pngHeaderLen {
			if _, p.err = p.w.Write(p.chunk); p.err != nil {
				return written, p.err
			}
		}
	}
	if len(b) > 0 {
		var k int
		k, p.err = p.w.Write(b)
		p.n += k
		written += k
	}
	return written, p.err
}
