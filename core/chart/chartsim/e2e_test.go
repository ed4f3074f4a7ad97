package chartsim_test

import (
	"context"
	"encoding/json"
	"math"
	"strings"
	"testing"

	"sagitta/core/analyze"
	"sagitta/core/chart"
	"sagitta/core/chart/chartsim"
	"sagitta/core/field"
	"sagitta/core/simcam"
)

// TestEndToEnd photographs the 3:2 chart with a simulated full-frame camera
// (36 x 24 mm sensor: 6000 x 4000 px at 6 um, or 1500 x 1000 px at 24 um
// under -short) through a lens whose Gaussian PSF widens with image height,
// more along the radius than across it, and analyses the photo with
// analyze.Run. It checks against the simulation's own truth, not the
// recogniser's:
//
//   - the chart is recognised and every square edge inside the photo is
//     measured and tagged (no edge missing);
//   - each tag is right: the measurement lies within 1 px of the true image
//     of that square's edge, with its normal within 1 degree of the edge's
//     true normal;
//   - the analyser's sagittal/tangential class of each edge is the one the
//     design intends (edges 1 and 3 tangential, 2 and 4 sagittal) for at
//     least 95 % of the measurements (the whole-photo issue's figure), and
//     otherwise "mixed", which happens only next to the centre, where an
//     edge piece off the square's axis sees the radius turned by more than
//     the 20 degree tolerance;
//   - MTF at 10 and 30 lp/mm is within 0.05 of simcam.TrueMTF, the analytic
//     system MTF (lens OTF times pixel aperture; Goodman ch. 6, Boreman ch.
//     2), at each edge: the tolerance of the whole-photo analysis issue.
func TestEndToEnd(t *testing.T) {
	w, h, pitch := 6000, 4000, 6.0
	if testing.Short() {
		w, h, pitch = 1500, 1000, 24.0
	}
	d, err := chart.NewDesign(chart.Code{Aspect: "3:2"})
	if err != nil {
		t.Fatal(err)
	}
	v := chartsim.View{W: w, H: h, Fill: 0.97}
	hom := v.Homography(d)
	// PSF widths in px at 6 um; scaled with the pitch so the lens is the
	// same in mm at either size: 4.2 um at the centre growing to 12.6 um
	// along the radius and 8.1 um across it in the corners (21.6 mm).
	k := 6 / pitch
	lens := simcam.FieldLens{CentreX: float64(w) / 2, CentreY: float64(h) / 2, PitchUM: pitch,
		SigmaT: []float64{0.7 * k, 0, 0.003 * k}, SigmaS: []float64{0.7 * k, 0.03 * k}}
	cam := simcam.Camera{W: w, H: h, Lens: lens, Encoding: simcam.Linear16, FullWellE: 40000, Seed: 5}
	photo, err := cam.Encode(chartsim.Scene(d, hom, chartsim.Print{}))
	if err != nil {
		t.Fatal(err)
	}
	img, err := analyze.Run(context.Background(), "chart.png", photo, analyze.Settings{PitchUM: pitch, Tone: "linear"}, nil)
	if err != nil {
		t.Fatal(err)
	}
	cr := img.Chart
	if cr == nil {
		t.Fatal("the chart was not recognised")
	}
	t.Logf("%d measurements, %d rejected; chart %s, %d of %d square edges identified, warnings %q",
		len(img.Measurements), len(img.Rejected), cr.Code, cr.EdgesIdentified, cr.EdgesExpected, img.Warnings)
	if cr.EdgesExpected != 4*len(d.Squares) {
		t.Errorf("%d square edges expected in the photo, want all %d", cr.EdgesExpected, 4*len(d.Squares))
	}
	for _, m := range cr.Missing {
		t.Errorf("missing %s edge %d: %s", m.TargetID, m.Edge, m.Reason)
	}
	if len(img.Warnings) > 0 {
		t.Errorf("warnings for a straight, filled view: %q", img.Warnings)
	}
	// The JSON contract carries the chart and the tags.
	js, err := json.Marshal(img)
	if err != nil {
		t.Fatal(err)
	}
	for _, key := range []string{`"chart":{"code":"S1-3:2-L"`, `"target_id":"sq`, `"target_edge":`, `"chart_field":`, `"homography":`, `"setup":`} {
		if !strings.Contains(string(js), key) {
			t.Errorf("the JSON lacks %s", key)
		}
	}
	byID := map[string]chart.Square{}
	for _, q := range d.Squares {
		byID[q.ID] = q
	}
	geo := field.NewGeometry(w, h, pitch)
	var worst float64
	var n, designed int
	for _, m := range img.Measurements {
		if m.TargetID == "" {
			t.Errorf("untagged measurement at (%.0f, %.0f)", m.XPx, m.YPx)
			continue
		}
		q, ok := byID[m.TargetID]
		if !ok {
			t.Errorf("measurement tagged %q, not a square", m.TargetID)
			continue
		}
		// The true image of edge m.TargetEdge.
		cs := q.Corners()
		a, b := cs[(m.TargetEdge+3)%4], cs[m.TargetEdge%4]
		ax, ay := hom.Apply(a[0], a[1])
		bx, by := hom.Apply(b[0], b[1])
		ex, ey := bx-ax, by-ay
		l := math.Hypot(ex, ey)
		if dist := math.Abs((m.XPx-ax)*ey-(m.YPx-ay)*ex) / l; dist > 1 {
			t.Errorf("%s edge %d: measurement %.2f px from the edge's true image", m.TargetID, m.TargetEdge, dist)
		}
		normal := math.Atan2(ex, -ey) * 180 / math.Pi // the edge direction turned by -90
		dn := math.Mod(math.Abs(m.NormalDeg-normal), 180)
		if dn = math.Min(dn, 180-dn); dn > 1 {
			t.Errorf("%s edge %d: normal %.2f, true %.2f", m.TargetID, m.TargetEdge, m.NormalDeg, normal)
		}
		want := field.Tangential
		if m.TargetEdge%2 == 0 {
			want = field.Sagittal
		}
		switch o, ang := geo.Classify(m.XPx, m.YPx, m.NormalDeg); {
		case o == want && m.Orientation == want:
			designed++
		case o == field.Mixed && m.Orientation == field.Mixed && ang > field.ToleranceDeg && ang < 90-field.ToleranceDeg:
			t.Logf("%s edge %d at %.1f mm: mixed (%.1f degrees from the radius)", m.TargetID, m.TargetEdge, m.HeightMM, ang)
		default:
			t.Errorf("%s edge %d: classed %s, designed %s", m.TargetID, m.TargetEdge, m.Orientation, want)
		}
		if m.ChartField == nil || math.Abs(*m.ChartField-d.Field(q.X, q.Y)) > 1e-12 {
			t.Errorf("%s: designed field position missing or wrong", m.TargetID)
		}
		for i, f := range img.FreqsLPMM {
			truth := simcam.TrueMTF(lens, m.XPx, m.YPx, m.NormalDeg, f*pitch/1000)
			e := math.Abs(float64(m.MTFAtFreqs[i]) - truth)
			worst = math.Max(worst, e)
			n++
			if e > 0.05 {
				t.Errorf("%s edge %d at %g lp/mm: MTF %.3f, true %.3f", m.TargetID, m.TargetEdge, f, m.MTFAtFreqs[i], truth)
			}
		}
	}
	t.Logf("%d values at %v lp/mm, largest error against the analytic MTF %.4f; %d of %d measurements classed as designed",
		n, img.FreqsLPMM, worst, designed, len(img.Measurements))
	if designed < 95*len(img.Measurements)/100 {
		t.Errorf("only %d of %d measurements classed as designed, want 95 %%", designed, len(img.Measurements))
	}
}
