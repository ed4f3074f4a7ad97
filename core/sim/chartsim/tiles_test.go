package chartsim_test

import (
	"context"
	"encoding/json"
	"math"
	"strings"
	"testing"

	"sagitta/core/analyze"
	"sagitta/core/chart"
	"sagitta/core/note"
	"sagitta/core/sim/chartsim"
	"sagitta/core/sim/simcam"
)

// TestTiledEndToEnd photographs the 2 x 2 A4 chart, each sheet hung up to
// 2 mm off and turned up to 1 degree, with the simulated camera and
// analyses the photo with analyze.Run: the chart is recognised as the 2 x 2
// chart, every square edge in the photo is measured and tied to its
// target, and each edge record lies on the true image of its square's edge
// (within 0.04 px; README quotes 0.02) and names the sheet the simulation hung it on; the seams
// are reported, and the misaligned ones warned about with their code, and
// nothing else of the set-up (the camera is square to the wall).
func TestTiledEndToEnd(t *testing.T) {
	w, h := 1500, 1000
	ls, err := chart.NewSheets(chart.Options{Sheets: "2x2"})
	if err != nil {
		t.Fatal(err)
	}
	d := ls[0].Design
	shortMM := ls[0].UnitMM
	hung := []chartsim.Hung{{DXMM: 2, DYMM: -1.5, TurnDeg: 1}, {DXMM: -2, DYMM: 2, TurnDeg: -0.8}, {DXMM: 1.2, DYMM: 2, TurnDeg: 0.6}, {DXMM: -1.5, DYMM: -2, TurnDeg: -1}}
	v := chartsim.View{W: w, H: h, Fill: 0.96, FocalPx: 3000}
	hom := v.Homography(d)
	cam := simcam.Camera{W: w, H: h, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: 0.8, Sigma2: 0.8}}, Encoding: simcam.Linear16, FullWellE: 40000, Seed: 5}
	photo, err := cam.Encode(chartsim.TiledScene(d, hom, hung, shortMM, chartsim.Print{}))
	if err != nil {
		t.Fatal(err)
	}
	img, err := analyze.Run(context.Background(), "tiles.png", photo, analyze.Settings{PitchUM: 24, Tone: "linear", ChartMM: shortMM}, nil)
	if err != nil {
		t.Fatal(err)
	}
	cr := img.Chart
	if cr == nil || cr.Code != "S1-3:2-L-2x2" || len(cr.Sheets) != 4 {
		t.Fatalf("chart %+v, want S1-3:2-L-2x2 with 4 sheets", cr)
	}
	t.Logf("%d of %d square edges identified; %d seams; setup warnings %q", cr.EdgesIdentified, cr.EdgesExpected, len(cr.Seams), cr.Setup.Warnings)
	if cr.EdgesExpected != 4*len(d.Squares) || cr.EdgesIdentified != cr.EdgesExpected {
		t.Errorf("%d of %d square edges identified, want all %d", cr.EdgesIdentified, cr.EdgesExpected, 4*len(d.Squares))
	}
	for _, m := range cr.Missing {
		if !strings.HasPrefix(m.TargetID, "grating") {
			t.Errorf("missing %s edge %d: %s", m.TargetID, m.Edge, m.Reason)
		}
	}
	byID := map[string]chart.Square{}
	for _, q := range d.Squares {
		byID[q.ID] = q
	}
	var n int
	worst := 0.0
	for _, m := range img.Measurements {
		q, ok := byID[m.TargetID]
		if m.Kind != "edge" || !ok {
			continue
		}
		s := d.SheetAt(q.X, q.Y)
		if m.Sheet != d.Sheets[s].Name() || m.PlacedXY == nil {
			t.Errorf("%s edge %d: sheet %q, want %q", q.ID, m.TargetEdge, m.Sheet, d.Sheets[s].Name())
		}
		// The true image of the edge: its end points through the sheet's
		// hanging and the camera.
		cs := q.Corners()
		a, b := cs[(m.TargetEdge+3)%4], cs[m.TargetEdge%4] // edge k runs from corner k-1 to corner k
		mp := hom.Mul(hung[s].Map(d.Sheets[s], shortMM))
		ax, ay := mp.Apply(a[0], a[1])
		bx, by := mp.Apply(b[0], b[1])
		dist := math.Abs((bx-ax)*(ay-m.YPx)-(ax-m.XPx)*(by-ay)) / math.Hypot(bx-ax, by-ay)
		worst = math.Max(worst, dist)
		n++
	}
	t.Logf("%d edge records within %.2f px of their edges' true images", n, worst)
	// README quotes 0.02 px (measured 0.01), asserted at 0.04 px.
	if worst > 0.04 {
		t.Errorf("an edge record lies %.3f px from its edge's true image, want within 0.04 px", worst)
	}
	// The camera is square to the wall: the sheets' misalignment must not
	// read as a keystone or a turn of the whole chart.
	warned := 0
	for _, c := range cr.Setup.WarningCodes {
		if c == string(note.SetupSheetsMisaligned) {
			warned++
		} else {
			t.Errorf("set-up warning %q for a camera square to the chart", c)
		}
	}
	if len(cr.Seams) != 4 || warned == 0 {
		t.Errorf("%d seams, %d warned, want 4 seams and the misaligned ones warned", len(cr.Seams), warned)
	}
	// Distortion needs one homography for the whole chart, which sheets
	// hung apart break: not measured, with its reason. The paper's light is
	// read through each sheet's own homography, away from the joins; this
	// camera adds no fall-off, so every patch reads the centre's level.
	if d := img.Distortion; d == nil || d.Measured || d.ReasonCode != string(note.DistortionTiled) {
		t.Errorf("distortion on a chart across sheets: %+v, want not measured (%s)", d, note.DistortionTiled)
	}
	if f := img.Falloff; f == nil || !f.Measured {
		t.Errorf("light fall-off not measured on a chart across sheets: %+v", f)
	} else {
		t.Logf("fall-off: %d patches, corner %.4f EV, rms %.4f EV", f.Points, f.CornerEV, f.ResidualEV)
		if math.Abs(f.CornerEV) > 0.02 || f.ResidualEV > 0.02 {
			t.Errorf("fall-off on an evenly lit chart across sheets: corner %.4f EV, rms %.4f EV, want within 0.02", f.CornerEV, f.ResidualEV)
		}
	}
	js, err := json.Marshal(img)
	if err != nil {
		t.Fatal(err)
	}
	// Resummarised from its JSON (as the page does for new settings), the
	// result is the same: the sheets and seams survive the round trip.
	var back analyze.Image
	if err := json.Unmarshal(js, &back); err != nil {
		t.Fatal(err)
	}
	again, err := analyze.Resummarise(&back, analyze.Settings{PitchUM: 24, Tone: "linear", ChartMM: shortMM})
	if err != nil {
		t.Fatal(err)
	}
	if js2, _ := json.Marshal(again); string(js2) != string(js) {
		t.Errorf("resummarised with the same settings, the JSON differs")
	}
	for _, key := range []string{`"sheets":[{"sheet":"1-1"`, `"seams":[{"sheet_a":`, `"sheet":"1-2"`, `"placed_xy":`} {
		if !strings.Contains(string(js), key) {
			t.Errorf("the JSON lacks %s", key)
		}
	}
}
