// Package jpegdec decodes baseline and progressive Huffman-coded JPEG files
// of 8-bit samples with one (grey) or three (YCbCr) components, giving the
// pixels libjpeg-turbo gives with its default decompression settings, which
// are the pixels a Chromium browser's decoder gives. A web page can then
// decode with the browser's fast decoder and get the core's pixels exactly.
//
// The method is ITU-T T.81 | ISO/IEC 10918-1 (1992): markers (annex B),
// Huffman decoding of the sequential (F.2.2) and progressive (G.2) modes,
// dequantisation and the 8 x 8 inverse DCT (A.3.3). Where the standard
// leaves the decoder a choice, this package makes libjpeg-turbo's default
// one (libjpeg-turbo 2.1, as documented in its libjpeg.txt, checked bit for
// bit against it by the tests):
//   - the inverse DCT is the accurate integer one ("islow"): the
//     Loeffler-Ligtenberg-Moschytz factorisation (C. Loeffler, A.
//     Ligtenberg, G. Moschytz, "Practical fast 1-D DCT algorithms with 11
//     multiplications", Proc. ICASSP 1989) in 13-bit fixed point, with 2
//     extra bits kept between the column and the row pass (idct.go);
//   - subsampled chroma is interpolated with a triangle filter, weights
//     3/4 and 1/4 ("fancy upsampling", upsample.go);
//   - YCbCr is turned into RGB with the JFIF equations (JPEG File
//     Interchange Format 1.02) in 16-bit fixed point (upsample.go).
//
// Decode returns the planes at their own resolution (*Gray or *YCbCr);
// YCbCr.Row gives the upsampled, converted RGB of any part of a row, so no
// full-frame RGB image is ever made.
package jpegdec

import (
	"errors"
	"fmt"
	"image"
	"runtime"
	"sync"
)

// ErrUnsupported is wrapped by the errors of valid files this package does
// not decode (arithmetic coding, 12-bit, lossless, CMYK, RGB, unusual
// sampling): the caller decodes those otherwise.
var ErrUnsupported = errors.New("jpegdec: unsupported JPEG")

// FormatError reports damaged or truncated data.
type FormatError string

func (e FormatError) Error() string { return "jpegdec: " + string(e) }

// TooLargeError reports a frame of more pixels than the caller allows.
type TooLargeError struct{ Width, Height int }

func (e *TooLargeError) Error() string {
	return fmt.Sprintf("jpegdec: image of %d x %d px above the limit", e.Width, e.Height)
}

func unsupported(what string) error { return fmt.Errorf("%w: %s", ErrUnsupported, what) }

// zigzag[i] is the natural (row-major) index of the i-th coefficient in
// zig-zag order (T.81 figure A.6); 16 extra entries keep a damaged run
// inside the block.
var zigzag = [64 + 16]uint8{
	0, 1, 8, 16, 9, 2, 3, 10,
	17, 24, 32, 25, 18, 11, 4, 5,
	12, 19, 26, 33, 40, 48, 41, 34,
	27, 20, 13, 6, 7, 14, 21, 28,
	35, 42, 49, 56, 57, 50, 43, 36,
	29, 22, 15, 23, 30, 37, 44, 51,
	58, 59, 52, 45, 38, 31, 39, 46,
	53, 60, 61, 54, 47, 55, 62, 63,
	63, 63, 63, 63, 63, 63, 63, 63,
	63, 63, 63, 63, 63, 63, 63, 63,
}

type component struct {
	id, h, v, tq int
	// bw x bh blocks in the MCU grid (padded); cbw x cbh blocks really
	// coded when the component is alone in a scan (T.81 A.2.1)
	bw, bh, cbw, cbh int
	dsW, dsH         int // samples of the component inside the image
	pix              []uint8
	stride           int
	coef             []int16 // all blocks (progressive or several scans)
	pred             int32
	td, ta           int
}

type decoder struct {
	data []byte
	pos  int

	// bit reader
	bits  uint64 // left-aligned
	nbits int
	fake  int // zero bytes fed after the end of the scan's data

	w, h        int
	progressive bool
	frame       bool
	comps       []component
	maxH, maxV  int
	mcusX       int
	mcusY       int
	qt          [4][64]int32 // natural order
	qtSet       [4]bool
	dc, ac      [4]huffTable
	restart     int
	jfif        bool
	adobe       bool
	transform   int
	eobrun      int
	scans       int
	streaming   bool // single interleaved baseline scan, no coefficient buffer
	doneStream  bool
	maxPixels   int
	headerOnly  bool // Supported: stop at the first scan
	rgb         bool // three components stored as RGB, not YCbCr
	ratio       image.YCbCrSubsampleRatio
}

// Decode decodes data. maxPixels (> 0) bounds width x height, checked
// before anything is allocated. The result is *image.Gray for one
// component or *YCbCr for three. Errors wrap ErrUnsupported, or are
// FormatError or *TooLargeError.
func Decode(data []byte, maxPixels int) (img image.Image, err error) {
	defer func() {
		if r := recover(); r != nil { // a bug must not reach the user
			img, err = nil, FormatError(fmt.Sprint("decoder failed: ", r))
		}
	}()
	return decode(data, maxPixels)
}

// maxScans bounds the scans of a file: each costs a pass over every block
// even when its data are a few bytes, so a damaged or hostile file of many
// empty scans would take very long. Encoders write at most about a dozen.
const maxScans = 256

// decode is Decode without the recovery from panics (the fuzz test calls
// it, so that a panic is seen).
func decode(data []byte, maxPixels int) (image.Image, error) {
	d := &decoder{data: data, maxPixels: maxPixels}
	if err := d.run(); err != nil {
		return nil, err
	}
	return d.image()
}

func (d *decoder) u16(p int) int { return int(d.data[p])<<8 | int(d.data[p+1]) }

func (d *decoder) run() error {
	if len(d.data) < 4 || d.data[0] != 0xff || d.data[1] != 0xd8 {
		return FormatError("missing start of image")
	}
	d.pos = 2
	for {
		// find the next marker, skipping fill bytes
		if d.pos+2 > len(d.data) {
			return FormatError("truncated")
		}
		if d.data[d.pos] != 0xff {
			return FormatError("marker expected")
		}
		m := d.data[d.pos+1]
		if m == 0xff {
			d.pos++
			continue
		}
		d.pos += 2
		if m == 0xd9 { // EOI
			break
		}
		if m >= 0xd0 && m <= 0xd7 || m == 0x01 {
			continue // stray RST or TEM: no segment
		}
		if d.pos+2 > len(d.data) {
			return FormatError("truncated")
		}
		n := d.u16(d.pos)
		if n < 2 || d.pos+n > len(d.data) {
			return FormatError("truncated segment")
		}
		seg := d.data[d.pos+2 : d.pos+n]
		d.pos += n
		var err error
		switch {
		case m == 0xc0 || m == 0xc1 || m == 0xc2:
			err = d.sof(seg, m == 0xc2)
		case m == 0xc4:
			err = d.dht(seg)
		case m == 0xdb:
			err = d.dqt(seg)
		case m == 0xdd:
			if len(seg) < 2 {
				return FormatError("bad DRI")
			}
			d.restart = int(seg[0])<<8 | int(seg[1])
		case m == 0xda:
			err = d.sos(seg)
		case m == 0xe0:
			if len(seg) >= 5 && string(seg[:5]) == "JFIF\x00" {
				d.jfif = true
			}
		case m == 0xee:
			if len(seg) >= 12 && string(seg[:5]) == "Adobe" {
				d.adobe = true
				d.transform = int(seg[11])
			}
		case m >= 0xc3 && m <= 0xcf && m != 0xc8 && m != 0xcc:
			return unsupported("lossless, hierarchical or arithmetic-coded frame")
		case m == 0xcc:
			return unsupported("arithmetic coding")
		}
		if err != nil {
			return err
		}
	}
	if !d.frame || d.scans == 0 {
		return FormatError("no image data")
	}
	if !d.streaming {
		d.idctAll()
	}
	return nil
}

func (d *decoder) sof(seg []byte, progressive bool) error {
	if d.frame {
		return unsupported("several frames")
	}
	if len(seg) < 6 {
		return FormatError("bad frame header")
	}
	if seg[0] != 8 {
		return unsupported(fmt.Sprintf("%d-bit samples", seg[0]))
	}
	d.h = int(seg[1])<<8 | int(seg[2])
	d.w = int(seg[3])<<8 | int(seg[4])
	nc := int(seg[5])
	if d.w == 0 || d.h == 0 {
		return unsupported("height set later (DNL)")
	}
	if nc != 1 && nc != 3 {
		return unsupported(fmt.Sprintf("%d components", nc))
	}
	if len(seg) < 6+3*nc {
		return FormatError("bad frame header")
	}
	if d.maxPixels > 0 && int64(d.w)*int64(d.h) > int64(d.maxPixels) {
		return &TooLargeError{d.w, d.h}
	}
	d.progressive = progressive
	d.comps = make([]component, nc)
	d.maxH, d.maxV = 1, 1
	for i := range d.comps {
		c := &d.comps[i]
		c.id = int(seg[6+3*i])
		c.h, c.v = int(seg[7+3*i]>>4), int(seg[7+3*i]&15)
		c.tq = int(seg[8+3*i])
		if c.h < 1 || c.h > 4 || c.v < 1 || c.v > 4 || c.tq > 3 {
			return FormatError("bad sampling factors")
		}
		d.maxH, d.maxV = max(d.maxH, c.h), max(d.maxV, c.v)
	}
	if nc == 1 { // a single component is never interleaved: its factors do not matter
		d.comps[0].h, d.comps[0].v, d.maxH, d.maxV = 1, 1, 1, 1
	}
	d.mcusX = (d.w + 8*d.maxH - 1) / (8 * d.maxH)
	d.mcusY = (d.h + 8*d.maxV - 1) / (8 * d.maxV)
	for i := range d.comps {
		c := &d.comps[i]
		c.bw, c.bh = d.mcusX*c.h, d.mcusY*c.v
		c.dsW = (d.w*c.h + d.maxH - 1) / d.maxH
		c.dsH = (d.h*c.v + d.maxV - 1) / d.maxV
		c.cbw, c.cbh = (c.dsW+7)/8, (c.dsH+7)/8
		c.stride = 8 * c.bw
	}
	d.frame = true
	return nil
}

func (d *decoder) dqt(seg []byte) error {
	for len(seg) > 0 {
		pq, tq := int(seg[0]>>4), int(seg[0]&15)
		if tq > 3 || pq > 1 {
			return FormatError("bad quantisation table")
		}
		n := 64 * (1 + pq)
		if len(seg) < 1+n {
			return FormatError("bad quantisation table")
		}
		for i := 0; i < 64; i++ {
			var q int32
			if pq == 0 {
				q = int32(seg[1+i])
			} else {
				q = int32(seg[1+2*i])<<8 | int32(seg[2+2*i])
			}
			d.qt[tq][zigzag[i]] = q
		}
		d.qtSet[tq] = true
		seg = seg[1+n:]
	}
	return nil
}

func (d *decoder) dht(seg []byte) error {
	for len(seg) > 0 {
		if len(seg) < 17 {
			return FormatError("bad Huffman table")
		}
		tc, th := int(seg[0]>>4), int(seg[0]&15)
		if tc > 1 || th > 3 {
			return FormatError("bad Huffman table")
		}
		var counts [16]int
		total := 0
		for i := range counts {
			counts[i] = int(seg[1+i])
			total += counts[i]
		}
		if total > 256 || len(seg) < 17+total {
			return FormatError("bad Huffman table")
		}
		t := &d.dc[th]
		if tc == 1 {
			t = &d.ac[th]
		}
		if err := t.build(counts, seg[17:17+total]); err != nil {
			return err
		}
		seg = seg[17+total:]
	}
	return nil
}

// allocate makes the sample planes (and the coefficient buffers unless the
// file is decoded as it streams) at the first scan.
func (d *decoder) allocate() {
	for i := range d.comps {
		c := &d.comps[i]
		c.pix = make([]uint8, c.stride*8*c.bh)
		if !d.streaming {
			c.coef = make([]int16, 64*c.bw*c.bh)
		}
	}
}

func (d *decoder) sos(seg []byte) error {
	if !d.frame {
		return FormatError("scan before frame")
	}
	if d.scans >= maxScans {
		return unsupported("more than 256 scans")
	}
	if d.doneStream {
		return unsupported("scans after a complete baseline scan")
	}
	if len(seg) < 1 {
		return FormatError("bad scan header")
	}
	ns := int(seg[0])
	if ns < 1 || ns > len(d.comps) || len(seg) < 4+2*ns {
		return FormatError("bad scan header")
	}
	var sc [3]*component
	for i := 0; i < ns; i++ {
		id := int(seg[1+2*i])
		var c *component
		for j := range d.comps {
			if d.comps[j].id == id {
				c = &d.comps[j]
			}
		}
		if c == nil {
			return FormatError("scan names an unknown component")
		}
		for j := 0; j < i; j++ {
			if sc[j] == c {
				return FormatError("scan names a component twice")
			}
		}
		c.td, c.ta = int(seg[2+2*i]>>4), int(seg[2+2*i]&15)
		if c.td > 3 || c.ta > 3 {
			return FormatError("bad scan header")
		}
		if !d.qtSet[c.tq] {
			return FormatError("missing quantisation table")
		}
		sc[i] = c
	}
	ss, se := int(seg[1+2*ns]), int(seg[2+2*ns])
	ah, al := int(seg[3+2*ns]>>4), int(seg[3+2*ns]&15)
	if d.progressive {
		if ss > se || se > 63 || (ss == 0) != (se == 0) || (ss > 0 && ns != 1) || al > 13 || ah > 13 {
			return FormatError("bad progressive scan")
		}
	} else if ss != 0 || se != 63 || ah != 0 || al != 0 {
		return FormatError("bad sequential scan")
	}
	if d.scans == 0 {
		if err := d.layout(); err != nil {
			return err
		}
		if d.headerOnly {
			return errHeaderRead
		}
		d.streaming = !d.progressive && ns == len(d.comps)
		d.allocate()
	}
	d.scans++
	comps := sc[:ns]
	for _, c := range comps {
		c.pred = 0
		dcUsed := !d.progressive || ss == 0 && ah == 0
		acUsed := !d.progressive || ss > 0
		if dcUsed && !d.dc[c.td].ok || acUsed && !d.ac[c.ta].ok {
			return FormatError("missing Huffman table")
		}
	}
	d.bits, d.nbits, d.fake, d.eobrun = 0, 0, 0, 0
	err := d.scan(comps, ss, se, ah, al)
	if err != nil {
		return err
	}
	if d.streaming {
		d.doneStream = true
	}
	// skip to the next marker
	for d.pos+1 < len(d.data) && !(d.data[d.pos] == 0xff && d.data[d.pos+1] != 0 && (d.data[d.pos+1] < 0xd0 || d.data[d.pos+1] > 0xd7)) {
		d.pos++
	}
	return nil
}

// mcuRowWorkers is how many goroutines convert MCU rows of a streamed scan.
func mcuRowWorkers() int { return min(runtime.GOMAXPROCS(0), 4) }

// scan decodes the entropy-coded data of one scan.
func (d *decoder) scan(comps []*component, ss, se, ah, al int) error {
	// MCU geometry: one block per MCU for a single component (A.2.2)
	single := len(comps) == 1
	mx, my := d.mcusX, d.mcusY
	if single {
		mx, my = comps[0].cbw, comps[0].cbh
	}
	blocksPerMCU := 0
	for _, c := range comps {
		if single {
			blocksPerMCU++
		} else {
			blocksPerMCU += c.h * c.v
		}
	}
	var rowBuf [][]int16
	var pipe chan mcuRow
	var wg sync.WaitGroup
	var free chan []int16
	if d.streaming {
		nbuf := 1
		workers := mcuRowWorkers()
		if workers > 1 && my > 1 {
			nbuf = 2 * workers
			pipe = make(chan mcuRow, nbuf)
			for i := 0; i < workers; i++ {
				wg.Add(1)
				go func() {
					defer wg.Done()
					for r := range pipe {
						d.idctRow(comps, r.coef, r.my, mx)
						free <- r.coef
					}
				}()
			}
		}
		free = make(chan []int16, nbuf)
		for i := 0; i < nbuf; i++ {
			buf := make([]int16, 64*blocksPerMCU*mx)
			rowBuf = append(rowBuf, buf)
			free <- buf
		}
	}
	defer func() {
		if pipe != nil {
			close(pipe)
			wg.Wait()
		}
	}()
	mcu := 0
	for y := 0; y < my; y++ {
		var row []int16
		if d.streaming {
			row = <-free
			clear(row)
		}
		for x := 0; x < mx; x++ {
			if d.restart > 0 && mcu > 0 && mcu%d.restart == 0 {
				if err := d.restartMarker(comps); err != nil {
					return err
				}
			}
			mcu++
			bi := 0
			for _, c := range comps {
				nh, nv := c.h, c.v
				if single {
					nh, nv = 1, 1
				}
				for by := 0; by < nv; by++ {
					for bx := 0; bx < nh; bx++ {
						var b []int16
						if d.streaming {
							b = row[64*(bi+blocksPerMCU*x) : 64*(bi+blocksPerMCU*x)+64]
							bi++
						} else {
							gx, gy := x*nh+bx, y*nv+by
							o := 64 * (gy*c.bw + gx)
							b = c.coef[o : o+64]
						}
						var err error
						switch {
						case !d.progressive:
							err = d.blockBaseline(c, b)
						case ss == 0 && ah == 0:
							err = d.dcFirst(c, b, al)
						case ss == 0:
							err = d.dcRefine(b, al)
						case ah == 0:
							err = d.acFirst(c, b, ss, se, al)
						default:
							err = d.acRefine(c, b, ss, se, al)
						}
						if err != nil {
							return err
						}
					}
				}
			}
		}
		if 8*d.fake > d.nbits {
			return FormatError("truncated or damaged scan")
		}
		if d.streaming {
			if pipe != nil {
				pipe <- mcuRow{row, y}
			} else {
				d.idctRow(comps, row, y, mx)
				free <- row
			}
		}
	}
	return nil
}

type mcuRow struct {
	coef []int16
	my   int
}

// idctRow converts one MCU row of a streamed interleaved scan.
func (d *decoder) idctRow(comps []*component, row []int16, y, mx int) {
	bi := 0
	per := 0
	for _, c := range comps {
		per += c.h * c.v
	}
	for x := 0; x < mx; x++ {
		bi = 0
		for _, c := range comps {
			q := &d.qt[c.tq]
			for by := 0; by < c.v; by++ {
				for bx := 0; bx < c.h; bx++ {
					o := 64 * (bi + per*x)
					gx, gy := x*c.h+bx, y*c.v+by
					idct(row[o:o+64:o+64], q, c.pix[8*gy*c.stride+8*gx:], c.stride)
					bi++
				}
			}
		}
	}
}

// idctAll converts every block of the coefficient buffers, rows in
// parallel.
func (d *decoder) idctAll() {
	for i := range d.comps {
		c := &d.comps[i]
		q := &d.qt[c.tq]
		rows := func(y0, y1 int) {
			for by := y0; by < y1; by++ {
				for bx := 0; bx < c.bw; bx++ {
					o := 64 * (by*c.bw + bx)
					idct(c.coef[o:o+64:o+64], q, c.pix[8*by*c.stride+8*bx:], c.stride)
				}
			}
		}
		parallel(c.bh, rows)
		c.coef = nil
	}
}

// parallel runs fn over [0, n) split among the available CPUs.
func parallel(n int, fn func(a, b int)) {
	k := min(runtime.GOMAXPROCS(0), 8, n)
	if k < 2 {
		fn(0, n)
		return
	}
	var wg sync.WaitGroup
	for i := 0; i < k; i++ {
		a, b := n*i/k, n*(i+1)/k
		wg.Add(1)
		go func() {
			defer wg.Done()
			fn(a, b)
		}()
	}
	wg.Wait()
}

func (d *decoder) restartMarker(comps []*component) error {
	if 8*d.fake > d.nbits {
		return FormatError("truncated scan")
	}
	d.bits, d.nbits, d.fake = 0, 0, 0
	for d.pos < len(d.data) && d.data[d.pos] == 0xff && d.pos+1 < len(d.data) && d.data[d.pos+1] == 0xff {
		d.pos++
	}
	if d.pos+2 > len(d.data) || d.data[d.pos] != 0xff || d.data[d.pos+1] < 0xd0 || d.data[d.pos+1] > 0xd7 {
		return FormatError("restart marker missing")
	}
	d.pos += 2
	for _, c := range comps {
		c.pred = 0
	}
	d.eobrun = 0
	return nil
}

// layout decides, from the markers read before the first scan, how the
// components become pixels (libjpeg-turbo's rules for the colour space:
// a JFIF marker means YCbCr; else an Adobe marker's transform 0 means RGB;
// else component identifiers 'R', 'G', 'B' mean RGB; else YCbCr) and
// refuses what this package does not decode.
func (d *decoder) layout() error {
	if len(d.comps) == 1 {
		return nil
	}
	if !d.jfif && (d.adobe && d.transform == 0 || !d.adobe && d.comps[0].id == 'R' && d.comps[1].id == 'G' && d.comps[2].id == 'B') {
		d.rgb = true
	}
	y, cb, cr := &d.comps[0], &d.comps[1], &d.comps[2]
	if cb.h != cr.h || cb.v != cr.v || y.h != d.maxH || y.v != d.maxV {
		return unsupported("chroma sampling")
	}
	switch {
	case y.h == cb.h && y.v == cb.v:
		d.ratio = image.YCbCrSubsampleRatio444
	case d.rgb:
		return unsupported("subsampled RGB")
	case y.h == 2*cb.h && y.v == cb.v:
		d.ratio = image.YCbCrSubsampleRatio422
	case y.h == 2*cb.h && y.v == 2*cb.v:
		d.ratio = image.YCbCrSubsampleRatio420
	case y.h == cb.h && y.v == 2*cb.v:
		d.ratio = image.YCbCrSubsampleRatio440
	default:
		return unsupported("chroma sampling")
	}
	return nil
}

// errHeaderRead stops Supported's reading at the first scan.
var errHeaderRead = errors.New("jpegdec: header read")

// Supported reports whether Decode would decode data as far as its
// markers up to the first scan tell (the scans themselves are not read):
// the files whose pixels are libjpeg-turbo's. A browser may decode those
// for the core.
func Supported(data []byte) (ok bool) {
	defer func() {
		if recover() != nil {
			ok = false
		}
	}()
	d := &decoder{data: data, headerOnly: true}
	return d.run() == errHeaderRead
}

func (d *decoder) image() (image.Image, error) {
	if len(d.comps) == 1 {
		c := &d.comps[0]
		return &image.Gray{Pix: c.pix, Stride: c.stride, Rect: image.Rect(0, 0, d.w, d.h)}, nil
	}
	y, cb, cr := &d.comps[0], &d.comps[1], &d.comps[2]
	if d.rgb { // stored as RGB: copied as it is
		m := image.NewRGBA(image.Rect(0, 0, d.w, d.h))
		for j := 0; j < d.h; j++ {
			o := j * m.Stride
			for i := 0; i < d.w; i++ {
				k := j*y.stride + i
				m.Pix[o+4*i], m.Pix[o+4*i+1], m.Pix[o+4*i+2], m.Pix[o+4*i+3] = y.pix[k], cb.pix[k], cr.pix[k], 255
			}
		}
		return m, nil
	}
	m := &YCbCr{YCbCr: image.YCbCr{
		Y: y.pix, Cb: cb.pix, Cr: cr.pix,
		YStride: y.stride, CStride: cb.stride,
		SubsampleRatio: d.ratio,
		Rect:           image.Rect(0, 0, d.w, d.h),
	}}
	m.init()
	return m, nil
}
