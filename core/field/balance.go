package field

import (
	"fmt"
	"math"
	"strings"
)

// OuterFraction sets where the balance check looks: at image heights of at
// least OuterFraction times the corner height, where decentring and tilt
// show (near the centre every part of the frame is about equally sharp).
const OuterFraction = 0.4

// MinSidePoints is the fewest measurements a part of the frame needs at one
// frequency for the balance check to compare it.
const MinSidePoints = 4

// Verdicts of the balance check.
const (
	VerdictBalanced   = "balanced"
	VerdictUnbalanced = "unbalanced"
	VerdictTooFew     = "not enough measurements"
)

// Balance compares opposite parts of the frame at matched image height:
// left and right halves, top and bottom halves, and the two pairs of
// diagonally opposite quarters.
//
// Matching heights: each measurement's residual from the whole frame's
// field curve of its own orientation (at each frequency) says how much
// sharper (positive) or softer it is than the frame's average at its
// height. The difference between two parts is the difference of their mean
// residuals over the outer field (heights >= FromHeightMM). Pooling the
// sagittal and tangential residuals amounts to comparing the average of the
// two orientations; a decentred or tilted lens softens both on one side.
// Its standard error comes from the scatter of the residuals in each part
// (Welch: SE = sqrt(s_A^2/n_A + s_B^2/n_B)), so it includes the spread
// between repeated edges at one height. Measurements the field curve
// treated as outliers (robustness weight 0) are left out.
//
// A difference is reported only when it exceeds both NotableSE standard
// errors and NotableGap; otherwise the parts are called balanced.
// Measurements near the dividing line dilute a difference but do not bias
// its sign.
type Balance struct {
	// Verdict is "balanced", "unbalanced" or "not enough measurements".
	Verdict string
	// Text says it in words first and numbers second.
	Text string
	// Caution is the set-up caution that belongs with this verdict.
	Caution string
	// FromHeightMM is where the compared outer field begins, mm.
	FromHeightMM float64
	// Pairs are the four comparisons.
	Pairs []BalancePair
	// Quarters gives each quarter of the frame's offset from the whole
	// frame's curves, for a picture of where the softness lies.
	Quarters []PartOffset

	score float64 // of the pair quoted in a balanced Text
}

// BalancePair compares two opposite parts of the frame.
type BalancePair struct {
	// A and B name the parts ("left", "right", "top", "bottom",
	// "top-left", ...). Differences are A minus B.
	A string
	B string
	// ByFreq holds the comparison at each field frequency, sagittal and
	// tangential residuals pooled.
	ByFreq []PairDiff
	// BySagittal and ByTangential hold it for each orientation alone: a
	// decentred lens can soften one orientation on a side and sharpen the
	// other, which the pooled comparison averages away.
	BySagittal   []PairDiff
	ByTangential []PairDiff
	// Verdict and Text as for Balance.
	Verdict string
	Text    string
}

// PairDiff is the difference between two parts at one frequency.
type PairDiff struct {
	FreqLPMM float64
	// Diff is A's mean residual minus B's (positive: A sharper), MTF.
	Diff Number
	// SE is the standard error of Diff.
	SE Number
	// NA and NB are the measurements behind each side.
	NA int
	NB int
	// Notable is true when |Diff| exceeds NotableSE * SE and NotableGap.
	Notable bool
}

// PartOffset is one part's mean residual from the frame's curves.
type PartOffset struct {
	Part   string
	ByFreq []MeanOffset
}

// MeanOffset is a mean residual with its standard error and count.
type MeanOffset struct {
	FreqLPMM float64
	Offset   Number
	SE       Number
	N        int
}

// balanceCaution goes with every balance verdict.
const balanceCaution = "A chart that is not parallel to the sensor, or focus set on one side, softens one side of the frame just as a decentred lens does. Turn the camera by 180 degrees and shoot again: a lens fault turns with the camera, a set-up fault stays put."

// part is a named region of the frame relative to the optical centre.
type part struct {
	name string
	in   func(dx, dy float64) bool
}

var (
	left        = part{"left", func(dx, dy float64) bool { return dx < 0 }}
	right       = part{"right", func(dx, dy float64) bool { return dx > 0 }}
	top         = part{"top", func(dx, dy float64) bool { return dy < 0 }}
	bottom      = part{"bottom", func(dx, dy float64) bool { return dy > 0 }}
	topLeft     = part{"top-left", func(dx, dy float64) bool { return dx < 0 && dy < 0 }}
	topRight    = part{"top-right", func(dx, dy float64) bool { return dx > 0 && dy < 0 }}
	bottomLeft  = part{"bottom-left", func(dx, dy float64) bool { return dx < 0 && dy > 0 }}
	bottomRight = part{"bottom-right", func(dx, dy float64) bool { return dx > 0 && dy > 0 }}
)

// residual is one outer-field measurement's residual at one frequency.
type residual struct{ dx, dy, e float64 }

// balance runs the balance check.
func balance(geo Geometry, pts []Point, fs *fitSet, freqs []float64) Balance {
	b := Balance{FromHeightMM: OuterFraction * geo.CornerMM(), Caution: balanceCaution, Pairs: []BalancePair{}, Quarters: []PartOffset{}}
	res := make([][]residual, len(freqs))
	var byOr [2][][]residual // the same, per orientation
	for o := range orientations {
		byOr[o] = make([][]residual, len(freqs))
	}
	for k := range freqs {
		for o := range orientations {
			f := fs.mtf[o][k]
			if f == nil {
				continue
			}
			for i, p := range pts {
				j := fs.pos[o][k][i]
				if j < 0 || p.HeightMM < b.FromHeightMM || f.sm.rw[j] == 0 {
					continue
				}
				r := residual{p.X - geo.CentreX, p.Y - geo.CentreY, f.sm.y[j] - f.sm.fit[j]}
				res[k] = append(res[k], r)
				byOr[o][k] = append(byOr[o][k], r)
			}
		}
	}
	compare := func(rs [][]residual, a, bb part) []PairDiff {
		out := []PairDiff{}
		for k, f := range freqs {
			ma, sa, na := meanSE(rs[k], a)
			mb, sb, nb := meanSE(rs[k], bb)
			d := PairDiff{FreqLPMM: f, NA: na, NB: nb, Diff: Number(math.NaN()), SE: Number(math.NaN())}
			if na >= MinSidePoints && nb >= MinSidePoints {
				diff, se := ma-mb, math.Hypot(sa, sb)
				d.Diff, d.SE = Number(diff), Number(se)
				d.Notable = math.Abs(diff) > NotableSE*se && math.Abs(diff) >= NotableGap
			}
			out = append(out, d)
		}
		return out
	}
	for _, pr := range [][2]part{{left, right}, {top, bottom}, {topLeft, bottomRight}, {topRight, bottomLeft}} {
		bp := BalancePair{A: pr[0].name, B: pr[1].name, ByFreq: compare(res, pr[0], pr[1]),
			BySagittal: compare(byOr[0], pr[0], pr[1]), ByTangential: compare(byOr[1], pr[0], pr[1])}
		bp.Verdict, bp.Text = pairText(bp)
		b.Pairs = append(b.Pairs, bp)
	}
	for _, q := range []part{topLeft, topRight, bottomLeft, bottomRight} {
		po := PartOffset{Part: q.name, ByFreq: []MeanOffset{}}
		for k, f := range freqs {
			m, se, n := meanSE(res[k], q)
			if n < 2 {
				m, se = math.NaN(), math.NaN()
			}
			po.ByFreq = append(po.ByFreq, MeanOffset{FreqLPMM: f, Offset: Number(m), SE: Number(se), N: n})
		}
		b.Quarters = append(b.Quarters, po)
	}

	// The card leads with the most telling comparison; others that agree
	// follow in a few words.
	var worst *BalancePair
	var also []string
	anyOK := false
	for i := range b.Pairs {
		p := &b.Pairs[i]
		switch p.Verdict {
		case VerdictUnbalanced:
			if worst == nil || leadScore(*p) > leadScore(*worst) {
				worst = p
			}
		case VerdictBalanced:
			anyOK = true
			if worst == nil && (b.Text == "" || pairScore(*p) > b.score) {
				b.Text, b.score = p.Text, pairScore(*p)
			}
		}
	}
	switch {
	case worst != nil:
		b.Verdict = VerdictUnbalanced
		b.Text = worst.Text
		for _, p := range b.Pairs {
			if p.Verdict == VerdictUnbalanced && p.A != worst.A {
				ds, orient, i := mostTelling(p)
				d := ds[i]
				soft := p.A
				if d.Diff > 0 {
					soft = p.B
				}
				if orient != "" {
					orient = " (" + orient + ")"
				}
				also = append(also, fmt.Sprintf("%s %s%s by %.2f at %s lp/mm", soft, area(p.A), orient, math.Abs(float64(d.Diff)), fmtNum(d.FreqLPMM)))
			}
		}
		if len(also) > 0 {
			b.Text += " Also softer: " + strings.Join(also, "; ") + "."
		}
	case anyOK:
		b.Verdict = VerdictBalanced
		b.Text = "Opposite sides of the frame are equally sharp at matched distances from the optical centre. " + b.Text
	default:
		b.Verdict = VerdictTooFew
		b.Text = fmt.Sprintf("Not enough measurements beyond %.1f mm from the optical centre to compare opposite sides of the frame (at least %d per side are needed).", b.FromHeightMM, MinSidePoints)
	}
	return b
}

// meanSE returns the mean of the residuals in part p, its standard error
// (sample standard deviation / sqrt(n)) and their number.
func meanSE(rs []residual, p part) (mean, se float64, n int) {
	var sum, sum2 float64
	for _, r := range rs {
		if p.in(r.dx, r.dy) {
			n++
			sum += r.e
		}
	}
	if n == 0 {
		return math.NaN(), math.NaN(), 0
	}
	mean = sum / float64(n)
	for _, r := range rs {
		if p.in(r.dx, r.dy) {
			sum2 += (r.e - mean) * (r.e - mean)
		}
	}
	if n < 2 {
		return mean, math.NaN(), n
	}
	return mean, math.Sqrt(sum2 / float64(n-1) / float64(n)), n
}

// pairScore is how telling a comparison is: its largest difference over
// the threshold for reporting it (1 = just notable).
func pairScore(bp BalancePair) float64 {
	ds, _, i := mostTelling(bp)
	if i < 0 {
		return -1
	}
	d := ds[i]
	return math.Abs(float64(d.Diff)) / math.Max(NotableSE*float64(d.SE), NotableGap)
}

// leadScore ranks unbalanced comparisons for the lead sentence: halves
// first, because a tilt towards one side shows in both diagonal pairs of
// quarters as well; a pair of quarters leads only when its score is over
// 1.4 times (about sqrt 2, the ratio for a purely diagonal tilt) that of
// the halves.
func leadScore(bp BalancePair) float64 {
	if area(bp.A) == "quarter" {
		return pairScore(bp) / 1.4
	}
	return pairScore(bp)
}

// other names the other orientation.
func other(orient string) string {
	if orient == "sagittal" {
		return "tangential"
	}
	return "sagittal"
}

// bestFreqOf returns the index of the frequency whose difference is
// largest relative to its threshold, or -1 if none could be compared.
func bestFreqOf(ds []PairDiff) int {
	best, score := -1, -1.0
	for i, d := range ds {
		if !finite(float64(d.Diff)) {
			continue
		}
		s := math.Abs(float64(d.Diff)) / math.Max(NotableSE*float64(d.SE), NotableGap)
		if s > score {
			best, score = i, s
		}
	}
	return best
}

// area names the kind of part: "half" or "quarter".
func area(name string) string {
	if strings.Contains(name, "-") {
		return "quarter"
	}
	return "half"
}

// mostTelling returns the comparison that speaks for a pair, with the
// orientation's name ("" for pooled) and the index of its most telling
// frequency (-1 if none could be compared): the pooled one when it is
// notable or no orientation alone is, else the orientation whose
// difference is largest relative to its threshold.
func mostTelling(bp BalancePair) (ds []PairDiff, name string, best int) {
	if i := bestFreqOf(bp.ByFreq); i >= 0 && bp.ByFreq[i].Notable {
		return bp.ByFreq, "", i
	}
	best = -1
	bestScore := -1.0
	for _, c := range []struct {
		name string
		ds   []PairDiff
	}{{"", bp.ByFreq}, {"sagittal", bp.BySagittal}, {"tangential", bp.ByTangential}} {
		i := bestFreqOf(c.ds)
		if i < 0 {
			continue
		}
		d := c.ds[i]
		s := math.Abs(float64(d.Diff)) / math.Max(NotableSE*float64(d.SE), NotableGap)
		if d.Notable {
			s += 1e6 // notable first
		}
		if c.name != "" && !d.Notable {
			continue // the pooled comparison speaks for a balanced pair
		}
		if s > bestScore {
			ds, name, best, bestScore = c.ds, c.name, i, s
		}
	}
	return ds, name, best
}

// pairText words one comparison: the verdict, then the numbers of the most
// telling frequency (and orientation, when one alone differs).
func pairText(bp BalancePair) (verdict, text string) {
	ds, orient, best := mostTelling(bp)
	if best < 0 {
		return VerdictTooFew, fmt.Sprintf("Too few measurements to compare %s and %s.", bp.A, bp.B)
	}
	d := ds[best]
	diff, se := float64(d.Diff), float64(d.SE)
	nums := fmt.Sprintf("%.3f +/- %.3f, one standard error; %d measurements %s, %d %s",
		math.Abs(diff), se, d.NA, bp.A, d.NB, bp.B)
	if d.Notable {
		soft, sharp := bp.A, bp.B
		if diff > 0 {
			soft, sharp = bp.B, bp.A
		}
		if orient != "" {
			return VerdictUnbalanced, fmt.Sprintf("%s %s softer in %s detail than the %s towards the edge of the frame, by %.2f at %s lp/mm, more than the spread between edges explains (%s); a decentred lens can trade %s for %s detail on one side.",
				capitalise(soft), area(bp.A), orient, sharp, math.Abs(diff), fmtNum(d.FreqLPMM), nums, orient, other(orient))
		}
		return VerdictUnbalanced, fmt.Sprintf("%s %s softer than the %s towards the edge of the frame, by %.2f at %s lp/mm, more than the spread between edges explains (%s).",
			capitalise(soft), area(bp.A), sharp, math.Abs(diff), fmtNum(d.FreqLPMM), nums)
	}
	why := "within the spread between edges"
	if math.Abs(diff) > NotableSE*se {
		why = fmt.Sprintf("below %.2f, too small to matter", NotableGap)
	}
	return VerdictBalanced, fmt.Sprintf("%s and %s %ss match: the largest difference, %.2f at %s lp/mm, is %s (%s).",
		capitalise(bp.A), bp.B, area(bp.A), math.Abs(diff), fmtNum(d.FreqLPMM), why, nums)
}

func capitalise(s string) string {
	if s == "" {
		return s
	}
	return strings.ToUpper(s[:1]) + s[1:]
}
