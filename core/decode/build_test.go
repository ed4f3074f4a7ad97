package decode

// Builders of test files. PNG, JPEG and TIFF files come from the standard
// encoders where they can write the case; the rest (grey+alpha PNG, gAMA and
// other ancillary chunks, CMYK JPEG, a TIFF with Exif tags) is written byte
// by byte from the format specifications named beside each builder.

import (
	"bytes"
	"compress/zlib"
	"encoding/binary"
	"hash/crc32"
	"image"
	"image/color"
	"image/jpeg"
	"image/png"
	"math"
	"math/rand/v2"
	"testing"

	"golang.org/x/image/tiff"
)

func encodePNG(t testing.TB, img image.Image) []byte {
	t.Helper()
	var buf bytes.Buffer
	enc := png.Encoder{CompressionLevel: png.BestSpeed}
	if err := enc.Encode(&buf, img); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

func encodeJPEG(t testing.TB, img image.Image, quality int) []byte {
	t.Helper()
	var buf bytes.Buffer
	if err := jpeg.Encode(&buf, img, &jpeg.Options{Quality: quality}); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

func encodeTIFF(t testing.TB, img image.Image, c tiff.CompressionType) []byte {
	t.Helper()
	var buf bytes.Buffer
	if err := tiff.Encode(&buf, img, &tiff.Options{Compression: c}); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

// pngChunk returns one PNG chunk: length, type, data, CRC-32 of type and
// data (ISO/IEC 15948, 5.3; CRC of ISO 3309 / ITU-T V.42, which is Go's
// crc32.IEEE).
func pngChunk(typ string, data []byte) []byte {
	out := binary.BigEndian.AppendUint32(nil, uint32(len(data)))
	out = append(out, typ...)
	out = append(out, data...)
	return binary.BigEndian.AppendUint32(out, crc32.ChecksumIEEE(out[4:]))
}

func gamaChunk(v uint32) []byte { return pngChunk("gAMA", binary.BigEndian.AppendUint32(nil, v)) }

// buildPNG writes a PNG by hand: signature, IHDR (ISO/IEC 15948, 11.2.2),
// the extra chunks, one IDAT holding the zlib stream of the scanlines each
// preceded by filter type 0 (9.2), IEND. rows are the raw scanline bytes.
func buildPNG(t testing.TB, w, h, depth, colourType int, rows [][]byte, extra ...[]byte) []byte {
	t.Helper()
	ihdr := binary.BigEndian.AppendUint32(nil, uint32(w))
	ihdr = binary.BigEndian.AppendUint32(ihdr, uint32(h))
	ihdr = append(ihdr, byte(depth), byte(colourType), 0, 0, 0)
	var z bytes.Buffer
	zw := zlib.NewWriter(&z)
	for _, r := range rows {
		zw.Write([]byte{0})
		zw.Write(r)
	}
	if err := zw.Close(); err != nil {
		t.Fatal(err)
	}
	out := append([]byte(pngSignature), pngChunk("IHDR", ihdr)...)
	for _, c := range extra {
		out = append(out, c...)
	}
	out = append(out, pngChunk("IDAT", z.Bytes())...)
	return append(out, pngChunk("IEND", nil)...)
}

// insertAfterIHDR puts chunks into an encoded PNG right after IHDR.
func insertAfterIHDR(p []byte, chunks ...[]byte) []byte {
	at := len(pngSignature) + 8 + 13 + 4
	out := bytes.Clone(p[:at])
	for _, c := range chunks {
		out = append(out, c...)
	}
	return append(out, p[at:]...)
}

// bitWriter packs bits MSB first with JPEG byte stuffing (0xFF -> FF 00,
// ITU-T T.81, F.1.2.3).
type bitWriter struct {
	out   []byte
	acc   uint32
	nbits uint
}

func (b *bitWriter) write(v uint32, n uint) {
	for i := int(n) - 1; i >= 0; i-- {
		b.acc = b.acc<<1 | (v>>uint(i))&1
		b.nbits++
		if b.nbits == 8 {
			b.out = append(b.out, byte(b.acc))
			if byte(b.acc) == 0xFF {
				b.out = append(b.out, 0)
			}
			b.acc, b.nbits = 0, 0
		}
	}
}

func (b *bitWriter) flush() []byte {
	for b.nbits != 0 {
		b.write(1, 1) // pad with 1 bits (T.81, F.1.2.3)
	}
	return b.out
}

// cmykJPEG writes a baseline JPEG (ITU-T T.81, annex B) of 8 x 8 blocks with
// four components, each block flat: only a DC coefficient. stored[c][k] is
// the sample value of component c in block k (blocks left to right, one
// block row). Quantisation is 8 everywhere, so the quantised DC of a flat
// block of value s is s - 128 (T.81 A.3.3: DC = 8 x mean of the level-shifted
// samples). Huffman tables: DC categories 0..11 all with 4-bit codes, AC with
// only EOB as the 1-bit code "0" (T.81 annex C, canonical codes). With
// adobe, an Adobe APP14 segment with transform 0 marks the data as CMYK,
// which Go (like libjpeg) reads as inverted ("Adobe") CMYK.
func cmykJPEG(stored [4][]uint8, adobe bool) []byte {
	blocks := len(stored[0])
	out := []byte{0xFF, 0xD8}
	if adobe {
		out = append(out, 0xFF, 0xEE, 0x00, 0x0E, 'A', 'd', 'o', 'b', 'e', 0x00, 0x64, 0, 0, 0, 0, 0)
	}
	out = append(out, 0xFF, 0xDB, 0x00, 0x43, 0x00) // DQT, 8-bit table 0
	for range 64 {
		out = append(out, 8)
	}
	out = append(out, 0xFF, 0xC0, 0x00, 0x14, 8, 0, 8) // SOF0, 8-bit, height 8
	out = binary.BigEndian.AppendUint16(out, uint16(8*blocks))
	out = append(out, 4, 1, 0x11, 0, 2, 0x11, 0, 3, 0x11, 0, 4, 0x11, 0)
	dc := []byte{0xFF, 0xC4, 0x00, 31, 0x00, 0, 0, 0, 12, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0}
	for s := range 12 {
		dc = append(dc, byte(s))
	}
	out = append(out, dc...)
	out = append(out, 0xFF, 0xC4, 0x00, 20, 0x10, 1, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0x00)
	out = append(out, 0xFF, 0xDA, 0x00, 14, 4, 1, 0x00, 2, 0x00, 3, 0x00, 4, 0x00, 0, 63, 0)
	var bw bitWriter
	var pred [4]int
	for k := range blocks {
		for c := range 4 {
			d := int(stored[c][k]) - 128 - pred[c]
			pred[c] += d
			s := uint(0) // category: bit length of |d| (T.81 F.1.2.1)
			for a := max(d, -d); a > 0; a >>= 1 {
				s++
			}
			bw.write(uint32(s), 4) // canonical code of category s is s itself (all length 4)
			if d < 0 {
				d += 1<<s - 1
			}
			bw.write(uint32(d), s)
			bw.write(0, 1) // EOB
		}
	}
	out = append(out, bw.flush()...)
	return append(out, 0xFF, 0xD9)
}

// ifdEntry is one entry of a hand-built TIFF IFD.
type ifdEntry struct {
	tag, typ uint16
	count    uint32
	data     []byte // big-endian value bytes
}

func short(tag uint16, v uint16) ifdEntry {
	return ifdEntry{tag, 3, 1, binary.BigEndian.AppendUint16(nil, v)}
}

func long(tag uint16, v uint32) ifdEntry {
	return ifdEntry{tag, 4, 1, binary.BigEndian.AppendUint32(nil, v)}
}

func ascii(tag uint16, s string) ifdEntry {
	return ifdEntry{tag, 2, uint32(len(s) + 1), append([]byte(s), 0)}
}

// appendIFD appends a big-endian ("MM") IFD at the end of out (TIFF 6.0,
// section 2): entry count, 12-byte entries sorted by tag, next-IFD offset
// 0, then the values longer than 4 bytes, padded to even offsets.
func appendIFD(out []byte, es []ifdEntry) []byte {
	off := len(out)
	dataOff := off + 2 + 12*len(es) + 4
	var extra []byte
	out = binary.BigEndian.AppendUint16(out, uint16(len(es)))
	for _, e := range es {
		out = binary.BigEndian.AppendUint16(out, e.tag)
		out = binary.BigEndian.AppendUint16(out, e.typ)
		out = binary.BigEndian.AppendUint32(out, e.count)
		if len(e.data) <= 4 {
			var v [4]byte
			copy(v[:], e.data)
			out = append(out, v[:]...)
			continue
		}
		out = binary.BigEndian.AppendUint32(out, uint32(dataOff+len(extra)))
		extra = append(extra, e.data...)
		if len(extra)%2 == 1 {
			extra = append(extra, 0)
		}
	}
	out = binary.BigEndian.AppendUint32(out, 0)
	return append(out, extra...)
}

// greyTIFF writes an uncompressed big-endian 8-bit grey TIFF (TIFF 6.0,
// section 4, bilevel/greyscale baseline) of w x h pixels with Make,
// Orientation and an Exif IFD holding FNumber and the focal-plane
// resolution. The pixel strip is placed right after the header.
func greyTIFF(w, h int, pix []byte, make string, orientation uint16, fNumber10, xResPerCM uint32) []byte {
	out := []byte{'M', 'M', 0, 42, 0, 0, 0, 0}
	out = append(out, pix...)
	if len(out)%2 == 1 {
		out = append(out, 0)
	}
	exifOff := len(out)
	rat := func(num, den uint32) []byte {
		return binary.BigEndian.AppendUint32(binary.BigEndian.AppendUint32(nil, num), den)
	}
	out = appendIFD(out, []ifdEntry{
		{0x829D, 5, 1, rat(fNumber10, 10)}, // FNumber
		{0xA20E, 5, 1, rat(xResPerCM, 1)},  // FocalPlaneXResolution
		short(0xA210, 3),                   // FocalPlaneResolutionUnit: cm
	})
	ifd0 := len(out)
	binary.BigEndian.PutUint32(out[4:], uint32(ifd0))
	return appendIFD(out, []ifdEntry{
		short(0x0100, uint16(w)),       // ImageWidth
		short(0x0101, uint16(h)),       // ImageLength
		short(0x0102, 8),               // BitsPerSample
		short(0x0103, 1),               // Compression: none
		short(0x0106, 1),               // PhotometricInterpretation: BlackIsZero
		ascii(0x010F, make),            // Make
		long(0x0111, 8),                // StripOffsets
		short(0x0112, orientation),     // Orientation
		short(0x0115, 1),               // SamplesPerPixel
		short(0x0116, uint16(h)),       // RowsPerStrip
		long(0x0117, uint32(len(pix))), // StripByteCounts
		long(0x8769, uint32(exifOff)),  // Exif IFD pointer (CIPA DC-008)
	})
}

// Test images with fixed-seed content.

func rng() *rand.Rand { return rand.New(rand.NewPCG(1, 2)) }

func randGray(w, h int) *image.Gray {
	r, m := rng(), image.NewGray(image.Rect(0, 0, w, h))
	for i := range m.Pix {
		m.Pix[i] = uint8(r.IntN(256))
	}
	m.Pix[0], m.Pix[1] = 0, 255 // both ends of the scale
	return m
}

func randGray16(w, h int) *image.Gray16 {
	r, m := rng(), image.NewGray16(image.Rect(0, 0, w, h))
	for i := range m.Pix {
		m.Pix[i] = uint8(r.IntN(256))
	}
	m.Pix[0], m.Pix[1], m.Pix[2], m.Pix[3] = 0, 0, 255, 255
	return m
}

// randNRGBA fills an 8-bit image; opaque keeps alpha at 255, otherwise
// only the first pixel is opaque.
func randNRGBA(w, h int, opaque bool) *image.NRGBA {
	r, m := rng(), image.NewNRGBA(image.Rect(0, 0, w, h))
	for i := range m.Pix {
		m.Pix[i] = uint8(r.IntN(256))
		if i%4 == 3 && (opaque || i == 3) {
			m.Pix[i] = 255
		}
	}
	return m
}

func randNRGBA64(w, h int, opaque bool) *image.NRGBA64 {
	r, m := rng(), image.NewNRGBA64(image.Rect(0, 0, w, h))
	for i := range m.Pix {
		m.Pix[i] = uint8(r.IntN(256))
		if i%8 >= 6 && (opaque || i < 8) {
			m.Pix[i] = 255
		}
	}
	return m
}

// asRGBA returns the image as *image.RGBA (opaque, so premultiplication is
// the identity) so the encoders write RGB without alpha.
func asRGBA(n *image.NRGBA) *image.RGBA {
	return &image.RGBA{Pix: n.Pix, Stride: n.Stride, Rect: n.Rect}
}

func asRGBA64(n *image.NRGBA64) *image.RGBA64 {
	return &image.RGBA64{Pix: n.Pix, Stride: n.Stride, Rect: n.Rect}
}

func randPaletted(w, h, colours int) *image.Paletted {
	r := rng()
	pal := make(color.Palette, colours)
	for i := range pal {
		pal[i] = color.RGBA{uint8(r.IntN(256)), uint8(r.IntN(256)), uint8(r.IntN(256)), 255}
	}
	pal[0] = color.RGBA{255, 255, 255, 255}
	m := image.NewPaletted(image.Rect(0, 0, w, h), pal)
	for i := range m.Pix {
		m.Pix[i] = uint8(r.IntN(colours))
	}
	return m
}

// smoothRGBA is a photo-like test scene (gradients, a disc, mild noise)
// for JPEG, where random pixels would be unrealistic.
func smoothRGBA(w, h int) *image.RGBA {
	r, m := rng(), image.NewRGBA(image.Rect(0, 0, w, h))
	for y := range h {
		for x := range w {
			d := math.Hypot(float64(x-w/2), float64(y-h/2))
			in := 0.0
			if d < float64(min(w, h))/3 {
				in = 60
			}
			i := m.PixOffset(x, y)
			m.Pix[i+0] = clampByte(40 + 150*float64(x)/float64(w) + in + 4*r.NormFloat64())
			m.Pix[i+1] = clampByte(70 + 120*float64(y)/float64(h) + 4*r.NormFloat64())
			m.Pix[i+2] = clampByte(200 - in + 4*r.NormFloat64())
			m.Pix[i+3] = 255
		}
	}
	return m
}

func clampByte(v float64) uint8 { return uint8(math.Round(math.Min(math.Max(v, 0), 255))) }

// Reference luminance, written from the standards independently of the
// package's tables: sRGB decoding (IEC 61966-2-1:1999, 5.2), Rec. ITU-R
// BT.709-6 weights, and Go's image/color conversions as the reference for
// YCbCr (color.YCbCrToRGB) and CMYK (color.CMYKToRGB).

func refSRGB(v float64) float64 {
	if v <= 0.04045 {
		return v / 12.92
	}
	return math.Pow((v+0.055)/1.055, 2.4)
}

// refLum returns the luminance of every pixel of img; lin linearises a
// normalised code value.
func refLum(img image.Image, lin func(float64) float64) []float64 {
	b := img.Bounds()
	out := make([]float64, 0, b.Dx()*b.Dy())
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			var r, g, bl float64
			switch c := img.At(x, y).(type) {
			case color.Gray:
				out = append(out, lin(float64(c.Y)/255))
				continue
			case color.Gray16:
				out = append(out, lin(float64(c.Y)/65535))
				continue
			case color.YCbCr:
				R, G, B := color.YCbCrToRGB(c.Y, c.Cb, c.Cr)
				r, g, bl = float64(R)/255, float64(G)/255, float64(B)/255
			case color.NRGBA: // colour as stored, alpha ignored
				r, g, bl = float64(c.R)/255, float64(c.G)/255, float64(c.B)/255
			case color.CMYK:
				R, G, B := color.CMYKToRGB(c.C, c.M, c.Y, c.K)
				r, g, bl = float64(R)/255, float64(G)/255, float64(B)/255
			default:
				n := color.NRGBA64Model.Convert(c).(color.NRGBA64)
				r, g, bl = float64(n.R)/65535, float64(n.G)/65535, float64(n.B)/65535
			}
			out = append(out, 0.2126*lin(r)+0.7152*lin(g)+0.0722*lin(bl))
		}
	}
	return out
}

// maxDiff returns the largest |p - ref| over the plane.
func maxDiff(t *testing.T, pix []float32, ref []float64) float64 {
	t.Helper()
	if len(pix) != len(ref) {
		t.Fatalf("plane has %d samples, reference %d", len(pix), len(ref))
	}
	m := 0.0
	for i, v := range pix {
		m = math.Max(m, math.Abs(float64(v)-ref[i]))
	}
	return m
}
