package simcam

import (
	"encoding/binary"
	"math"

	"sagitta/core/plane"
)

// DNG describes the raw file the simulated camera writes with EncodeDNG: a
// colour filter array mosaic in a DNG (Adobe, Digital Negative
// Specification 1.4.0.0, built on TIFF Revision 6.0). The zero value gives
// an RGGB, 14-bit, uncompressed, little-endian file in strips, black 512,
// white 16383, no crop margin.
type DNG struct {
	Bits         int // code bits, 8 to 16 (default 14)
	Black, White int // levels in code values (default 512 and 2^Bits - 1)
	// SiteBlack, if set, gives each site of the 2x2 pattern its own black
	// level (row by row; BlackLevelRepeatDim 2 x 2) instead of Black.
	SiteBlack []int
	// Table, if set, is written as the LinearizationTable: a reader maps
	// each stored code c to Table[c] before the levels apply (the codes
	// are stored as computed; the table only changes what they mean).
	Table        []uint16
	Pattern      string     // 2x2 pattern, row by row, of R, G, B (default "RGGB")
	Gains        [3]float64 // sensitivity of the R, G, B sites to the scene's linear level (default 1, 1, 1)
	Lossless     bool       // lossless JPEG (compression 7) instead of uncompressed
	Predictor    int        // lossless JPEG predictor 1..7 (default 1)
	BigEndian    bool       // "MM" byte order
	TileW, TileH int        // tile size in px (0: strips of RowsPerStrip rows)
	RowsPerStrip int        // strip height (default: 64 rows)
	SubIFD       bool       // IFD0 is a small preview and the raw image a SubIFD
	// Margin px around the default crop (DefaultCropOrigin/Size); the
	// ActiveArea is the whole frame. Even, so the pattern's phase is kept.
	Margin int
	// Linear writes a linear DNG (PhotometricInterpretation LinearRaw):
	// three samples per pixel, R, G, B, each the level times its gain,
	// instead of a mosaic.
	Linear bool
	// Camera data, written to IFD0 and the Exif IFD. Use invented names.
	Make, Model, UniqueCameraModel string
	FNumber, FocalLengthMM         float64
	PitchUM                        float64 // written as FocalPlaneX/YResolution (unit: cm)
}

func (o *DNG) defaults() {
	if o.Bits == 0 {
		o.Bits = 14
	}
	if o.White == 0 {
		o.White = 1<<o.Bits - 1
	}
	if o.Black == 0 && o.Bits >= 12 {
		o.Black = 512
	}
	if o.Pattern == "" {
		o.Pattern = "RGGB"
	}
	if o.Gains == [3]float64{} {
		o.Gains = [3]float64{1, 1, 1}
	}
	if o.Predictor == 0 {
		o.Predictor = 1
	}
	if o.RowsPerStrip == 0 {
		o.RowsPerStrip = 64
	}
}

// colourIndex maps a pattern letter to the CFAPattern code (TIFF/EP:
// 0 red, 1 green, 2 blue).
func colourIndex(c byte) int {
	switch c {
	case 'R':
		return 0
	case 'G':
		return 1
	}
	return 2
}

// EncodeDNG renders scene s, adds the camera's noise, samples it through
// the colour filter array (site (x, y) keeps the level times the gain of
// its colour: a neutral scene seen through filters of different
// transmission), quantises code = Black + round(v (White - Black)) clipped
// to [0, White], and writes the DNG. The camera's Encoding, Sharpen and
// JPEG settings do not apply: a raw file is neither tone-mapped nor
// sharpened.
func (c *Camera) EncodeDNG(s Scene, o DNG) ([]byte, error) {
	o.defaults()
	if o.Bits < 8 || o.Bits > 16 || o.White <= o.Black || o.White >= 1<<o.Bits || o.Black < 0 || len(o.Pattern) != 4 ||
		o.Margin < 0 || o.Margin%2 != 0 || 2*o.Margin+2 > min(c.W, c.H) || (o.TileW > 0) != (o.TileH > 0) ||
		(o.Lossless && o.TileW%2 != 0) || o.Predictor < 1 || o.Predictor > 7 {
		return nil, invalidf("DNG settings out of range")
	}
	for _, b := range o.SiteBlack {
		if b < 0 || b >= o.White || len(o.SiteBlack) != 4 {
			return nil, invalidf("DNG site black levels must be 4 values in [0, White)")
		}
	}
	if len(o.Table) > 1<<o.Bits {
		return nil, invalidf("DNG linearisation table longer than the code range")
	}
	var p *plane.Plane
	var err error
	if c.ChannelMag != [3]float64{} && !o.Linear {
		p, err = c.mosaicPlane(s, o) // each site through its colour's magnification (colour.go)
	} else {
		p, err = c.Render(s)
	}
	if err != nil {
		return nil, err
	}
	c.addNoise(p)
	if o.Linear {
		return writeDNG(linearCodes(p, o), c.W, c.H, o), nil
	}
	return writeDNG(MosaicCodes(p, o), c.W, c.H, o), nil
}

// MosaicCodes returns the code values EncodeDNG stores for the linear plane
// p (W x H, row by row); o must have its defaults applied.
func MosaicCodes(p *plane.Plane, o DNG) []uint16 {
	o.defaults()
	out := make([]uint16, p.W*p.H)
	for y := 0; y < p.H; y++ {
		for x := 0; x < p.W; x++ {
			g := o.Gains[colourIndex(o.Pattern[(y%2)*2+x%2])]
			black := o.Black
			if len(o.SiteBlack) == 4 {
				black = o.SiteBlack[(y%2)*2+x%2]
			}
			v := float64(black) + math.Round(float64(p.Pix[y*p.W+x])*g*float64(o.White-black))
			out[y*p.W+x] = uint16(math.Min(math.Max(v, 0), float64(o.White)))
		}
	}
	return out
}

// linearCodes returns three codes per pixel (R, G, B) for a linear DNG.
func linearCodes(p *plane.Plane, o DNG) []uint16 {
	out := make([]uint16, 3*p.W*p.H)
	span := float64(o.White - o.Black)
	for i, l := range p.Pix {
		for c := range 3 {
			v := float64(o.Black) + math.Round(float64(l)*o.Gains[c]*span)
			out[3*i+c] = uint16(math.Min(math.Max(v, 0), float64(o.White)))
		}
	}
	return out
}

// TIFF writing: fields of one IFD, laid out after the image data.

type tfield struct {
	tag, typ uint16
	count    uint32
	val      []byte // encoded in the file's byte order
}

type tifd struct {
	fields []tfield
	off    uint32
	// ptrs: field index -> IFD whose offset the field holds.
	ptrs map[int]*tifd
}

type tw struct{ bo binary.ByteOrder }

func (t tw) short(tag uint16, v ...int) tfield {
	b := make([]byte, 2*len(v))
	for i, x := range v {
		t.bo.PutUint16(b[2*i:], uint16(x))
	}
	return tfield{tag, 3, uint32(len(v)), b}
}

func (t tw) long(tag uint16, v ...int) tfield {
	b := make([]byte, 4*len(v))
	for i, x := range v {
		t.bo.PutUint32(b[4*i:], uint32(x))
	}
	return tfield{tag, 4, uint32(len(v)), b}
}

func (t tw) rational(tag uint16, num, den int) tfield {
	b := make([]byte, 8)
	t.bo.PutUint32(b, uint32(num))
	t.bo.PutUint32(b[4:], uint32(den))
	return tfield{tag, 5, 1, b}
}

func (t tw) ascii(tag uint16, s string) tfield {
	return tfield{tag, 2, uint32(len(s) + 1), append([]byte(s), 0)}
}

func (t tw) bytes(tag uint16, typ uint16, v ...byte) tfield {
	return tfield{tag, typ, uint32(len(v)), v}
}

func (d *tifd) size() int {
	n := 2 + 12*len(d.fields) + 4
	for _, f := range d.fields {
		if len(f.val) > 4 {
			n += (len(f.val) + 1) &^ 1
		}
	}
	return n
}

func (d *tifd) write(bo binary.ByteOrder, out []byte, next uint32) []byte {
	for i, p := range d.ptrs {
		bo.PutUint32(d.fields[i].val, p.off)
	}
	// Fields in ascending tag order (TIFF 6.0, section 2).
	for i := 1; i < len(d.fields); i++ {
		for j := i; j > 0 && d.fields[j].tag < d.fields[j-1].tag; j-- {
			d.fields[j], d.fields[j-1] = d.fields[j-1], d.fields[j]
		}
	}
	ext := d.off + uint32(2+12*len(d.fields)+4)
	var b2 [2]byte
	var b4 [4]byte
	bo.PutUint16(b2[:], uint16(len(d.fields)))
	out = append(out, b2[:]...)
	var extData []byte
	for _, f := range d.fields {
		bo.PutUint16(b2[:], f.tag)
		out = append(out, b2[:]...)
		bo.PutUint16(b2[:], f.typ)
		out = append(out, b2[:]...)
		bo.PutUint32(b4[:], f.count)
		out = append(out, b4[:]...)
		if len(f.val) <= 4 {
			var v [4]byte
			copy(v[:], f.val)
			out = append(out, v[:]...)
		} else {
			bo.PutUint32(b4[:], ext+uint32(len(extData)))
			out = append(out, b4[:]...)
			extData = append(extData, f.val...)
			if len(f.val)%2 == 1 {
				extData = append(extData, 0)
			}
		}
	}
	bo.PutUint32(b4[:], next)
	out = append(out, b4[:]...)
	return append(out, extData...)
}

// writeDNG lays out: header, image data (strips or tiles), then IFD0, the
// raw SubIFD if any, the Exif IFD.
func writeDNG(codes []uint16, w, h int, o DNG) []byte {
	var bo binary.ByteOrder = binary.LittleEndian
	out := []byte{'I', 'I', 42, 0, 0, 0, 0, 0}
	if o.BigEndian {
		bo = binary.BigEndian
		out = []byte{'M', 'M', 0, 42, 0, 0, 0, 0}
	}
	t := tw{bo}

	spp := 1
	if o.Linear {
		spp = 3
	}
	// Image data.
	cw, ch := w, min(o.RowsPerStrip, h)
	if o.TileW > 0 {
		cw, ch = o.TileW, o.TileH
	}
	across, down := (w+cw-1)/cw, (h+ch-1)/ch
	var offs, cnts []int
	for j := 0; j < down; j++ {
		for i := 0; i < across; i++ {
			rows := ch
			if o.TileW == 0 {
				rows = min(ch, h-j*ch)
			}
			// The chunk's samples, padded by repeating the last column/row.
			buf := make([]uint16, cw*rows*spp)
			for y := 0; y < rows; y++ {
				sy := min(j*ch+y, h-1)
				for x := 0; x < cw; x++ {
					sx := min(i*cw+x, w-1)
					for s := range spp {
						buf[(y*cw+x)*spp+s] = codes[(sy*w+sx)*spp+s]
					}
				}
			}
			var data []byte
			if o.Lossless {
				if spp > 1 {
					data = LosslessJPEG(buf, cw, rows, spp, o.Bits, o.Predictor, 0)
				} else if o.TileW > 0 {
					// Two components interleaved over half the tile's width
					// (the layout DNG writers use for wide tiles).
					data = LosslessJPEG(buf, cw/2, rows, 2, o.Bits, o.Predictor, 0)
				} else {
					data = LosslessJPEG(buf, cw, rows, 1, o.Bits, o.Predictor, cw*8)
				}
			} else {
				data = packCodes(buf, cw*spp, rows, o.Bits, bo)
			}
			offs = append(offs, len(out))
			cnts = append(cnts, len(data))
			out = append(out, data...)
			if len(out)%2 == 1 {
				out = append(out, 0)
			}
		}
	}

	comp := 1
	if o.Lossless {
		comp = 7
	}
	raw := &tifd{}
	raw.fields = append(raw.fields,
		t.long(254, 0), // NewSubFileType: main image
		t.long(256, w), t.long(257, h),
		t.short(259, comp), t.short(284, 1),
	)
	if len(o.SiteBlack) == 4 && !o.Linear {
		raw.fields = append(raw.fields, t.short(50713, 2, 2), t.long(50714, o.SiteBlack...)) // BlackLevelRepeatDim, BlackLevel
	} else {
		raw.fields = append(raw.fields, t.short(50713, 1, 1), t.long(50714, o.Black))
	}
	if len(o.Table) > 0 {
		tab := make([]int, len(o.Table))
		for i, v := range o.Table {
			tab[i] = int(v)
		}
		raw.fields = append(raw.fields, t.short(50712, tab...)) // LinearizationTable
	}
	raw.fields = append(raw.fields,
		t.long(50717, o.White), // WhiteLevel
		t.long(50719, o.Margin, o.Margin),
		t.long(50720, w-2*o.Margin, h-2*o.Margin),
		t.long(50829, 0, 0, h, w), // ActiveArea
	)
	if o.Linear {
		raw.fields = append(raw.fields, t.short(258, o.Bits, o.Bits, o.Bits), t.short(262, 34892), t.short(277, 3)) // LinearRaw
	} else {
		raw.fields = append(raw.fields, t.short(258, o.Bits), t.short(262, 32803), t.short(277, 1), // CFA
			t.short(33421, 2, 2), // CFARepeatPatternDim
			t.bytes(33422, 1, byte(colourIndex(o.Pattern[0])), byte(colourIndex(o.Pattern[1])), byte(colourIndex(o.Pattern[2])), byte(colourIndex(o.Pattern[3]))),
			t.bytes(50710, 1, 0, 1, 2), // CFAPlaneColor
			t.short(50711, 1),          // CFALayout: rectangular
		)
	}
	if o.TileW > 0 {
		raw.fields = append(raw.fields, t.long(322, o.TileW), t.long(323, o.TileH), t.long(324, offs...), t.long(325, cnts...))
	} else {
		raw.fields = append(raw.fields, t.long(273, offs...), t.long(278, ch), t.long(279, cnts...))
	}

	exifIFD := &tifd{}
	exifIFD.fields = append(exifIFD.fields, t.bytes(0x9000, 7, '0', '2', '3', '0'))
	if o.FNumber > 0 {
		exifIFD.fields = append(exifIFD.fields, t.rational(0x829D, int(math.Round(o.FNumber*100)), 100))
	}
	if o.FocalLengthMM > 0 {
		exifIFD.fields = append(exifIFD.fields, t.rational(0x920A, int(math.Round(o.FocalLengthMM*100)), 100))
	}
	if o.PitchUM > 0 {
		// Pixels per centimetre (unit 3, CIPA DC-008).
		r := t.rational(0xA20E, int(math.Round(1e4/o.PitchUM*1e5)), 100000)
		exifIFD.fields = append(exifIFD.fields, r, t.rational(0xA20F, int(math.Round(1e4/o.PitchUM*1e5)), 100000), t.short(0xA210, 3))
	}

	ifd0 := &tifd{ptrs: map[int]*tifd{}}
	if o.SubIFD {
		// A small grey preview (16 x 16, 8-bit, uncompressed) as IFD0.
		prev := make([]byte, 256)
		for i := range prev {
			prev[i] = 128
		}
		poff := len(out)
		out = append(out, prev...)
		ifd0.fields = append(ifd0.fields, t.long(254, 1), t.long(256, 16), t.long(257, 16), t.short(258, 8),
			t.short(259, 1), t.short(262, 1), t.long(273, poff), t.short(277, 1), t.long(278, 16), t.long(279, 256))
	} else {
		ifd0.fields = raw.fields
	}
	ifd0.fields = append(ifd0.fields,
		t.bytes(50706, 1, 1, 4, 0, 0), // DNGVersion 1.4.0.0
		t.bytes(50707, 1, 1, 1, 0, 0), // DNGBackwardVersion 1.1.0.0
	)
	if o.Make != "" {
		ifd0.fields = append(ifd0.fields, t.ascii(271, o.Make))
	}
	if o.Model != "" {
		ifd0.fields = append(ifd0.fields, t.ascii(272, o.Model))
	}
	ucm := o.UniqueCameraModel
	if ucm == "" {
		ucm = "Simulated camera"
	}
	ifd0.fields = append(ifd0.fields, t.ascii(50708, ucm))
	// ColorMatrix1 (identity, SRATIONAL) and AsShotNeutral from the gains:
	// DNG readers need a colour matrix; the measurement does not use it.
	cm := make([]byte, 0, 72)
	for i := 0; i < 9; i++ {
		v := 0
		if i%4 == 0 {
			v = 1
		}
		var b [8]byte
		bo.PutUint32(b[:], uint32(int32(v)))
		bo.PutUint32(b[4:], 1)
		cm = append(cm, b[:]...)
	}
	ifd0.fields = append(ifd0.fields, tfield{50721, 10, 9, cm})
	gmax := math.Max(o.Gains[0], math.Max(o.Gains[1], o.Gains[2]))
	neutral := make([]byte, 0, 24)
	for _, g := range o.Gains {
		var b [8]byte
		bo.PutUint32(b[:], uint32(math.Round(g/gmax*1e6)))
		bo.PutUint32(b[4:], 1000000)
		neutral = append(neutral, b[:]...)
	}
	ifd0.fields = append(ifd0.fields, tfield{50728, 5, 3, neutral})
	ifd0.fields = append(ifd0.fields, t.long(34665, 0))
	ifd0.ptrs[len(ifd0.fields)-1] = exifIFD
	chain := []*tifd{ifd0}
	if o.SubIFD {
		ifd0.fields = append(ifd0.fields, tfield{330, 4, 1, make([]byte, 4)})
		ifd0.ptrs[len(ifd0.fields)-1] = raw
		chain = append(chain, raw)
	}
	chain = append(chain, exifIFD)

	off := uint32(len(out))
	for _, d := range chain {
		d.off = off
		off += uint32(d.size())
	}
	bo.PutUint32(out[4:], ifd0.off)
	for _, d := range chain {
		out = d.write(bo, out, 0)
	}
	return out
}

// packCodes stores rows of w samples: 8 and 16 bits as bytes in the file's
// byte order, other depths packed most significant bit first with each row
// starting on a byte boundary (TIFF 6.0 Compression 1; DNG 1.4 chapter 5).
func packCodes(buf []uint16, w, h, bits int, bo binary.ByteOrder) []byte {
	switch bits {
	case 8:
		out := make([]byte, len(buf))
		for i, v := range buf {
			out[i] = byte(v)
		}
		return out
	case 16:
		out := make([]byte, 2*len(buf))
		for i, v := range buf {
			bo.PutUint16(out[2*i:], v)
		}
		return out
	}
	rowBytes := (w*bits + 7) / 8
	out := make([]byte, 0, rowBytes*h)
	for y := 0; y < h; y++ {
		var acc uint64
		var n uint
		for x := 0; x < w; x++ {
			acc = acc<<uint(bits) | uint64(buf[y*w+x])
			n += uint(bits)
			for n >= 8 {
				out = append(out, byte(acc>>(n-8)))
				n -= 8
			}
		}
		if n > 0 {
			out = append(out, byte(acc<<(8-n)))
		}
	}
	return out
}
