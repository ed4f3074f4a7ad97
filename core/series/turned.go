package series

import (
	"fmt"
	"math"
	"strings"

	"sagitta/core/analyze"
	"sagitta/core/field"
)

// Turned is the answer of a turned pair: two photos of one set-up, the
// second with the camera turned about the lens axis. The camera carries the
// lens, so a fault of the lens stays at the same place in the frame, while
// everything of the set-up (a chart not parallel to the sensor, focus set on
// one side, uneven light) turns the other way in the frame. Each photo's
// left-right and top-bottom differences (field.Balance, at each field
// frequency) are split into the part that stays with the lens and the part
// that turns with the set-up.
//
// The differences, each divided by how far apart its two sides'
// measurements lie (mm), form a gradient g = (left - right, top - bottom)
// per mm at each frequency. With the set-up turned by T in the frame (T =
// rotation of the second photo's view of the chart relative to the
// first's, image axes, x right and y down), g1 = L + S and
// g2 = L + R(T) S, so S = (R(T) - I)^-1 (g2 - g1) and L = g1 - S; for
// T = 180 degrees, L = (g1 + g2) / 2 and S = (g1 - g2) / 2. L and S are
// reported as differences over the first photo's sides. Standard errors
// are propagated from the two photos' (independent) standard errors.
type Turned struct {
	// Files are the first and second photo.
	Files [2]string `json:"files"`
	// TurnDeg is the turn of the set-up in the frame, degrees; TurnSource
	// says where it came from ("user" or "chart").
	TurnDeg    float64 `json:"turn_deg"`
	TurnSource string  `json:"turn_source"`
	// FreqsLPMM are the field frequencies of ByFreq.
	FreqsLPMM []float64 `json:"freqs_lp_mm"`
	// ByFreq holds the split at each field frequency.
	ByFreq []TurnedSplit `json:"by_freq"`
	// Verdict is "lens", "set-up", "both", "neither" or "not enough
	// measurements"; Text says it in words.
	Verdict string `json:"verdict"`
	Text    string `json:"text"`
	Caution string `json:"caution"`
}

// TurnedSplit is the split at one field frequency. Each Part is a difference
// (positive: the first-named side sharper) in MTF, in frame directions of
// the first photo.
type TurnedSplit struct {
	FreqLPMM float64 `json:"freq_lp_mm"`
	// Lens is the part that stays with the lens; SetUp the part that turns
	// with the set-up.
	LensLeftRight  Part `json:"lens_left_right"`
	LensTopBottom  Part `json:"lens_top_bottom"`
	SetUpLeftRight Part `json:"setup_left_right"`
	SetUpTopBottom Part `json:"setup_top_bottom"`
}

// Part is a difference with its standard error; Notable as in field.Balance
// (beyond field.NotableSE standard errors and field.NotableGap).
type Part struct {
	Diff    Number `json:"diff"`
	SE      Number `json:"se"`
	Notable bool   `json:"notable"`
}

// Verdicts of a turned pair.
const (
	TurnedLens    = "lens"
	TurnedSetUp   = "set-up"
	TurnedBoth    = "both"
	TurnedNeither = "neither"
	TurnedTooFew  = "not enough measurements"
)

// MaxTurnMismatchDeg is how far the chart's recognised turn may be from the
// turn the user gave before the pair is refused.
const MaxTurnMismatchDeg = 20

const turnedCaution = "The split assumes that only the camera turned between the two photos: the chart, its light and the tripod stayed put, and focus was set the same way both times. A lens fault confirmed this way is a reason to contact the maker's service, which decides on repairs and warranty."

// TurnedPair splits the two photos' differences between sides into lens and
// set-up parts. turnDeg is the camera's turn between them as the user says
// it (90, 180 or 270, the set-up's turn in the frame; 0 = read it from the
// chart, which both photos must then show). It refuses photos that cannot
// be a turned pair: other lens, focal length, f-number, frame size or pixel
// pitch, or a chart turned otherwise than stated.
func TurnedPair(a, b *analyze.Image, turnDeg float64) (*Turned, error) {
	sa, err := summaryOf(a)
	if err != nil {
		return nil, err
	}
	sb, err := summaryOf(b)
	if err != nil {
		return nil, err
	}
	if err := sameSeries(a, b); err != nil {
		return nil, err
	}
	if fa, fb := a.Exif.FNumber, b.Exif.FNumber; fa > 0 && fb > 0 && math.Abs(fa-fb) > 0.05*fa {
		return nil, errorf("%s is at f/%s and %s at f/%s: a turned pair is one set-up at one stop", a.File, fmtF(fa), b.File, fmtF(fb))
	}
	if a.Width*a.Height != b.Width*b.Height {
		return nil, errorf("%s and %s differ in size: a turned pair is one camera", a.File, b.File)
	}
	if !sameFloats(sa.FreqsLPMM, sb.FreqsLPMM) {
		return nil, errorf("%s and %s were summarised at other field frequencies", a.File, b.File)
	}
	t := &Turned{Files: [2]string{a.File, b.File}, FreqsLPMM: append([]float64{}, sa.FreqsLPMM...), Caution: turnedCaution}
	chartTurn, haveChart := chartTurn(a, b)
	switch {
	case turnDeg != 0:
		t.TurnDeg, t.TurnSource = norm360(turnDeg), "user"
		if haveChart && angleGap(chartTurn, t.TurnDeg) > MaxTurnMismatchDeg {
			return nil, errorf("the chart is turned by %.0f degrees between %s and %s, not %.0f: not a turned pair as stated", chartTurn, a.File, b.File, t.TurnDeg)
		}
	case haveChart:
		t.TurnDeg, t.TurnSource = math.Round(chartTurn/90)*90, "chart"
		if angleGap(chartTurn, t.TurnDeg) > MaxTurnMismatchDeg {
			return nil, errorf("the chart is turned by %.0f degrees between the photos: turn the camera by 90 or 180 degrees", chartTurn)
		}
	default:
		return nil, errorf("say how far the camera was turned (90, 180 or 270 degrees): the photos do not both show Sagitta's chart")
	}
	if math.Mod(t.TurnDeg, 360) == 0 {
		return nil, errorf("the camera was not turned between %s and %s: nothing to split", a.File, b.File)
	}
	anyMeasured, lensAny, setupAny := false, false, false
	la, lb := levers(sa), levers(sb)
	for k, f := range t.FreqsLPMM {
		da, db := diffs(sa, k), diffs(sb, k)
		sp := split(per(da, la), per(db, lb), t.TurnDeg, la)
		sp.FreqLPMM = f
		t.ByFreq = append(t.ByFreq, sp)
		if finite(float64(sp.LensLeftRight.Diff)) || finite(float64(sp.LensTopBottom.Diff)) {
			anyMeasured = true
		}
		lensAny = lensAny || sp.LensLeftRight.Notable || sp.LensTopBottom.Notable
		setupAny = setupAny || sp.SetUpLeftRight.Notable || sp.SetUpTopBottom.Notable
	}
	switch {
	case !anyMeasured:
		t.Verdict = TurnedTooFew
	case lensAny && setupAny:
		t.Verdict = TurnedBoth
	case lensAny:
		t.Verdict = TurnedLens
	case setupAny:
		t.Verdict = TurnedSetUp
	default:
		t.Verdict = TurnedNeither
	}
	t.Text = t.words()
	return t, nil
}

// sideDiff is a difference between two sides with its standard error.
type sideDiff struct{ d, se float64 }

// diffs returns the photo's (left - right, top - bottom) differences at
// frequency index k; NaN where not measured.
func diffs(s *field.Summary, k int) [2]sideDiff {
	out := [2]sideDiff{{math.NaN(), math.NaN()}, {math.NaN(), math.NaN()}}
	for _, p := range s.Balance.Pairs {
		i := -1
		switch {
		case p.A == "left" && p.B == "right":
			i = 0
		case p.A == "top" && p.B == "bottom":
			i = 1
		}
		if i < 0 || k >= len(p.ByFreq) {
			continue
		}
		out[i] = sideDiff{float64(p.ByFreq[k].Diff), float64(p.ByFreq[k].SE)}
	}
	return out
}

// levers returns how far apart the compared sides' measurements lie, mm:
// along x, the mean x of the right side's outer-field measurements minus
// the left side's, and likewise along y (bottom minus top). A difference
// between sides divided by its lever is a gradient of sharpness per mm,
// which turns with the frame as a vector whatever the frame's shape.
func levers(s *field.Summary) [2]float64 {
	var sum [2][2]float64
	var n [2][2]float64
	k := s.PitchUM / 1000
	for _, p := range s.Points {
		if p.Orientation == field.Mixed || p.HeightMM < s.Balance.FromHeightMM {
			continue
		}
		d := [2]float64{(p.XPx - s.CentrePx[0]) * k, (p.YPx - s.CentrePx[1]) * k}
		for a := 0; a < 2; a++ {
			side := 0
			if d[a] > 0 {
				side = 1
			}
			sum[a][side] += d[a]
			n[a][side]++
		}
	}
	var out [2]float64
	for a := 0; a < 2; a++ {
		out[a] = math.NaN()
		if n[a][0] > 0 && n[a][1] > 0 {
			out[a] = sum[a][1]/n[a][1] - sum[a][0]/n[a][0]
		}
	}
	return out
}

// per divides each difference and its standard error by its lever.
func per(d [2]sideDiff, lever [2]float64) [2]sideDiff {
	for a := range d {
		d[a].d /= lever[a]
		d[a].se /= lever[a]
	}
	return d
}

// split solves g1 = L + S, g2 = L + R S for L and S, where g are the two
// photos' differences per mm of lever (gradients) and R the rotation by
// turnDeg in image axes, and returns L and S as differences over the first
// photo's levers.
//
// The vector (left - right, top - bottom) per mm is the gradient of
// softness along (x, y), so it turns as a vector: a set-up whose soft side
// moves from the top (y < 0) to the right (x > 0) under a turn of +90
// degrees in image axes (x towards y), R(T) = [[cos T, -sin T], [sin T, cos T]].
func split(d1, d2 [2]sideDiff, turnDeg float64, lever [2]float64) TurnedSplit {
	s, c := math.Sincos(turnDeg * math.Pi / 180)
	// M = (R - I)^-1 for R - I = [[c-1, -s], [s, c-1]].
	a, bb := c-1, -s
	cc, dd := s, c-1
	det := a*dd - bb*cc // = 2 - 2c, non-zero for T not a multiple of 360
	m := [2][2]float64{{dd / det, -bb / det}, {-cc / det, a / det}}
	var S, L [2]float64
	var varS, varL [2]float64
	for i := 0; i < 2; i++ {
		for j := 0; j < 2; j++ {
			delta := d2[j].d - d1[j].d
			S[i] += m[i][j] * delta
			varS[i] += m[i][j] * m[i][j] * (d1[j].se*d1[j].se + d2[j].se*d2[j].se)
		}
	}
	for i := 0; i < 2; i++ {
		L[i] = d1[i].d - S[i]
		for j := 0; j < 2; j++ {
			id := 0.0
			if i == j {
				id = 1
			}
			// L = (I + M) d1 - M d2.
			varL[i] += (id+m[i][j])*(id+m[i][j])*d1[j].se*d1[j].se + m[i][j]*m[i][j]*d2[j].se*d2[j].se
		}
	}
	part := func(d, v, lever float64) Part {
		d *= lever
		se := math.Sqrt(v) * lever
		return Part{Diff: Number(d), SE: Number(se),
			Notable: finite(d) && finite(se) && math.Abs(d) > field.NotableSE*se && math.Abs(d) >= field.NotableGap}
	}
	return TurnedSplit{
		LensLeftRight: part(L[0], varL[0], lever[0]), LensTopBottom: part(L[1], varL[1], lever[1]),
		SetUpLeftRight: part(S[0], varS[0], lever[0]), SetUpTopBottom: part(S[1], varS[1], lever[1]),
	}
}

// words says the verdict in words first and numbers second, at the field
// frequency where the largest notable part is.
func (t *Turned) words() string {
	switch t.Verdict {
	case TurnedTooFew:
		return "Too few measurements in opposite parts of the frame to split lens from set-up."
	case TurnedNeither:
		return "Neither the lens nor the set-up makes one side of the frame softer beyond the spread of the measurements."
	}
	var out []string
	if s := t.strongest(true); s != "" {
		out = append(out, s)
	}
	if s := t.strongest(false); s != "" {
		out = append(out, s)
	}
	return strings.Join(out, " ")
}

// strongest describes the largest notable lens (or set-up) part.
func (t *Turned) strongest(lens bool) string {
	best, bestK, bestAxis := Part{}, -1, 0
	for k, sp := range t.ByFreq {
		parts := [2]Part{sp.SetUpLeftRight, sp.SetUpTopBottom}
		if lens {
			parts = [2]Part{sp.LensLeftRight, sp.LensTopBottom}
		}
		for axis, p := range parts {
			if p.Notable && (bestK < 0 || math.Abs(float64(p.Diff)) > math.Abs(float64(best.Diff))) {
				best, bestK, bestAxis = p, k, axis
			}
		}
	}
	if bestK < 0 {
		return ""
	}
	sides := [2][2]string{{"left", "right"}, {"top", "bottom"}}[bestAxis]
	soft := sides[0]
	if best.Diff > 0 {
		soft = sides[1]
	}
	amount := fmt.Sprintf("by %.2f at %g lp/mm (± %.2f, two standard errors)", math.Abs(float64(best.Diff)), t.FreqsLPMM[bestK], 2*float64(best.SE))
	if lens {
		return fmt.Sprintf("The %s side of the lens is softer: it stayed soft when the camera turned, %s.", soft, amount)
	}
	return fmt.Sprintf("The set-up softens the %s side of the first photo's frame: it turned with the camera, %s. The chart is likely not parallel to the sensor, or focus was set on one side.", soft, amount)
}

// chartTurn returns how far the chart turned in the frame from photo a to
// photo b (degrees, 0..360), when both show Sagitta's chart.
func chartTurn(a, b *analyze.Image) (float64, bool) {
	if a.Chart == nil || b.Chart == nil {
		return 0, false
	}
	return norm360(b.Chart.Setup.RotationDeg - a.Chart.Setup.RotationDeg), true
}

func norm360(d float64) float64 {
	d = math.Mod(d, 360)
	if d < 0 {
		d += 360
	}
	return d
}

// angleGap is the smallest angle between two directions, degrees.
func angleGap(a, b float64) float64 {
	d := math.Abs(norm360(a) - norm360(b))
	return math.Min(d, 360-d)
}
