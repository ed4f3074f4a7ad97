package decode

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"hash/crc32"
)

// Format names reported in Image.Format and by Config.
const (
	FormatPNG  = "png"
	FormatJPEG = "jpeg"
	FormatTIFF = "tiff"
)

const pngSignature = "\x89PNG\r\n\x1a\n" // ISO/IEC 15948, 5.2

// sniff names the format from the leading bytes (magic numbers), never
// from a file name.
func sniff(data []byte) (string, error) {
	has := func(prefix string) bool { return bytes.HasPrefix(data, []byte(prefix)) }
	switch {
	case len(data) == 0:
		return "", formatErr("empty input", nil)
	case has(pngSignature):
		return FormatPNG, nil
	case has("\xff\xd8\xff"): // SOI then the next marker, ITU-T T.81 B.1.1.3
		return FormatJPEG, nil
	case has("II*\x00"), has("MM\x00*"): // TIFF 6.0 section 2
		return FormatTIFF, nil
	case has("II+\x00"), has("MM\x00+"):
		return "", unsupportedErr("BigTIFF files are not supported; save as TIFF, PNG or JPEG", nil)
	case has("GIF87a"), has("GIF89a"):
		return "", unsupportedErr("GIF is not supported (8-bit palette); use PNG, JPEG or TIFF", nil)
	case len(data) >= 12 && has("RIFF") && string(data[8:12]) == "WEBP":
		return "", unsupportedErr("WebP is not supported; use PNG, JPEG or TIFF", nil)
	case len(data) >= 12 && string(data[4:8]) == "ftyp":
		return "", unsupportedErr("HEIF/AVIF files are not supported; use PNG, JPEG or TIFF", nil)
	case has("\xff\x0a"), has("\x00\x00\x00\x0cJXL \r\n\x87\n"):
		return "", unsupportedErr("JPEG XL is not supported; use PNG, JPEG or TIFF", nil)
	}
	return "", formatErr("not a PNG, JPEG or TIFF image", nil)
}

// pngInfo is what the chunk scanner learns from a PNG file. Go's image/png
// reads none of the colour-space chunks, so they are read here.
type pngInfo struct {
	bitDepth, colourType int
	gama                 uint32 // gAMA value x 100000; valid if hasGAMA
	hasGAMA, hasSRGB     bool
	hasICCP              bool
	exif                 []byte // eXIf chunk data, nil if absent
}

// Bounds of the chunk scanner.
const maxPNGChunks = 100000

// scanPNG walks the chunk list (ISO/IEC 15948, 5.3: length, type, data,
// CRC-32 over type and data). It reads IHDR, gAMA, sRGB and iCCP before
// the first IDAT (where the standard requires them, 5.6) and eXIf anywhere.
// CRCs are checked on the chunks it interprets. It allocates nothing beyond
// slices of data. Truncation inside the image data is left to image/png.
func scanPNG(data []byte) (pngInfo, error) {
	var info pngInfo
	p := len(pngSignature)
	seenIDAT := false
	for n := 0; n < maxPNGChunks; n++ {
		if p == len(data) {
			break
		}
		if p+8 > len(data) {
			return info, formatErr("truncated PNG", nil)
		}
		length := binary.BigEndian.Uint32(data[p:])
		typ := string(data[p+4 : p+8])
		if length > 1<<31-1 || uint64(p)+12+uint64(length) > uint64(len(data)) {
			if seenIDAT {
				break // a cut inside or after the image data: image/png says what is wrong
			}
			return info, formatErr("truncated PNG", nil)
		}
		body := data[p+8 : p+8+int(length)]
		crc := binary.BigEndian.Uint32(data[p+8+int(length):])
		p += 12 + int(length)
		if n == 0 && typ != "IHDR" {
			return info, formatErr("corrupt PNG (first chunk is not IHDR)", nil)
		}
		switch typ {
		case "IHDR", "gAMA", "sRGB", "eXIf":
			if crc32.ChecksumIEEE(data[p-8-int(length):p-4]) != crc {
				return info, formatErr(fmt.Sprintf("corrupt PNG (%s chunk checksum mismatch)", typ), nil)
			}
		}
		switch typ {
		case "IHDR":
			if len(body) != 13 {
				return info, formatErr("corrupt PNG (IHDR length)", nil)
			}
			info.bitDepth, info.colourType = int(body[8]), int(body[9])
		case "gAMA":
			if !seenIDAT && len(body) == 4 {
				info.gama, info.hasGAMA = binary.BigEndian.Uint32(body), true
			}
		case "sRGB":
			info.hasSRGB = info.hasSRGB || !seenIDAT
		case "iCCP":
			info.hasICCP = info.hasICCP || !seenIDAT
		case "eXIf":
			if info.exif == nil {
				info.exif = body
			}
		case "IDAT":
			seenIDAT = true
		case "IEND":
			return info, nil
		}
	}
	return info, nil
}

// tiffInfo is what decode reads itself from the first IFD of a TIFF file.
type tiffInfo struct {
	bitsPerSample int  // 0x0102, first value; TIFF 6.0 default 1
	reducedRes    bool // 0x00FE NewSubfileType bit 0: a preview, not the main image
	rawCamera     bool // DNGVersion tag 0xC612 present: a raw camera file (tag ID from memory)
}

// scanTIFF reads a few tags of IFD0 (TIFF 6.0, section 2 and 8), bounded
// like the exif reader. Errors are left to the TIFF decoder: a malformed
// IFD gives the zero tiffInfo except for the default bit depth.
func scanTIFF(data []byte) tiffInfo {
	info := tiffInfo{bitsPerSample: 1}
	if len(data) < 8 {
		return info
	}
	var bo binary.ByteOrder = binary.LittleEndian
	if data[0] == 'M' {
		bo = binary.BigEndian
	}
	off := uint64(bo.Uint32(data[4:]))
	if off+2 > uint64(len(data)) {
		return info
	}
	n := uint64(bo.Uint16(data[off:]))
	if off+2+12*n > uint64(len(data)) {
		return info
	}
	for i := range n {
		e := data[off+2+12*i:]
		tag, typ, count := bo.Uint16(e), bo.Uint16(e[2:]), bo.Uint32(e[4:])
		var v uint32
		switch typ {
		case 3: // SHORT, left-justified in the value field
			v = uint32(bo.Uint16(e[8:]))
		case 4: // LONG
			v = bo.Uint32(e[8:])
		}
		switch tag {
		case 0x00FE:
			info.reducedRes = v&1 != 0
		case 0x0102:
			if typ == 3 && count <= 2 {
				info.bitsPerSample = int(v)
			} else if typ == 3 && count > 2 {
				// Out-of-line SHORTs: read the first one.
				vo := uint64(bo.Uint32(e[8:]))
				if vo+2 <= uint64(len(data)) {
					info.bitsPerSample = int(bo.Uint16(data[vo:]))
				}
			}
		case 0xC612:
			info.rawCamera = true
		}
	}
	return info
}
