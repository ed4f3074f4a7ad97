package jpegdec

// Huffman decoding (ITU-T T.81 annex C for the tables, F.2.2.3 for the
// decoding procedure): codes of up to lookBits bits are found in one table
// look-up; longer ones by the canonical code ranges of F.2.2.3 (MAXCODE,
// VALPTR, MINCODE).

const lookBits = 9

type huffTable struct {
	ok bool
	// look[c] for the next lookBits bits c: code length << 8 | value, or 0
	// when the code is longer.
	look    [1 << lookBits]uint16
	maxcode [18]int32 // largest code of each length, -1 if none
	valptr  [17]int32 // index in vals of the first code of each length
	mincode [17]int32
	vals    [256]uint8
}

// build makes the table from the counts of codes of each length (BITS) and
// the values (HUFFVAL), generating the codes as in C.2 (figures C.1-C.3).
func (t *huffTable) build(counts [16]int, vals []byte) error {
	*t = huffTable{}
	copy(t.vals[:], vals)
	code, k := int32(0), 0
	for l := 1; l <= 16; l++ {
		n := counts[l-1]
		t.valptr[l] = int32(k)
		t.mincode[l] = code
		if n == 0 {
			t.maxcode[l] = -1
		} else {
			if int(code)+n > 1<<uint(l) {
				return FormatError("bad Huffman table")
			}
			for i := 0; i < n; i++ {
				if l <= lookBits {
					// every lookBits-bit pattern starting with this code
					shift := uint(lookBits - l)
					base := int(code) << shift
					for j := 0; j < 1<<shift; j++ {
						t.look[base+j] = uint16(l)<<8 | uint16(vals[k])
					}
				}
				code++
				k++
			}
			t.maxcode[l] = code - 1
		}
		code <<= 1
	}
	t.maxcode[17] = 1 << 30 // sentinel, never reached by a valid code
	t.ok = true
	return nil
}

// fill tops up the bit buffer to more than 56 bits. Stuffed zero bytes
// after 0xFF are dropped (F.1.2.3); at a marker or the end of the data it
// feeds zero bytes and counts them, so damaged data ends in an error, not a
// hang.
func (d *decoder) fill() {
	for d.nbits <= 56 {
		var b byte
		if d.fake == 0 && d.pos < len(d.data) {
			b = d.data[d.pos]
			if b == 0xff {
				if d.pos+1 < len(d.data) && d.data[d.pos+1] == 0 {
					d.pos += 2
				} else {
					b = 0
					d.fake++
				}
			} else {
				d.pos++
			}
		} else {
			d.fake++
		}
		d.bits |= uint64(b) << uint(56-d.nbits)
		d.nbits += 8
	}
}

// decodeHuff reads one Huffman-coded value.
func (d *decoder) decodeHuff(t *huffTable) (uint8, error) {
	if d.nbits < 16 {
		d.fill()
	}
	if v := t.look[d.bits>>(64-lookBits)]; v != 0 {
		n := int(v >> 8)
		d.bits <<= uint(n)
		d.nbits -= n
		return uint8(v), nil
	}
	for l := lookBits + 1; l <= 16; l++ {
		c := int32(d.bits >> uint(64-l))
		if c <= t.maxcode[l] {
			d.bits <<= uint(l)
			d.nbits -= l
			return t.vals[(t.valptr[l]+c-t.mincode[l])&255], nil
		}
	}
	return 0, FormatError("bad Huffman code")
}

// receive reads s bits (s <= 16) as an unsigned number.
func (d *decoder) receive(s int) int32 {
	if s == 0 {
		return 0
	}
	if d.nbits < s {
		d.fill()
	}
	v := int32(d.bits >> uint(64-s))
	d.bits <<= uint(s)
	d.nbits -= s
	return v
}

// extend turns s received bits into a signed value (F.2.2.1, figure F.12).
func extend(v int32, s int) int32 {
	if s > 0 && v < 1<<uint(s-1) {
		return v - 1<<uint(s) + 1
	}
	return v
}

func (d *decoder) bit() bool { return d.receive(1) != 0 }

// blockBaseline decodes one block of a sequential scan (F.2.2.1, F.2.2.2)
// into b (natural order, not dequantised).
func (d *decoder) blockBaseline(c *component, b []int16) error {
	s, err := d.decodeHuff(&d.dc[c.td])
	if err != nil {
		return err
	}
	if s > 16 {
		return FormatError("bad DC difference")
	}
	c.pred += extend(d.receive(int(s)), int(s))
	b[0] = int16(c.pred)
	ac := &d.ac[c.ta]
	for k := 1; k < 64; k++ {
		rs, err := d.decodeHuff(ac)
		if err != nil {
			return err
		}
		r, s := int(rs>>4), int(rs&15)
		if s == 0 {
			if r != 15 {
				break
			}
			k += 15
			continue
		}
		k += r
		if k > 63 {
			return FormatError("coefficient run past the block")
		}
		b[zigzag[k]] = int16(extend(d.receive(s), s))
	}
	return nil
}

// dcFirst decodes the first scan of DC coefficients (G.1.2.1).
func (d *decoder) dcFirst(c *component, b []int16, al int) error {
	s, err := d.decodeHuff(&d.dc[c.td])
	if err != nil {
		return err
	}
	if s > 16 {
		return FormatError("bad DC difference")
	}
	c.pred += extend(d.receive(int(s)), int(s))
	b[0] = int16(c.pred << uint(al))
	return nil
}

// dcRefine adds one more bit of the DC coefficient (G.1.2.1).
func (d *decoder) dcRefine(b []int16, al int) error {
	if d.bit() {
		b[0] |= 1 << uint(al)
	}
	return nil
}

// acFirst decodes the first scan of a band of AC coefficients, with end of
// band runs (G.1.2.2).
func (d *decoder) acFirst(c *component, b []int16, ss, se, al int) error {
	if d.eobrun > 0 {
		d.eobrun--
		return nil
	}
	ac := &d.ac[c.ta]
	for k := ss; k <= se; k++ {
		rs, err := d.decodeHuff(ac)
		if err != nil {
			return err
		}
		r, s := int(rs>>4), int(rs&15)
		if s == 0 {
			if r < 15 {
				d.eobrun = 1<<uint(r) - 1
				if r > 0 {
					d.eobrun += int(d.receive(r))
				}
				break
			}
			k += 15
			continue
		}
		k += r
		if k > 63 {
			return FormatError("coefficient run past the block")
		}
		b[zigzag[k]] = int16(extend(d.receive(s), s) << uint(al))
	}
	return nil
}

// acRefine adds one more bit to a band of AC coefficients (G.1.2.3):
// correction bits for coefficients already non-zero, new coefficients of
// magnitude 1 << al placed after runs of zero ones.
func (d *decoder) acRefine(c *component, b []int16, ss, se, al int) error {
	p1, m1 := int16(1)<<uint(al), int16(-1)<<uint(al)
	k := ss
	if d.eobrun == 0 {
		ac := &d.ac[c.ta]
		for ; k <= se; k++ {
			rs, err := d.decodeHuff(ac)
			if err != nil {
				return err
			}
			r, s := int(rs>>4), int(rs&15)
			var v int16
			if s != 0 {
				if s != 1 {
					return FormatError("bad refinement")
				}
				v = m1
				if d.bit() {
					v = p1
				}
			} else if r != 15 {
				d.eobrun = 1 << uint(r)
				if r > 0 {
					d.eobrun += int(d.receive(r))
				}
				break
			}
			for k <= se {
				z := zigzag[k]
				if b[z] != 0 {
					if d.bit() && b[z]&p1 == 0 {
						if b[z] >= 0 {
							b[z] += p1
						} else {
							b[z] += m1
						}
					}
				} else {
					if r == 0 {
						break
					}
					r--
				}
				k++
			}
			if v != 0 {
				if k > 63 {
					return FormatError("coefficient run past the block")
				}
				b[zigzag[k]] = v
			}
		}
	}
	if d.eobrun > 0 {
		for ; k <= se; k++ {
			z := zigzag[k]
			if b[z] != 0 && d.bit() && b[z]&p1 == 0 {
				if b[z] >= 0 {
					b[z] += p1
				} else {
					b[z] += m1
				}
			}
		}
		d.eobrun--
	}
	return nil
}
