package raw

import (
	"math/rand/v2"
	"testing"

	"sagitta/core/sim/simcam"
)

// handStream builds a lossless JPEG stream by hand for a w x h image of one
// component, precision 8, predictor pred, coding the given differences.
// Its Huffman table gives every category 0..16 a 5-bit code equal to the
// category (BITS: seventeen codes of length 5; T.81 annex C canonical
// codes are then 0, 1, ..., 16), so the bits can be checked by eye.
func handStream(w, h, pred int, diffs []int) []byte {
	b := []byte{0xFF, 0xD8}
	dht := []byte{0xFF, 0xC4, 0, 2 + 17 + 17, 0x00}
	bits := make([]byte, 16)
	bits[4] = 17
	dht = append(dht, bits...)
	for s := 0; s <= 16; s++ {
		dht = append(dht, byte(s))
	}
	b = append(b, dht...)
	b = append(b, 0xFF, 0xC3, 0, 11, 8, byte(h>>8), byte(h), byte(w>>8), byte(w), 1, 1, 0x11, 0)
	b = append(b, 0xFF, 0xDA, 0, 8, 1, 1, 0x00, byte(pred), 0, 0)
	var acc uint64
	var n uint
	put := func(v uint64, k uint) {
		acc = acc<<k | v&(1<<k-1)
		n += k
		for n >= 8 {
			c := byte(acc >> (n - 8))
			b = append(b, c)
			if c == 0xFF {
				b = append(b, 0)
			}
			n -= 8
		}
	}
	for _, d := range diffs {
		s := 0
		for a := d; a != 0; a /= 2 {
			s++
		}
		if d < 0 {
			s = 0
			for a := -d; a != 0; a /= 2 {
				s++
			}
		}
		put(uint64(s), 5)
		if s > 0 {
			v := d
			if v < 0 {
				v-- // T.81 F.1.2.1: negative differences as d - 1 in s bits
			}
			put(uint64(v), uint(s))
		}
	}
	if n > 0 {
		put(1<<(8-n)-1, 8-n)
	}
	return append(b, 0xFF, 0xD9)
}

// TestLosslessPredictors decodes hand-built streams and checks every
// pixel against the predictors of ITU-T T.81 (1992), table H.1, applied
// here directly: Ra left, Rb above, Rc above-left; 1: Ra, 2: Rb, 3: Rc,
// 4: Ra + Rb - Rc, 5: Ra + ((Rb - Rc) >> 1), 6: Rb + ((Ra - Rc) >> 1),
// 7: (Ra + Rb) >> 1; the first line predicts from Ra, the first sample
// from 2^(P-1) (H.1.1), the first column of later lines from Rb.
func TestLosslessPredictors(t *testing.T) {
	const w, h = 4, 3
	diffs := []int{5, -3, 7, 0, 12, -1, 2, -6, 1, 3, -2, 9}
	for pred := 1; pred <= 7; pred++ {
		want := make([]int, w*h)
		for y := 0; y < h; y++ {
			for x := 0; x < w; x++ {
				var p int
				switch {
				case x == 0 && y == 0:
					p = 128 // 2^(8-1)
				case y == 0:
					p = want[x-1]
				case x == 0:
					p = want[(y-1)*w]
				default:
					ra, rb, rc := want[y*w+x-1], want[(y-1)*w+x], want[(y-1)*w+x-1]
					p = [...]int{0, ra, rb, rc, ra + rb - rc, ra + (rb-rc)>>1, rb + (ra-rc)>>1, (ra + rb) >> 1}[pred]
				}
				want[y*w+x] = (p + diffs[y*w+x]) & 0xFFFF
			}
		}
		fr, err := decodeLJ(handStream(w, h, pred, diffs), 1<<20)
		if err != nil {
			t.Fatalf("predictor %d: %v", pred, err)
		}
		for i, v := range fr.Pix {
			if int(v) != want[i] {
				t.Errorf("predictor %d: pixel %d = %d, want %d", pred, i, v, want[i])
			}
		}
	}
	// A worked case by hand, predictor 4 at pixel (1,1): the first row is
	// 133, 130, 137, 137; the second starts at 133 + 12 = 145; then
	// Ra + Rb - Rc = 145 + 130 - 133 = 142, and the difference -1 gives 141.
	fr, _ := decodeLJ(handStream(w, h, 4, diffs), 1<<20)
	if fr.Pix[5] != 141 {
		t.Errorf("worked case: %d, want 141", fr.Pix[5])
	}
}

// TestLosslessRoundTrip encodes random images with the simulated camera's
// encoder and decodes them: every predictor, one to four components,
// restart intervals, full 16-bit range (differences of 32768 take
// category 16 with no extra bits, T.81 H.1.2.2).
func TestLosslessRoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for pred := 1; pred <= 7; pred++ {
		for nc := 1; nc <= 4; nc++ {
			for _, prec := range []int{8, 12, 16} {
				w, h := 1+rng.IntN(9), 1+rng.IntN(7)
				pix := make([]uint16, w*h*nc)
				for i := range pix {
					pix[i] = uint16(rng.IntN(1 << prec))
				}
				restart := 0
				if h > 2 && pred%2 == 0 {
					restart = w * 2
				}
				fr, err := decodeLJ(simcam.LosslessJPEG(pix, w, h, nc, prec, pred, restart), 1<<20)
				if err != nil {
					t.Fatalf("pred %d nc %d prec %d: %v", pred, nc, prec, err)
				}
				if fr.W != w || fr.H != h || fr.NC != nc {
					t.Fatalf("size %dx%dx%d, want %dx%dx%d", fr.W, fr.H, fr.NC, w, h, nc)
				}
				for i := range pix {
					if fr.Pix[i] != pix[i] {
						t.Fatalf("pred %d nc %d prec %d restart %d: sample %d = %d, want %d", pred, nc, prec, restart, i, fr.Pix[i], pix[i])
					}
				}
			}
		}
	}
	// Extremes: 0 next to 65535 gives differences of +-32768 mod 2^16.
	pix := []uint16{0, 65535, 0, 65535, 32768, 0, 65535, 1}
	fr, err := decodeLJ(simcam.LosslessJPEG(pix, 4, 2, 1, 16, 1, 0), 100)
	if err != nil {
		t.Fatal(err)
	}
	for i := range pix {
		if fr.Pix[i] != pix[i] {
			t.Fatalf("extremes: %v, want %v", fr.Pix, pix)
		}
	}
}
