package analyze

import (
	"fmt"
	"math"
	"sagitta/core/note"

	"sagitta/core/chart"
	"sagitta/core/decode"
	"sagitta/core/plane"
)

// Tone from the chart's step wedge. A camera JPEG is decoded with the sRGB
// curve, but cameras apply their own tone curve (an S-curve, mostly), which
// bends every edge profile and star: MTF50 then reads several per cent high.
// ISO 12233 linearises with the camera's measured tone response (its OECF,
// ISO 14524). Sagitta's chart carries a step wedge of 12 grey patches of
// designed reflectance relative to the paper (core/chart, Design.Wedge).
// When the chart is recognised, before anything is measured, the mean
// decoded value of each patch's middle and of the paper next to the wedge
// are read, and the monotone curve through (patch mean, designed
// reflectance), (paper mean, 1) and (0, 0) (decode.Fitted: pooled
// adjacent violators, then a monotone cubic) maps the whole photo to
// linear light relative to the paper (times the paper's mean, so levels
// keep their scale). The designed reflectances hold for a printer that
// honours sRGB (core/chart's paint.go); a printer's own tone error enters
// the fit.

// ToneFit describes the tone curve read from the chart's step wedge.
type ToneFit struct {
	// Applied says the photo was linearised with the fitted curve (when
	// the tone setting is "auto"; a tone chosen by the user is kept).
	Applied bool `json:"applied"`
	// Steps are the wedge's patches: designed reflectance and the mean
	// decoded value relative to the paper's.
	Steps      []ToneStep `json:"steps"`
	PaperLevel float64    `json:"paper_level"` // mean decoded value of the paper, linear
	// MaxDiff is the largest difference between a patch's decoded value
	// relative to the paper and its designed reflectance: how far the
	// photo's tone curve is from the one it was decoded with.
	MaxDiff float64 `json:"max_diff"`
	// Curve samples the fitted curve: decoded value relative to the paper
	// (0 to 1.1 in steps of 0.05) and the linear reflectance it maps to.
	Curve [][2]float64 `json:"curve"`
	// Code is FlagToneCurve when MaxDiff exceeds ToneTol, else "".
	Code string `json:"code,omitempty"`

	fitted *decode.Fitted // the curve applied (nil when not applied)
	paper  float64
	// fitX, fitY are the points the curve was fitted through (decoded
	// value, reflectance), for measuring the photo elsewhere (Plan).
	fitX, fitY []float64
}

// toneAssumed is the caution for a camera JPEG without Sagitta's chart.
const toneAssumed = "the photo's tone curve is assumed to be sRGB: a camera's own tone curve (most apply an S-curve) can raise MTF figures by several per cent; Sagitta's chart carries grey steps from which the curve is fitted"

// ToneStep is one patch of the step wedge.
type ToneStep struct {
	Reflectance float64 `json:"reflectance"` // designed, relative to the paper
	Measured    float64 `json:"measured"`    // decoded mean relative to the paper's
}

// Tone codes and their threshold.
const (
	// FlagToneCurve marks a photo whose tone curve, read from the wedge,
	// differs from the decoding tone by more than ToneTol in reflectance.
	FlagToneCurve = string(note.ToneCurve)
	// FlagToneAssumed marks a camera JPEG without Sagitta's wedge: its
	// tone curve is assumed.
	FlagToneAssumed = "tone-assumed"
	// ToneTol is the largest difference (in reflectance relative to the
	// paper) between the wedge's decoded and designed values not reported:
	// a few per cent is within what a home printer holds (Sagitta's choice).
	ToneTol = 0.03
	// minWedgeSteps patches must be read, in order, for a fit.
	minWedgeSteps = 10
)

// meanIn returns the mean of p over the pixels whose centres map (through
// pose's inverse) inside the chart-unit rectangle [x0, x1] x [y0, y1], and
// their number.
func meanIn(p *plane.Plane, pose *chart.Pose, x0, y0, x1, y1 float64) (float64, int) {
	h, inv := pose.At((x0+x1)/2, (y0+y1)/2) // its own sheet's on a chart across sheets
	bx0, by0, bx1, by1 := math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
	for _, c := range [4][2]float64{{x0, y0}, {x1, y0}, {x1, y1}, {x0, y1}} {
		u, v := h.Apply(c[0], c[1])
		bx0, by0, bx1, by1 = math.Min(bx0, u), math.Min(by0, v), math.Max(bx1, u), math.Max(by1, v)
	}
	i0, j0 := max(int(math.Floor(bx0)), 0), max(int(math.Floor(by0)), 0)
	i1, j1 := min(int(math.Ceil(bx1)), p.W-1), min(int(math.Ceil(by1)), p.H-1)
	var sum float64
	var n int
	for j := j0; j <= j1; j++ {
		for i := i0; i <= i1; i++ {
			u, v := inv.Apply(float64(i)+0.5, float64(j)+0.5)
			if u >= x0 && u <= x1 && v >= y0 && v <= y1 {
				sum += float64(p.Pix[j*p.W+i])
				n++
			}
		}
	}
	if n == 0 {
		return math.NaN(), 0
	}
	return sum / float64(n), n
}

// fitTone reads the step wedge of the recognised chart from the decoded
// plane p and fits the photo's tone curve; with apply it maps p through
// it. It returns nil and a note when the wedge cannot be read (a print
// without one, or hidden).
func fitTone(p *plane.Plane, pose *chart.Pose, apply bool) (*ToneFit, string) {
	d := pose.Design
	w := d.Wedge
	if len(w.Steps) == 0 {
		return nil, ""
	}
	// The paper: bands above and below the wedge, in its cell's margin.
	gap := (d.H/float64(d.Rows) - w.H) / 2
	var ps float64
	var pn int
	for _, sg := range []float64{-1, 1} {
		yc := w.Y + sg*(w.H/2+gap/2)
		m, n := meanIn(p, pose, w.X-0.4*w.W, yc-gap/4, w.X+0.4*w.W, yc+gap/4)
		if n > 0 {
			ps += m * float64(n)
			pn += n
		}
	}
	if pn < 16 {
		return nil, "the chart's grey steps were not read: the tone curve is assumed"
	}
	paper := ps / float64(pn)
	tf := &ToneFit{PaperLevel: paper, Curve: [][2]float64{}}
	xs, ys := []float64{0, paper}, []float64{0, 1}
	inOrder, prev := 0, math.Inf(1)
	for k, r := range w.Steps {
		x, y, pw, ph := w.Patch(k)
		m, n := meanIn(p, pose, x-pw/4, y-ph/4, x+pw/4, y+ph/4)
		if n < 8 || !(paper > 0) {
			continue
		}
		tf.Steps = append(tf.Steps, ToneStep{Reflectance: r, Measured: m / paper})
		tf.MaxDiff = math.Max(tf.MaxDiff, math.Abs(m/paper-r))
		if m < prev {
			inOrder++
		}
		prev = m
		xs, ys = append(xs, m), append(ys, r)
	}
	// A wedge reads darker step by step and spans a wide range; a print
	// without one (an older chart) shows paper or a square there.
	if len(tf.Steps) < minWedgeSteps || inOrder < len(tf.Steps)-2 ||
		tf.Steps[len(tf.Steps)-1].Measured > 0.5*tf.Steps[0].Measured {
		return nil, "the chart's grey steps were not found (a print without them?): the tone curve is assumed"
	}
	f, err := decode.Fit(xs, ys)
	if err != nil {
		return nil, "the chart's grey steps gave no tone curve: the tone curve is assumed"
	}
	for k := 0; k <= 22; k++ {
		v := 0.05 * float64(k)
		tf.Curve = append(tf.Curve, [2]float64{v, f.At(v * paper)})
	}
	tf.fitX, tf.fitY = xs, ys
	if apply {
		f.Apply(p, paper)
		tf.Applied = true
		tf.fitted, tf.paper = f, paper
	}
	return tf, ""
}

// mapper returns the function that maps a plane through the fitted curve
// as fitTone mapped the photo's luminance (the colour planes of an edge,
// fringes.go), or nil when no curve was applied.
func (tf *ToneFit) mapper() func(*plane.Plane) {
	if tf == nil || tf.fitted == nil {
		return nil
	}
	return func(p *plane.Plane) { tf.fitted.Apply(p, tf.paper) }
}

// toneWarning words a fitted tone curve for people ("" when it is close
// to the decoding tone).
func toneWarning(tf *ToneFit, tone string) string {
	if tf == nil || tf.MaxDiff <= ToneTol {
		return ""
	}
	if tf.Applied {
		return fmt.Sprintf("the photo's tone curve differs from %s by up to %.2f in reflectance (the chart's grey steps): the photo was linearised with the curve fitted to them", tone, tf.MaxDiff)
	}
	return fmt.Sprintf("the photo's tone curve differs from the chosen tone %s by up to %.2f in reflectance (the chart's grey steps): choose the tone \"auto\" to linearise with the fitted curve", tone, tf.MaxDiff)
}
