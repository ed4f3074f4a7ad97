package simcam

import (
	"sort"
)

// LosslessJPEG encodes w x h pixels of nc interleaved 16-bit-or-less
// components (pix row by row, nc samples per pixel) with the lossless
// process of ITU-T T.81 | ISO/IEC 10918-1 (1992), annex H: SOF3, one scan
// holding every component, predictor pred (1 to 7, table H.1), point
// transform 0, and, if restart > 0, a restart marker every restart pixels
// (T.81 H.1.2.1: it must be a whole number of lines). Differences are
// taken modulo 2^16 and coded by category SSSS and SSSS extra bits (F.1.2.1
// and H.1.2.2, category 16 for 32768 with no extra bits) with one Huffman
// table per component, whose code lengths follow the categories'
// frequencies (a simple length assignment of our own that keeps the Kraft
// sum below 1, so no code is all ones, as annex C requires).
//
// It is written for tests and the simulated camera's DNGs; it panics on a
// programmer error (sizes out of range).
func LosslessJPEG(pix []uint16, w, h, nc, precision, pred, restart int) []byte {
	if w < 1 || h < 1 || w > 65535 || h > 65535 || nc < 1 || nc > 4 || len(pix) != w*h*nc ||
		precision < 2 || precision > 16 || pred < 1 || pred > 7 || (restart > 0 && restart%w != 0) {
		panic("simcam: LosslessJPEG called with invalid sizes")
	}
	// First pass: the differences and their categories.
	diffs := make([]int32, len(pix))
	stride := w * nc
	var freq [4][17]int
	for y := 0; y < h; y++ {
		first := y == 0 || (restart > 0 && (y*w)%restart == 0)
		for x := 0; x < w; x++ {
			for c := 0; c < nc; c++ {
				i := y*stride + x*nc + c
				var px int32
				switch {
				case first && x == 0:
					px = 1 << (precision - 1)
				case first:
					px = int32(pix[i-nc])
				case x == 0:
					px = int32(pix[i-stride])
				default:
					ra, rb, rc := int32(pix[i-nc]), int32(pix[i-stride]), int32(pix[i-stride-nc])
					switch pred {
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
				d := (int32(pix[i]) - px) & 0xFFFF
				if d >= 32768 {
					d -= 65536
				}
				diffs[i] = d
				freq[c][category(d)]++
			}
		}
	}
	var codes [4][17]hcode
	var out []byte
	out = append(out, 0xFF, 0xD8)
	// DHT: one table per component.
	for c := 0; c < nc; c++ {
		bits, vals, cs := huffmanFor(freq[c])
		codes[c] = cs
		seg := []byte{byte(c)}
		seg = append(seg, bits[:]...)
		seg = append(seg, vals...)
		out = appendSegment(out, 0xC4, seg)
	}
	// SOF3.
	sof := []byte{byte(precision), byte(h >> 8), byte(h), byte(w >> 8), byte(w), byte(nc)}
	for c := 0; c < nc; c++ {
		sof = append(sof, byte(c+1), 0x11, 0)
	}
	out = appendSegment(out, 0xC3, sof)
	if restart > 0 {
		out = appendSegment(out, 0xDD, []byte{byte(restart >> 8), byte(restart)})
	}
	sos := []byte{byte(nc)}
	for c := 0; c < nc; c++ {
		sos = append(sos, byte(c+1), byte(c<<4))
	}
	sos = append(sos, byte(pred), 0, 0)
	out = appendSegment(out, 0xDA, sos)
	bw := &bitWriter{out: out}
	rst := 0
	for y := 0; y < h; y++ {
		if restart > 0 && y > 0 && (y*w)%restart == 0 {
			bw.flush()
			bw.out = append(bw.out, 0xFF, byte(0xD0+rst%8))
			rst++
		}
		for x := 0; x < w; x++ {
			for c := 0; c < nc; c++ {
				d := diffs[y*stride+x*nc+c]
				s := category(d)
				bw.put(codes[c][s].code, codes[c][s].len)
				if s > 0 && s < 16 {
					v := d
					if v < 0 {
						v--
					}
					bw.put(uint32(v)&(1<<s-1), uint(s))
				}
			}
		}
	}
	bw.flush()
	return append(bw.out, 0xFF, 0xD9)
}

// category is SSSS, the number of bits of |d| (16 for -32768, H.1.2.2).
func category(d int32) int {
	if d < 0 {
		d = -d
	}
	s := 0
	for d > 0 {
		s++
		d >>= 1
	}
	return min(s, 16)
}

type hcode struct {
	code uint32
	len  uint
}

// huffmanFor returns BITS, HUFFVAL and the codes for the used categories:
// the used categories sorted by falling frequency get the lengths 2, 3, 3,
// 3, 4, 4, 4, 5, 5, 6, 6, ... (Kraft sum at most 0.94), assigned as
// canonical codes (T.81 annex C).
func huffmanFor(freq [17]int) ([16]byte, []byte, [17]hcode) {
	var used []int
	for s, n := range freq {
		if n > 0 {
			used = append(used, s)
		}
	}
	if len(used) == 0 {
		used = []int{0}
	}
	sort.SliceStable(used, func(a, b int) bool { return freq[used[a]] > freq[used[b]] })
	lengths := []int{2, 3, 3, 3, 4, 4, 4, 5, 5, 6, 6, 7, 7, 8, 8, 9, 10}
	var bits [16]byte
	byLen := make([][]int, 17)
	for i, s := range used {
		l := lengths[i]
		bits[l-1]++
		byLen[l] = append(byLen[l], s)
	}
	var vals []byte
	var codes [17]hcode
	code := uint32(0)
	for l := 1; l <= 16; l++ {
		for _, s := range byLen[l] {
			vals = append(vals, byte(s))
			codes[s] = hcode{code, uint(l)}
			code++
		}
		code <<= 1
	}
	return bits, vals, codes
}

func appendSegment(out []byte, marker byte, body []byte) []byte {
	n := len(body) + 2
	out = append(out, 0xFF, marker, byte(n>>8), byte(n))
	return append(out, body...)
}

// bitWriter writes bits most significant first with 0xFF bytes stuffed
// (T.81 F.1.2.3); flush pads with 1 bits to a byte boundary.
type bitWriter struct {
	out []byte
	acc uint64
	n   uint
}

func (b *bitWriter) put(v uint32, n uint) {
	b.acc = b.acc<<n | uint64(v)&(1<<n-1)
	b.n += n
	for b.n >= 8 {
		c := byte(b.acc >> (b.n - 8))
		b.out = append(b.out, c)
		if c == 0xFF {
			b.out = append(b.out, 0)
		}
		b.n -= 8
	}
}

func (b *bitWriter) flush() {
	if b.n > 0 {
		b.put(1<<(8-b.n)-1, 8-b.n)
	}
	b.acc, b.n = 0, 0
}
