package chart

import "math/bits"

// A mark is Sagitta's own recognition target, drawn in chart units around
// its centre, with R its outer radius:
//
//   - a dark disc of radius DiscOfR * R, whose centre the analyser finds to a
//     fraction of a pixel;
//   - a light gap out to RingInOfR * R, which isolates the disc;
//   - a ring from RingInOfR * R to RingOutOfR * R cut into 16 equal sectors,
//     sector k spanning angles [22.5 k, 22.5 (k+1)) degrees from +x towards
//     +y, dark where bit k of the mark's Word is 1;
//   - light paper out to QuietOfR * R, where nothing else is printed.
//
// Under the near-affine view of a small mark, the disc becomes an ellipse
// and the ring a concentric, similar ellipse, so the ring can be read
// along the disc's own ellipse scaled by the radius ratio, whatever the
// chart's rotation and tilt.
const (
	DiscOfR    = 0.30
	RingInOfR  = 0.48
	RingOutOfR = 0.92
	QuietOfR   = 1.25
	// Sectors is the number of code sectors around a mark.
	Sectors = 16
)

// marksPerChart is the number of marks on a chart; a mark's word encodes
// value = code*marksPerChart + index.
const marksPerChart = 8

// codebook holds the 64 ring words (8 chart codes x 8 marks). It was made by
// the greedy "lexicode" construction (V. I. Levenshtein 1960; J. H. Conway
// and N. J. A. Sloane, "Lexicographic codes", IEEE Trans. Inf. Theory 32(3),
// 1986), adapted to rings: scan the 16-bit words in increasing order and
// keep a word when
//
//   - it has 6 to 10 dark sectors (a balanced ring),
//   - it differs in at least 4 sectors from each of its own rotations, so
//     its start is unambiguous, and
//   - every rotation of it differs in at least 4 sectors from every word
//     already kept,
//
// stopping after 64 words. Any two readings at distance 4 or more let the
// reader correct one wrong sector and detect two or three. The test
// TestCodebook rebuilds the table by this rule.
var codebook = [64]uint16{
	0x005f, 0x00e7, 0x0137, 0x016b, 0x01d3, 0x023b, 0x0275, 0x028f,
	0x032d, 0x03c5, 0x043d, 0x0497, 0x0559, 0x05a3, 0x05ff, 0x0627,
	0x0669, 0x06c3, 0x0757, 0x07b5, 0x08d9, 0x094d, 0x098b, 0x0a63,
	0x0aa5, 0x0b1f, 0x0b91, 0x0c8d, 0x0d25, 0x0d73, 0x0de9, 0x0e5d,
	0x0ef7, 0x0fbb, 0x0fcf, 0x119f, 0x1247, 0x12b7, 0x12c9, 0x135b,
	0x13ef, 0x1463, 0x14db, 0x14ed, 0x15d5, 0x16ab, 0x171d, 0x17f3,
	0x1967, 0x1a7f, 0x1bbd, 0x1f6d, 0x1fa7, 0x1fd9, 0x26fd, 0x272b,
	0x29ef, 0x2abf, 0x2ad3, 0x2ddd, 0x2e6f, 0x2f5b, 0x35af, 0x3677,
}

// rotWord rotates a ring word by k sectors: bit i of the result is bit
// (i + k) mod 16 of w, which is what a reader starting k sectors later
// sees.
func rotWord(w uint16, k int) uint16 {
	k = ((k % Sectors) + Sectors) % Sectors
	return w>>k | w<<(Sectors-k)
}

// decodeWord finds the codebook word nearest to a reading r of the ring,
// over all 16 starting sectors. It returns the value (code*8 + mark index),
// the start shift k (the mark's sector 0 was read as sector (16 - k) mod
// 16, i.e. r = rotWord(word, k)), and the number of sectors that disagree;
// ok is false when the nearest word is more than one sector away or not
// unique.
func decodeWord(r uint16) (value, shift, dist int, ok bool) {
	best, second := Sectors+1, Sectors+1
	for v, w := range codebook {
		for k := range Sectors {
			d := bits.OnesCount16(r ^ rotWord(w, k))
			if d < best {
				second = best
				best, value, shift = d, v, k
			} else if d < second {
				second = d
			}
		}
	}
	return value, shift, best, best <= 1 && second > best
}

// DarkRuns returns the angular runs of dark sectors of the mark's ring as
// [start, end) pairs in degrees, start < end, each run merged across sector
// boundaries (and across 0 degrees), so a drawing has no seams between
// neighbouring dark sectors.
func (m Mark) DarkRuns() [][2]float64 {
	const step = 360.0 / Sectors
	if m.Word == 1<<Sectors-1 {
		return [][2]float64{{0, 360}}
	}
	dark := func(k int) bool { return m.Word>>(((k%Sectors)+Sectors)%Sectors)&1 == 1 }
	// Start after a light sector so no run wraps.
	s := 0
	for dark(s - 1) {
		s++
	}
	var runs [][2]float64
	for k := s; k < s+Sectors; {
		if !dark(k) {
			k++
			continue
		}
		e := k
		for e < s+Sectors && dark(e) {
			e++
		}
		runs = append(runs, [2]float64{float64(k) * step, float64(e) * step})
		k = e
	}
	return runs
}
