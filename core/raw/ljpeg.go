package raw

// A decoder for the lossless process of ITU-T T.81 | ISO/IEC 10918-1
// (1992), annex H, as DNG uses it for compression 7: one frame (SOF3) with
// one or more components (DNG writers interleave two or four components to
// halve a wide tile), Huffman-coded differences (annex F.1.2.1 and F.2.2.1
// apply to the differences, with category 16 taking no extra bits,
// H.1.2.2), predictors 1 to 7 of table H.1, the point transform Pt, and
// restart intervals (H.1.2.1: the prediction restarts as on the first
// line). Arithmetic coding and hierarchical frames are refused.

// ljFrame is a decoded lossless JPEG frame: W x H pixels of NC components,
// samples interleaved per pixel, row by row.
type ljFrame struct {
	W, H, NC  int
	Precision int
	Pix       []uint16
}

// huffTable is a decoding table built from BITS and HUFFVAL (T.81, annex C
// and F.2.2.3: MINCODE, MAXCODE, VALPTR).
type huffTable struct {
	maxCode [17]int32 // -1 where no code of that length exists
	valPtr  [17]int32
	minCode [17]int32
	vals    []uint8
	ok      bool
}

func buildHuff(bits [16]uint8, vals []uint8) (huffTable, error) {
	var h huffTable
	code, k := int32(0), int32(0)
	for l := 1; l <= 16; l++ {
		n := int32(bits[l-1])
		h.valPtr[l] = k
		h.minCode[l] = code
		code += n
		k += n
		if n == 0 {
			h.maxCode[l] = -1
		} else {
			h.maxCode[l] = code - 1
		}
		if code > 1<<l {
			return h, FormatError("lossless JPEG Huffman table is over-subscribed")
		}
		code <<= 1
	}
	if int(k) != len(vals) {
		return h, FormatError("lossless JPEG Huffman table is inconsistent")
	}
	h.vals = vals
	h.ok = true
	return h, nil
}

// bitReader reads the entropy-coded segment, removing stuffed zero bytes
// (T.81 F.1.2.3) and stopping at a marker.
type bitReader struct {
	d      []byte
	p      int
	acc    uint64
	n      uint
	marker bool // a marker was met; further bits read as zeros
	over   int  // zero bits supplied past the data
}

func (b *bitReader) fill() {
	for b.n <= 56 {
		var c byte
		if b.marker || b.p >= len(b.d) {
			b.over += 8
			c = 0
		} else {
			c = b.d[b.p]
			if c == 0xFF {
				if b.p+1 < len(b.d) && b.d[b.p+1] == 0x00 {
					b.p += 2
				} else {
					b.marker = true
					b.over += 8
					c = 0
				}
			} else {
				b.p++
			}
		}
		b.acc |= uint64(c) << (56 - b.n)
		b.n += 8
	}
}

func (b *bitReader) bits(k uint) int32 {
	if k == 0 {
		return 0
	}
	if b.n < k {
		b.fill()
	}
	v := int32(b.acc >> (64 - k))
	b.acc <<= k
	b.n -= k
	return v
}

// decode reads one Huffman-coded value (T.81 F.2.2.3, DECODE).
func (b *bitReader) decode(h *huffTable) (int, bool) {
	if b.n < 16 {
		b.fill()
	}
	code := int32(0)
	for l := 1; l <= 16; l++ {
		code = code<<1 | int32(b.acc>>63)
		b.acc <<= 1
		b.n--
		if h.maxCode[l] >= 0 && code <= h.maxCode[l] {
			return int(h.vals[h.valPtr[l]+code-h.minCode[l]]), true
		}
	}
	return 0, false
}

// diff reads one difference: category SSSS then SSSS bits (T.81 F.2.2.1,
// EXTEND), with 16 meaning 32768 and no extra bits (H.1.2.2).
func (b *bitReader) diff(h *huffTable) (int32, bool) {
	s, ok := b.decode(h)
	if !ok || s > 16 {
		return 0, false
	}
	switch s {
	case 0:
		return 0, true
	case 16:
		return 32768, true
	}
	v := b.bits(uint(s))
	if v < 1<<(s-1) {
		v += -(1 << s) + 1
	}
	return v, true
}

// restart skips to the RSTm marker after an interval (T.81 F.1.2.3 and
// H.1.2.1) and resets the bit reader.
func (b *bitReader) restart() bool {
	if !b.marker {
		// Skip the rest of the interval's data up to the marker.
		for b.p+1 < len(b.d) && (b.d[b.p] != 0xFF || b.d[b.p+1] == 0x00) {
			b.p++
		}
	}
	for b.p+1 < len(b.d) && b.d[b.p] == 0xFF && b.d[b.p+1] == 0xFF {
		b.p++
	}
	if b.p+1 >= len(b.d) || b.d[b.p+1] < 0xD0 || b.d[b.p+1] > 0xD7 {
		return false
	}
	b.p += 2
	b.acc, b.n, b.marker, b.over = 0, 0, false, 0
	return true
}

// maxLJSamples bounds a frame's samples before allocation.
const maxLJSamples = 1 << 28

// decodeLJ decodes one lossless JPEG stream; limit is the most samples
// (W x H x NC) the caller accepts.
func decodeLJ(d []byte, limit int) (*ljFrame, error) {
	if len(d) < 4 || d[0] != 0xFF || d[1] != 0xD8 {
		return nil, FormatError("lossless JPEG tile does not start with an SOI marker")
	}
	var (
		tables  [4]huffTable
		fr      *ljFrame
		compIDs []byte
		restart int
	)
	p := 2
	for {
		for p < len(d) && d[p] == 0xFF && p+1 < len(d) && d[p+1] == 0xFF {
			p++ // fill bytes before a marker
		}
		if p+4 > len(d) || d[p] != 0xFF {
			return nil, FormatError("lossless JPEG tile is truncated or corrupt (no marker where one is due)")
		}
		m := d[p+1]
		seg := int(d[p+2])<<8 | int(d[p+3])
		if seg < 2 || p+2+seg > len(d) {
			return nil, FormatError("lossless JPEG tile is truncated (a marker segment runs past its end)")
		}
		body := d[p+4 : p+2+seg]
		p += 2 + seg
		switch {
		case m == 0xC4: // DHT, T.81 B.2.4.2
			for len(body) > 0 {
				if len(body) < 17 {
					return nil, FormatError("lossless JPEG Huffman table is truncated")
				}
				tc, th := body[0]>>4, body[0]&15
				if tc != 0 || th > 3 {
					return nil, FormatError("lossless JPEG Huffman table class or number out of range")
				}
				var bits [16]uint8
				n := 0
				for i := range bits {
					bits[i] = body[1+i]
					n += int(bits[i])
				}
				if len(body) < 17+n || n > 256 {
					return nil, FormatError("lossless JPEG Huffman table is truncated")
				}
				h, err := buildHuff(bits, append([]uint8(nil), body[17:17+n]...))
				if err != nil {
					return nil, err
				}
				tables[th] = h
				body = body[17+n:]
			}
		case m == 0xC3: // SOF3, lossless sequential Huffman (T.81 B.2.2)
			if len(body) < 6 {
				return nil, FormatError("lossless JPEG frame header is truncated")
			}
			prec := int(body[0])
			h := int(body[1])<<8 | int(body[2])
			w := int(body[3])<<8 | int(body[4])
			nc := int(body[5])
			if prec < 2 || prec > 16 || nc < 1 || nc > 4 || len(body) < 6+3*nc {
				return nil, formatf("lossless JPEG frame header is invalid (precision %d, %d components)", prec, nc)
			}
			if w == 0 || h == 0 {
				return nil, FormatError("lossless JPEG frame declares an empty image (or a DNL marker, not read)")
			}
			if w*h*nc > limit || w*h*nc > maxLJSamples {
				return nil, formatf("lossless JPEG frame of %d x %d x %d samples is larger than its tile", w, h, nc)
			}
			compIDs = make([]byte, nc)
			for i := range nc {
				compIDs[i] = body[6+3*i]
				if body[7+3*i] != 0x11 {
					return nil, UnsupportedError("lossless JPEG with subsampled components is not read")
				}
			}
			fr = &ljFrame{W: w, H: h, NC: nc, Precision: prec}
		case m >= 0xC0 && m <= 0xCF && m != 0xC4 && m != 0xC8 && m != 0xCC:
			return nil, unsupportedf("JPEG process SOF%d inside a DNG tile is not read (only lossless Huffman, SOF3)", m-0xC0)
		case m == 0xDD: // DRI
			if len(body) < 2 {
				return nil, FormatError("lossless JPEG restart interval is truncated")
			}
			restart = int(body[0])<<8 | int(body[1])
		case m == 0xDA: // SOS, T.81 B.2.3
			if fr == nil {
				return nil, FormatError("lossless JPEG scan comes before its frame header")
			}
			if len(body) < 1 || int(body[0]) != fr.NC || len(body) < 1+2*fr.NC+3 {
				return nil, UnsupportedError("lossless JPEG with components in several scans is not read")
			}
			sel := make([]*huffTable, fr.NC)
			for i := range fr.NC {
				if body[1+2*i] != compIDs[i] {
					return nil, UnsupportedError("lossless JPEG scan lists its components out of frame order")
				}
				t := &tables[body[2+2*i]>>4&3]
				if !t.ok {
					return nil, FormatError("lossless JPEG scan uses an undefined Huffman table")
				}
				sel[i] = t
			}
			k := 1 + 2*fr.NC
			pred, pt := int(body[k]), int(body[k+2]&15)
			if pred < 1 || pred > 7 {
				return nil, formatf("lossless JPEG predictor %d is not one of 1 to 7", pred)
			}
			if pt >= fr.Precision {
				return nil, FormatError("lossless JPEG point transform is not below the precision")
			}
			if err := fr.scan(d[p:], sel, pred, pt, restart); err != nil {
				return nil, err
			}
			return fr, nil
		case m == 0xD9:
			return nil, FormatError("lossless JPEG tile ends before its scan")
		}
	}
}

// scan decodes the entropy-coded data of the single scan (T.81 H.1.2).
func (fr *ljFrame) scan(d []byte, sel []*huffTable, pred, pt, restart int) error {
	w, h, nc := fr.W, fr.H, fr.NC
	fr.Pix = make([]uint16, w*h*nc)
	pix := fr.Pix
	br := &bitReader{d: d}
	mask := int32(0xFFFF)
	initial := int32(1) << (fr.Precision - pt - 1) // H.1.1, the first sample's prediction
	stride := w * nc
	mcus := 0
	first := true // first line after the start or a restart
	for y := 0; y < h; y++ {
		for x := 0; x < w; x++ {
			if restart > 0 && mcus == restart {
				if !br.restart() {
					return FormatError("lossless JPEG restart marker missing (tile truncated or corrupt)")
				}
				mcus = 0
				first = true
			}
			for c := 0; c < nc; c++ {
				i := y*stride + x*nc + c
				var px int32
				switch {
				case first && x == 0:
					px = initial
				case first:
					px = int32(pix[i-nc]) // first line: Ra
				case x == 0:
					px = int32(pix[i-stride]) // start of a line: Rb
				default:
					ra, rb, rc := int32(pix[i-nc]), int32(pix[i-stride]), int32(pix[i-stride-nc])
					switch pred { // table H.1
					case 1:
						px = ra
					case 2:
						px = rb
					case 3:
						px = rc
					case 4:
						px = ra + rb - rc
					case 5:
						px = ra + (rb-rc)>>1
					case 6:
						px = rb + (ra-rc)>>1
					case 7:
						px = (ra + rb) >> 1
					}
				}
				dv, ok := br.diff(sel[c])
				if !ok {
					return FormatError("lossless JPEG data is corrupt (an invalid Huffman code)")
				}
				pix[i] = uint16((px + dv) & mask) // modulo 2^16, H.1.2.1
			}
			mcus++
			if x == w-1 {
				first = false // later lines start from Rb (a restart re-arms first)
			}
			if br.over > int(br.n)+16 {
				return FormatError("lossless JPEG tile is truncated (its data ends early)")
			}
		}
	}
	if pt > 0 {
		for i := range pix {
			pix[i] <<= pt
		}
	}
	return nil
}
