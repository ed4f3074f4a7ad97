package raw

import (
	"fmt"
	"math"
	"strings"

	"sagitta/core/exif"
)

// DefaultMaxPixels is the pixel limit used when Options.MaxPixels is 0, the
// same 120 megapixels as core/decode.
const DefaultMaxPixels = 120_000_000

// Options controls reading. The zero value uses DefaultMaxPixels.
type Options struct {
	MaxPixels int // largest ImageWidth x ImageLength accepted; 0 means DefaultMaxPixels
}

// Raster is the raw IFD's samples exactly as stored (after decompression,
// before linearisation or black subtraction) with the geometry the DNG
// declares around them.
type Raster struct {
	W, H        int // ImageWidth x ImageLength, px
	Samples     int // SamplesPerPixel
	Bits        int // BitsPerSample
	Compression int // 1 or 7
	Photometric int // 32803 (CFA) or 34892 (LinearRaw)
	Tiled       bool
	// Codes holds W x H x Samples code values, row by row, samples
	// interleaved per pixel.
	Codes []uint16

	// Active is the ActiveArea as [top, left, bottom, right] in px
	// (the whole image when the tag is absent).
	Active [4]int

	ifd  *ifd
	file *tiffFile
	ifd0 *ifd
}

// Config reads the header of a DNG file and returns the size in px of the
// image Decode would return (the default crop), without decoding pixels.
func Config(data []byte) (w, h int, err error) {
	defer guard(&err)
	f, d, d0, err := locate(data)
	if err != nil {
		return 0, 0, err
	}
	r := &Raster{file: f, ifd: d, ifd0: d0}
	if err := r.header(Options{}); err != nil {
		return 0, 0, err
	}
	g, _, err := r.geometry()
	if err != nil {
		return 0, 0, err
	}
	return g.cw, g.ch, nil
}

// IsDNG reports whether data is a TIFF-structured file whose IFD0 carries
// the DNGVersion tag.
func IsDNG(data []byte) bool {
	f, first, err := parseHeader(data)
	if err != nil {
		return false
	}
	d, _, err := f.readIFD(first, 0)
	return err == nil && d.has(tagDNGVersion)
}

// locate parses the structure and picks the raw IFD: the first IFD (IFD0,
// its chain, then SubIFDs in file order) whose NewSubFileType is 0 (the
// main image; DNG 1.4 chapter 3) and whose PhotometricInterpretation is
// CFA or LinearRaw.
func locate(data []byte) (*tiffFile, *ifd, *ifd, error) {
	f, first, err := parseHeader(data)
	if err != nil {
		return nil, nil, nil, err
	}
	all, err := f.walk(first)
	if err != nil {
		return nil, nil, nil, err
	}
	if len(all) == 0 {
		return nil, nil, nil, FormatError("not a DNG file (the TIFF has no IFD)")
	}
	d0 := all[0]
	if !d0.has(tagDNGVersion) {
		return nil, nil, nil, FormatError("not a DNG file (a TIFF without the DNGVersion tag)")
	}
	var other int64
	for _, d := range all {
		kind, _ := f.int1(d, tagNewSubFileType, 0)
		if kind != 0 {
			continue
		}
		ph, _ := f.int1(d, tagPhotometric, -1)
		if ph == photoCFA || ph == photoLinearRaw {
			return f, d, d0, nil
		}
		other = ph
	}
	if other != 0 {
		return nil, nil, nil, unsupportedf("the DNG's main image has PhotometricInterpretation %d, neither a colour filter array nor linear raw", other)
	}
	return nil, nil, nil, FormatError("the DNG has no main raw image (no IFD with NewSubFileType 0)")
}

// header reads and checks the raw IFD's basic fields and the size limit.
func (r *Raster) header(opt Options) error {
	f, d := r.file, r.ifd
	w, ok1 := f.int1(d, tagImageWidth, 0)
	h, ok2 := f.int1(d, tagImageLength, 0)
	if !ok1 || !ok2 || w <= 0 || h <= 0 {
		return formatf("the raw image declares an invalid size %d x %d", w, h)
	}
	limit := opt.MaxPixels
	if limit <= 0 {
		limit = DefaultMaxPixels
	}
	spp, _ := f.int1(d, tagSamplesPerPixel, 1)
	if spp < 1 || spp > 4 {
		return formatf("the raw image declares %d samples per pixel", spp)
	}
	if w > 1<<20 || h > 1<<20 || w*h > int64(limit) {
		return &TooLargeError{Width: int(min(w, 1<<40)), Height: int(min(h, 1<<40)), Samples: int(spp), MaxPixels: limit}
	}
	r.W, r.H, r.Samples = int(w), int(h), int(spp)
	bits, _ := f.ints(d, tagBitsPerSample)
	if len(bits) == 0 {
		bits = []int64{1}
	}
	for _, b := range bits {
		if b != bits[0] {
			return UnsupportedError("DNG samples of different bit depths are not read")
		}
	}
	r.Bits = int(bits[0])
	comp, _ := f.int1(d, tagCompression, 1)
	r.Compression = int(comp)
	ph, _ := f.int1(d, tagPhotometric, 0)
	r.Photometric = int(ph)
	if sf, _ := f.ints(d, tagSampleFormat); len(sf) > 0 && sf[0] == sampleFloat {
		return UnsupportedError("floating-point DNG data is not read (save the DNG with integer samples)")
	}
	switch comp {
	case compNone, compLosslessJPEG:
	case compLossyDNG:
		return UnsupportedError("lossy DNG (compression 34892) is not read: it is JPEG-compressed like a camera JPEG; save the DNG uncompressed or lossless")
	case compJPEGXL:
		return UnsupportedError("JPEG XL compressed DNG (compression 52546) is not read; save the DNG uncompressed or with lossless JPEG")
	case compDeflate:
		return UnsupportedError("deflate-compressed DNG (compression 8, floating point) is not read")
	default:
		return unsupportedf("DNG compression %d is not read (only uncompressed and lossless JPEG)", comp)
	}
	if r.Bits < 1 || r.Bits > 16 {
		return unsupportedf("DNG samples of %d bits are not read (1 to 16 bits are)", r.Bits)
	}
	if pc, _ := f.int1(d, tagPlanarConfig, 1); pc != 1 && spp > 1 {
		return UnsupportedError("DNG with separate colour planes (PlanarConfiguration 2) is not read")
	}
	r.Active = [4]int{0, 0, r.H, r.W}
	if a, ok := f.reals(d, tagActiveArea); ok && len(a) == 4 {
		t, l, b, rt := int(a[0]), int(a[1]), int(a[2]), int(a[3])
		if t < 0 || l < 0 || b > r.H || rt > r.W || b-t < 2 || rt-l < 2 {
			return formatf("ActiveArea %v lies outside the %d x %d raw image", []int{t, l, b, rt}, r.W, r.H)
		}
		r.Active = [4]int{t, l, b, rt}
	}
	return nil
}

// chunk is one strip or tile.
type chunk struct {
	off, n     uint64 // bytes in the file
	x0, y0     int    // position in the image, px
	w, h       int    // stored size (a tile's full size), px
	rows, cols int    // part inside the image, px
	index      int
	tile       bool
}

// chunks lists the strips or tiles with their offsets checked against the
// file.
func (r *Raster) chunks() ([]chunk, error) {
	f, d := r.file, r.ifd
	var offs, cnts []int64
	var tw, th int
	if d.has(tagTileOffsets) {
		r.Tiled = true
		a, _ := f.int1(d, tagTileWidth, 0)
		b, _ := f.int1(d, tagTileLength, 0)
		if a <= 0 || b <= 0 || a > 1<<16 || b > 1<<16 || a*b > 1<<26 {
			return nil, formatf("DNG tiles of %d x %d px are invalid", a, b)
		}
		if a*b > 4*int64(r.W)*int64(r.H)+1<<20 {
			return nil, formatf("DNG tiles of %d x %d px are far larger than the %d x %d image", a, b, r.W, r.H)
		}
		tw, th = int(a), int(b)
		offs, _ = f.ints(d, tagTileOffsets)
		cnts, _ = f.ints(d, tagTileByteCounts)
	} else {
		rps, _ := f.int1(d, tagRowsPerStrip, int64(r.H))
		if rps <= 0 || rps > int64(r.H) {
			rps = int64(r.H)
		}
		tw, th = r.W, int(rps)
		offs, _ = f.ints(d, tagStripOffsets)
		cnts, _ = f.ints(d, tagStripByteCounts)
	}
	across, down := (r.W+tw-1)/tw, (r.H+th-1)/th
	want := across * down
	kind := "strip"
	if r.Tiled {
		kind = "tile"
	}
	if len(offs) != want || len(cnts) != want {
		return nil, formatf("the raw image needs %d %s offsets and byte counts, the file gives %d and %d (or they lie outside the file)", want, kind, len(offs), len(cnts))
	}
	size := uint64(len(f.data))
	out := make([]chunk, want)
	for i := range out {
		o, n := uint64(offs[i]), uint64(cnts[i])
		if o >= size || o+n > size {
			return nil, formatf("%s %d lies outside the file (offset %d, %d bytes, file %d bytes)", kind, i, o, n, size)
		}
		c := chunk{off: o, n: n, index: i, tile: r.Tiled, w: tw, h: th}
		c.x0, c.y0 = (i%across)*tw, (i/across)*th
		c.cols, c.rows = min(tw, r.W-c.x0), min(th, r.H-c.y0)
		if !r.Tiled {
			c.h = c.rows // the last strip may be short
		}
		out[i] = c
	}
	return out, nil
}

// read decodes every strip or tile into r.Codes.
func (r *Raster) read() error {
	cs, err := r.chunks()
	if err != nil {
		return err
	}
	r.Codes = make([]uint16, r.W*r.H*r.Samples)
	for _, c := range cs {
		if err := r.readChunk(c); err != nil {
			return err
		}
	}
	return nil
}

func (r *Raster) readChunk(c chunk) error {
	kind := "strip"
	if c.tile {
		kind = "tile"
	}
	src := r.file.data[c.off : c.off+c.n]
	rowSamples := c.w * r.Samples
	var get func(i int) uint16 // sample i of the chunk, row-major over w x h
	switch r.Compression {
	case compNone:
		rowBytes := (rowSamples*r.Bits + 7) / 8
		need := rowBytes * c.h
		if len(src) < need {
			return formatf("%s %d is truncated (%d bytes, %d needed)", kind, c.index, len(src), need)
		}
		get = r.unpacker(src, rowSamples, rowBytes)
	case compLosslessJPEG:
		fr, err := decodeLJ(src, 2*rowSamples*c.h+1024)
		if err != nil {
			msg := fmt.Sprintf("%s %d: %s", kind, c.index, strings.TrimPrefix(err.Error(), "raw: "))
			if _, ok := err.(UnsupportedError); ok {
				return UnsupportedError(msg)
			}
			return FormatError(msg)
		}
		if fr.W*fr.NC*fr.H < rowSamples*c.rows {
			return formatf("%s %d: its lossless JPEG holds %d x %d x %d samples, fewer than the %d x %d the %s needs", kind, c.index, fr.W, fr.H, fr.NC, c.w, c.rows, kind)
		}
		pix := fr.Pix
		get = func(i int) uint16 { return pix[i] }
	}
	for y := 0; y < c.rows; y++ {
		dst := r.Codes[((c.y0+y)*r.W+c.x0)*r.Samples:]
		base := y * rowSamples
		for i := 0; i < c.cols*r.Samples; i++ {
			dst[i] = get(base + i)
		}
	}
	return nil
}

// unpacker returns a function reading sample i (row-major, rowSamples per
// row) from uncompressed data: bytes in the file's byte order for 16 bits,
// otherwise packed most significant bit first with each row starting on a
// byte boundary (TIFF 6.0 Compression = 1; DNG 1.4 chapter 5).
func (r *Raster) unpacker(src []byte, rowSamples, rowBytes int) func(int) uint16 {
	bits := r.Bits
	switch bits {
	case 8:
		return func(i int) uint16 { return uint16(src[i]) }
	case 16:
		bo := r.file.bo
		return func(i int) uint16 { return bo.Uint16(src[2*i:]) }
	}
	return func(i int) uint16 {
		row, col := i/rowSamples, i%rowSamples
		bit := row*rowBytes*8 + col*bits
		var v uint32
		for k := 0; k < bits; {
			b := src[bit>>3]
			off := bit & 7
			take := min(8-off, bits-k)
			v = v<<take | uint32(b>>(8-off-take))&(1<<take-1)
			k += take
			bit += take
		}
		return uint16(v)
	}
}

// ReadRaster reads the raw IFD's samples as stored, for checks against
// other readers; Decode is the way to read a DNG for measuring.
func ReadRaster(data []byte, opt Options) (r *Raster, err error) {
	defer guard(&err)
	f, d, d0, err := locate(data)
	if err != nil {
		return nil, err
	}
	r = &Raster{file: f, ifd: d, ifd0: d0}
	if err := r.header(opt); err != nil {
		return nil, err
	}
	if err := r.read(); err != nil {
		return nil, err
	}
	return r, nil
}

// guard turns a panic while reading (a bug: every index is checked) into an
// error, so that bad data never crashes the caller.
func guard(err *error) {
	if p := recover(); p != nil {
		*err = formatf("the DNG could not be read (internal error: %v)", p)
	}
}

// readExif reads the Exif tags of the file (IFD0 and the Exif IFD).
func readExif(data []byte) (exif.Tags, error) { return exif.Parse(data) }

// finite reports whether every value is finite.
func finite(v []float64) bool {
	for _, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}
