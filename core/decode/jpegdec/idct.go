package jpegdec

// The inverse DCT of T.81 A.3.3,
//
//	s(y,x) = 1/4 sum_u sum_v C(u) C(v) S(v,u) cos((2x+1)u pi/16) cos((2y+1)v pi/16),
//
// computed as two passes of the 1-D 8-point transform factored as by
// Loeffler, Ligtenberg and Moschytz (ICASSP 1989): an even part with one
// rotation by 6 pi/16 and an odd part with the rotations of pi/16, 3 pi/16
// sharing common factors (12 multiplications per 1-D transform). The
// constants are the factors times 2^13 rounded to integers; the column pass
// keeps 2 extra fraction bits, the row pass also removes the 8 of the two
// 1/sqrt(8) scales, each pass rounding half up; the result is shifted by
// 128 (the level shift of A.3.1) and clamped to [0, 255]. This is the
// integer arithmetic of libjpeg-turbo's accurate ("islow") method, so the
// samples are the same bit for bit.

const (
	constBits = 13
	pass1Bits = 2
)

// The factors times 2^13, rounded (c_k = cos(k pi / 16); those marked
// "negated" enter the sums with a minus sign; TestIDCTConstants derives
// them).
const (
	fix0298631336 = 2446  // sqrt(2) (-c1 + c3 + c5 - c7)
	fix0390180644 = 3196  // sqrt(2) (c3 - c5), negated
	fix0541196100 = 4433  // sqrt(2) c6
	fix0765366865 = 6270  // sqrt(2) (c2 - c6)
	fix0899976223 = 7373  // sqrt(2) (c3 - c7), negated
	fix1175875602 = 9633  // sqrt(2) c3
	fix1501321110 = 12299 // sqrt(2) (c1 + c3 - c5 - c7)
	fix1847759065 = 15137 // sqrt(2) (c2 + c6), negated
	fix1961570560 = 16069 // sqrt(2) (c3 + c5), negated
	fix2053119869 = 16819 // sqrt(2) (c1 + c3 - c5 + c7)
	fix2562915447 = 20995 // sqrt(2) (c1 + c3), negated
	fix3072711026 = 25172 // sqrt(2) (c1 + c3 + c5 - c7)
)

// idct dequantises block b (natural order) with q and writes the 8 x 8
// samples to dst with the given stride.
func idct(b []int16, q *[64]int32, dst []uint8, stride int) {
	var ws [64]int32
	// Pass 1: columns, results scaled up by 2^pass1Bits.
	for x := 0; x < 8; x++ {
		if b[8+x] == 0 && b[16+x] == 0 && b[24+x] == 0 && b[32+x] == 0 &&
			b[40+x] == 0 && b[48+x] == 0 && b[56+x] == 0 {
			dc := int32(b[x]) * q[x] << pass1Bits
			for y := 0; y < 8; y++ {
				ws[8*y+x] = dc
			}
			continue
		}
		// even part
		z2 := int32(b[16+x]) * q[16+x]
		z3 := int32(b[48+x]) * q[48+x]
		z1 := (z2 + z3) * fix0541196100
		tmp2 := z1 - z3*fix1847759065
		tmp3 := z1 + z2*fix0765366865
		z2 = int32(b[x]) * q[x]
		z3 = int32(b[32+x]) * q[32+x]
		tmp0 := (z2 + z3) << constBits
		tmp1 := (z2 - z3) << constBits
		tmp10, tmp13 := tmp0+tmp3, tmp0-tmp3
		tmp11, tmp12 := tmp1+tmp2, tmp1-tmp2
		// odd part
		tmp0 = int32(b[56+x]) * q[56+x]
		tmp1 = int32(b[40+x]) * q[40+x]
		tmp2 = int32(b[24+x]) * q[24+x]
		tmp3 = int32(b[8+x]) * q[8+x]
		z1 = tmp0 + tmp3
		z2 = tmp1 + tmp2
		z3 = tmp0 + tmp2
		z4 := tmp1 + tmp3
		z5 := (z3 + z4) * fix1175875602
		tmp0 *= fix0298631336
		tmp1 *= fix2053119869
		tmp2 *= fix3072711026
		tmp3 *= fix1501321110
		z1 *= -fix0899976223
		z2 *= -fix2562915447
		z3 = z3*-fix1961570560 + z5
		z4 = z4*-fix0390180644 + z5
		tmp0 += z1 + z3
		tmp1 += z2 + z4
		tmp2 += z2 + z3
		tmp3 += z1 + z4
		const sh = constBits - pass1Bits
		const rnd = 1 << (sh - 1)
		ws[x] = (tmp10 + tmp3 + rnd) >> sh
		ws[56+x] = (tmp10 - tmp3 + rnd) >> sh
		ws[8+x] = (tmp11 + tmp2 + rnd) >> sh
		ws[48+x] = (tmp11 - tmp2 + rnd) >> sh
		ws[16+x] = (tmp12 + tmp1 + rnd) >> sh
		ws[40+x] = (tmp12 - tmp1 + rnd) >> sh
		ws[24+x] = (tmp13 + tmp0 + rnd) >> sh
		ws[32+x] = (tmp13 - tmp0 + rnd) >> sh
	}
	// Pass 2: rows, removing the pass-1 bits and the factor 8.
	for y := 0; y < 8; y++ {
		w := ws[8*y : 8*y+8 : 8*y+8]
		out := dst[y*stride : y*stride+8 : y*stride+8]
		if w[1] == 0 && w[2] == 0 && w[3] == 0 && w[4] == 0 && w[5] == 0 && w[6] == 0 && w[7] == 0 {
			v := clampSample((w[0] + 1<<(pass1Bits+2)) >> (pass1Bits + 3))
			for i := range out {
				out[i] = v
			}
			continue
		}
		z2, z3 := w[2], w[6]
		z1 := (z2 + z3) * fix0541196100
		tmp2 := z1 - z3*fix1847759065
		tmp3 := z1 + z2*fix0765366865
		tmp0 := (w[0] + w[4]) << constBits
		tmp1 := (w[0] - w[4]) << constBits
		tmp10, tmp13 := tmp0+tmp3, tmp0-tmp3
		tmp11, tmp12 := tmp1+tmp2, tmp1-tmp2
		tmp0, tmp1, tmp2, tmp3 = w[7], w[5], w[3], w[1]
		z1 = tmp0 + tmp3
		z2 = tmp1 + tmp2
		z3 = tmp0 + tmp2
		z4 := tmp1 + tmp3
		z5 := (z3 + z4) * fix1175875602
		tmp0 *= fix0298631336
		tmp1 *= fix2053119869
		tmp2 *= fix3072711026
		tmp3 *= fix1501321110
		z1 *= -fix0899976223
		z2 *= -fix2562915447
		z3 = z3*-fix1961570560 + z5
		z4 = z4*-fix0390180644 + z5
		tmp0 += z1 + z3
		tmp1 += z2 + z4
		tmp2 += z2 + z3
		tmp3 += z1 + z4
		const sh = constBits + pass1Bits + 3
		const rnd = 1 << (sh - 1)
		out[0] = clampSample((tmp10 + tmp3 + rnd) >> sh)
		out[7] = clampSample((tmp10 - tmp3 + rnd) >> sh)
		out[1] = clampSample((tmp11 + tmp2 + rnd) >> sh)
		out[6] = clampSample((tmp11 - tmp2 + rnd) >> sh)
		out[2] = clampSample((tmp12 + tmp1 + rnd) >> sh)
		out[5] = clampSample((tmp12 - tmp1 + rnd) >> sh)
		out[3] = clampSample((tmp13 + tmp0 + rnd) >> sh)
		out[4] = clampSample((tmp13 - tmp0 + rnd) >> sh)
	}
}

// clampSample adds the level shift of 128 and clamps to [0, 255].
func clampSample(v int32) uint8 {
	v += 128
	if uint32(v) > 255 {
		if v < 0 {
			return 0
		}
		return 255
	}
	return uint8(v)
}
