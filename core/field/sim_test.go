package field_test

import (
	"context"
	"math"
	"strconv"
	"strings"
	"testing"

	"sagitta/core/analyze"
	"sagitta/core/field"
	"sagitta/core/sim/simcam"
)

// The simulated shoot: a chart of dark squares filling the frame, each
// turned to the radius through it plus a 5 degree slant, so two of its
// sides are tangential edges and two sagittal (a chart design of our own);
// photographed through a simcam.FieldLens whose PSF widens with image
// height, faster along the radius (tangential) than across it (sagittal).

// shoot describes one simulated photo.
type shoot struct {
	w, h      int
	pitchUM   float64
	grid      int     // squares along the long side
	sidePx    float64 // square side, px
	sigmaT    []float64
	sigmaS    []float64
	tiltPerMM float64
	tiltDeg   float64
	seed      uint64
}

// smallShoot is the fast photo for -short runs: 900 x 600 px at 8 um
// (7.2 x 4.8 mm, corner 4.33 mm); the widths are scaled so that MTF falls
// over this small field as it would over a full frame.
func smallShoot(seed uint64) shoot {
	return shoot{w: 900, h: 600, pitchUM: 8, grid: 9, sidePx: 60,
		sigmaT: []float64{0.6, 0, 0.09}, sigmaS: []float64{0.6, 0.12}, seed: seed}
}

// fullShoot is a 36 x 24 mm frame, 6000 x 4000 px at 6 um.
func fullShoot(seed uint64) shoot {
	return shoot{w: 6000, h: 4000, pitchUM: 6, grid: 24, sidePx: 120,
		sigmaT: []float64{0.7, 0, 0.0045}, sigmaS: []float64{0.7, 0.03}, seed: seed}
}

func (s shoot) lens() simcam.FieldLens {
	return simcam.FieldLens{CentreX: float64(s.w) / 2, CentreY: float64(s.h) / 2, PitchUM: s.pitchUM,
		SigmaT: s.sigmaT, SigmaS: s.sigmaS, TiltPerMM: s.tiltPerMM, TiltDeg: s.tiltDeg}
}

func (s shoot) scene() simcam.Scene {
	sc := simcam.Scene{Background: 0.75}
	cx, cy := float64(s.w)/2, float64(s.h)/2
	rows := int(math.Round(float64(s.grid) * float64(s.h) / float64(s.w)))
	cw, ch := float64(s.w)/float64(s.grid), float64(s.h)/float64(rows)
	for j := 0; j < rows; j++ {
		for i := 0; i < s.grid; i++ {
			x, y := (float64(i)+0.5)*cw, (float64(j)+0.5)*ch
			rad := math.Atan2(y-cy, x-cx) * 180 / math.Pi
			sc.Polygons = append(sc.Polygons, simcam.Square(x, y, s.sidePx, rad+5, 0.12))
		}
	}
	return sc
}

// run renders the photo (16-bit PNG, photon and read noise) and analyses it.
func (s shoot) run(t testing.TB) *analyze.Image {
	t.Helper()
	cam := simcam.Camera{W: s.w, H: s.h, Lens: s.lens(), FullWellE: 10000, ReadNoiseE: 3, Seed: s.seed, Encoding: simcam.SRGB16}
	buf, err := cam.Encode(s.scene())
	if err != nil {
		t.Fatal(err)
	}
	img, err := analyze.Run(context.Background(), "simulated.png", buf, analyze.Settings{PitchUM: s.pitchUM}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if img.Summary == nil {
		t.Fatal("no summary")
	}
	return img
}

// trueMTF is the analytic system MTF (simcam.TrueMTF: lens OTF times the
// pixel aperture, Goodman ch. 6, Boreman ch. 2) of an ideally oriented
// target at image height h mm, averaged over eight directions from the
// centre (for a centred lens only the pixel aperture's small dependence on
// direction varies among them).
func trueMTF(l simcam.FieldLens, h float64, o field.Orientation, fCyPx float64) float64 {
	var sum float64
	for a := 0; a < 8; a++ {
		th := float64(a)*45 + 10
		r := h / l.PitchUM * 1000
		x, y := l.CentreX+r*math.Cos(th*math.Pi/180), l.CentreY+r*math.Sin(th*math.Pi/180)
		n := th // tangential: normal along the radius
		if o == field.Sagittal {
			n += 90
		}
		sum += simcam.TrueMTF(l, x, y, n, fCyPx)
	}
	return sum / 8
}

// TestFieldCurvesAgainstTruth: the smooth field curves of a simulated photo
// lie within twice README's figures of the true system MTF at every sampled
// height, for both orientations at 10 and 30 lp/mm: README quotes 0.007 on
// the full 6000 x 4000 frame and 0.012 on the small frame of -short.
func TestFieldCurvesAgainstTruth(t *testing.T) {
	s, limit := smallShoot(11), 2*0.012
	if !testing.Short() {
		s, limit = fullShoot(11), 2*0.007
	}
	img := s.run(t)
	sum := img.Summary.Field()
	lens := s.lens()
	if len(sum.Curves) != 4 {
		t.Fatalf("%d field curves, want 4 (2 orientations x 2 frequencies); warnings %v", len(sum.Curves), sum.Warnings)
	}
	for _, c := range sum.Curves {
		worst, at := 0.0, 0.0
		for i, h := range c.HeightMM {
			d := float64(c.Value[i]) - trueMTF(lens, h, c.Orientation, c.FreqLPMM*s.pitchUM/1000)
			if math.Abs(d) > math.Abs(worst) {
				worst, at = d, h
			}
		}
		t.Logf("%-10s %2g lp/mm: %3d points over %.2f..%.2f mm, span %.2f degree %d, residual sd %.4f, worst error %+.4f at %.2f mm",
			c.Orientation, c.FreqLPMM, c.Points, c.HMinMM, c.HMaxMM, c.Span, c.Degree, c.ResidualSD, worst, at)
		if math.Abs(worst) > limit {
			t.Errorf("%s %g lp/mm: curve differs from the true MTF by %.4f at %.2f mm (limit %.3f)", c.Orientation, c.FreqLPMM, worst, at, limit)
		}
		// The curve covers the measured heights and no more.
		if c.HeightMM[0] != c.HMinMM || c.HeightMM[len(c.HeightMM)-1] != c.HMaxMM || c.HMaxMM > sum.CornerMM {
			t.Errorf("%s %g: samples %g..%g, points %g..%g, corner %g", c.Orientation, c.FreqLPMM,
				c.HeightMM[0], c.HeightMM[len(c.HeightMM)-1], c.HMinMM, c.HMaxMM, sum.CornerMM)
		}
	}
	// Astigmatism: the simulated lens is tangentially softer off axis.
	for _, a := range sum.Astigmatism {
		want := trueMTF(lens, a.MaxGapHeightMM, field.Sagittal, a.FreqLPMM*s.pitchUM/1000) -
			trueMTF(lens, a.MaxGapHeightMM, field.Tangential, a.FreqLPMM*s.pitchUM/1000)
		if !a.Notable || a.MaxGap <= 0 || math.Abs(a.MaxGap-want) > 0.04 {
			t.Errorf("%g lp/mm: largest gap %+.3f at %.2f mm (notable %v), true gap there %+.3f", a.FreqLPMM, a.MaxGap, a.MaxGapHeightMM, a.Notable, want)
		}
	}
	if sum.Balance.Verdict != field.VerdictBalanced {
		t.Errorf("centred lens judged %q: %s", sum.Balance.Verdict, sum.Balance.Text)
	}
}

// TestBalanceDetectsDecentring: a FieldLens tilted so that one side of the
// frame is softer (TiltPerMM != 0) is flagged by the balance check, naming
// the soft side; a centred one is not. Several noise seeds (a fixed list).
func TestBalanceDetectsDecentring(t *testing.T) {
	seeds := []uint64{21, 22, 23, 24}
	cases := []struct {
		name    string
		tilt    float64
		deg     float64
		verdict string
		softer  string // the pair and soft side expected in the text
	}{
		{"softer right", 0.04, 0, field.VerdictUnbalanced, "Right half softer than the left"},
		{"centred", 0, 0, field.VerdictBalanced, ""},
		{"softer top", 0.04, -90, field.VerdictUnbalanced, "Top half softer than the bottom"},
	}
	if testing.Short() {
		// One decentred photo; TestFieldCurvesAgainstTruth checks that a
		// centred one is balanced.
		seeds, cases = seeds[:1], cases[:1]
	}
	for _, tc := range cases {
		for _, seed := range seeds {
			s := smallShoot(seed)
			s.tiltPerMM, s.tiltDeg = tc.tilt, tc.deg
			b := s.run(t).Summary.Field().Balance
			var diffs []string
			for _, p := range b.Pairs {
				for _, d := range p.ByFreq {
					diffs = append(diffs, p.A+"-"+p.B+" "+fmtDiff(d))
				}
			}
			t.Logf("%s seed %d: %s; %v", tc.name, seed, b.Verdict, diffs)
			if b.Verdict != tc.verdict {
				t.Errorf("%s seed %d: verdict %q, want %q: %s", tc.name, seed, b.Verdict, tc.verdict, b.Text)
			}
			// README: the tilted lenses' differences 0.06-0.09 at 30
			// lp/mm (asserted between half and twice that), the centred
			// lens's at most 0.003 (asserted within 0.006).
			for _, p := range b.Pairs {
				for _, d := range p.ByFreq {
					diff := math.Abs(float64(d.Diff))
					if tc.tilt == 0 && diff > 2*0.003 {
						t.Errorf("%s seed %d: %s-%s differ by %.4f at %g lp/mm (limit 0.006)", tc.name, seed, p.A, p.B, diff, d.FreqLPMM)
					}
				}
			}
			if tc.tilt != 0 {
				lead := b.Pairs[0] // left-right
				if tc.deg == -90 {
					lead = b.Pairs[1] // top-bottom
				}
				if d := math.Abs(float64(lead.ByFreq[len(lead.ByFreq)-1].Diff)); d < 0.03 || d > 0.18 {
					t.Errorf("%s seed %d: %s-%s differ by %.4f at 30 lp/mm, README says 0.06-0.09", tc.name, seed, lead.A, lead.B, d)
				}
			}
			if tc.softer != "" && !strings.Contains(b.Text, tc.softer) {
				t.Errorf("%s seed %d: text does not say %q: %s", tc.name, seed, tc.softer, b.Text)
			}
		}
	}
}

func fmtDiff(d field.PairDiff) string {
	return strconvF(d.FreqLPMM) + ":" + strconvF(math.Round(float64(d.Diff)*1000)/1000) + "+/-" + strconvF(math.Round(float64(d.SE)*1000)/1000)
}

func strconvF(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
