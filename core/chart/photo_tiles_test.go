package chart_test

import (
	"math"
	"testing"

	"sagitta/core/chart"
	"sagitta/core/note"
	"sagitta/core/sim/chartsim"
	"sagitta/core/sim/simcam"
)

// TestRecogniseTiles photographs the 2 x 2 A4 chart (and, without -short,
// the 3 x 3 one and the 2 x 2 upside down) with each sheet hung up to 2 mm
// off and turned up to 1 degree, and checks the recognition against the
// simulation's own placement of every target:
//
//   - every target (square, star, grating, grey steps) is found at its true
//     image position, within 0.1 mm on the chart, with its id and its sheet;
//   - each target's position on the assembled chart (Pose.Placed) agrees
//     with where its sheet was hung, within 0.1 mm (the issue asks 0.5 mm;
//     README quotes 0.06 mm), up to one homography
//     (the assembled chart's units are the best fit of all marks, which
//     the misalignment itself moves); the assembled chart's homography
//     alone misses by more, so the sheets' own poses are what places them;
//   - the seams' gaps, slides and turns are within 0.25 mm and 0.1
//     degree of the simulated ones, and those past the limits are warned
//     about with their code.
func TestRecogniseTiles(t *testing.T) {
	cases := []struct {
		name  string
		n     int
		view  chartsim.View
		short bool
	}{
		{"2x2", 2, chartsim.View{W: 1500, H: 1000, Fill: 0.95, RollDeg: 1.5, YawDeg: 4, FocalPx: 3000}, true},
		{"2x2 upside down", 2, chartsim.View{W: 1500, H: 1000, Fill: 0.95, RollDeg: 180.5, PitchDeg: -3, FocalPx: 3000}, false},
		{"3x3", 3, chartsim.View{W: 1500, H: 1000, Fill: 0.95, RollDeg: -1, YawDeg: -3, FocalPx: 3000}, false},
	}
	// Up to 2 mm and 1 degree, each sheet its own way.
	hung := []chartsim.Hung{
		{DXMM: 2, DYMM: -1.5, TurnDeg: 1}, {DXMM: -2, DYMM: 2, TurnDeg: -0.8}, {DXMM: 1.2, DYMM: 2, TurnDeg: 0.6},
		{DXMM: -1.5, DYMM: -2, TurnDeg: -1}, {DXMM: 0.5, DYMM: 1, TurnDeg: 0.3}, {DXMM: -1, DYMM: -0.5, TurnDeg: 0.9},
		{DXMM: 2, DYMM: 0, TurnDeg: -0.5}, {DXMM: 0, DYMM: -2, TurnDeg: 0.7}, {DXMM: -2, DYMM: 1.5, TurnDeg: -0.9},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if testing.Short() && !c.short {
				t.Skip("heavy case")
			}
			ls, err := chart.NewSheets(chart.Options{Sheets: c.name[:3]})
			if err != nil {
				t.Fatal(err)
			}
			d := ls[0].Design
			shortMM := ls[0].UnitMM // the chart's short side is one unit
			h := c.view.Homography(d)
			cam := simcam.Camera{W: c.view.W, H: c.view.H, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: lensSigma, Sigma2: lensSigma}},
				FullWellE: 20000, ReadNoiseE: 3, Seed: 11}
			p, err := cam.Render(chartsim.TiledScene(d, h, hung, shortMM, chartsim.Print{}))
			if err != nil {
				t.Fatal(err)
			}
			pose, why := chart.Recognise(p)
			if pose == nil {
				t.Fatalf("not recognised: %q", why.Text)
			}
			if pose.Code != d.Code || len(pose.Sheets) != c.n*c.n {
				t.Fatalf("code %v with %d sheets, want %v with %d", pose.Code, len(pose.Sheets), d.Code, c.n*c.n)
			}
			for _, sp := range pose.Sheets {
				if !sp.Own || len(sp.Marks) != 4 {
					t.Errorf("sheet %s: own pose %v from %d marks, want 4", sp.Sheet.Name(), sp.Own, len(sp.Marks))
				}
			}
			pxPerMM := math.Sqrt(math.Abs(h.Jacobian(0, 0)[0][0]*h.Jacobian(0, 0)[1][1]-h.Jacobian(0, 0)[0][1]*h.Jacobian(0, 0)[1][0])) / shortMM
			// A target's point to look up: its centre, or for a square the
			// middle of its edge 1.
			type target struct {
				id           string
				x, y         float64
				lookX, lookY float64
			}
			var ts []target
			for _, q := range d.Squares {
				s, c := math.Sincos(q.RotDeg * math.Pi / 180)
				ts = append(ts, target{q.ID, q.X, q.Y, q.X + c*q.Side/2, q.Y + s*q.Side/2})
			}
			for _, s := range d.Stars {
				ts = append(ts, target{s.ID, s.X, s.Y, s.X, s.Y})
			}
			for _, g := range d.Gratings {
				ts = append(ts, target{g.ID, g.X, g.Y, g.X, g.Y})
			}
			ts = append(ts, target{"wedge", d.Wedge.X, d.Wedge.Y, d.Wedge.X, d.Wedge.Y})
			var truth, got, single [][2]float64
			worstPx := 0.0
			for _, tg := range ts {
				s := d.SheetAt(tg.x, tg.y)
				m := hung[s].Map(d.Sheets[s], shortMM)
				wx, wy := m.Apply(tg.x, tg.y)
				ix, iy := h.Apply(wx, wy)
				hit := pose.Locate(h.Apply(m.Apply(tg.lookX, tg.lookY)))
				if hit.ID != tg.id || hit.Sheet != d.Sheets[s].Name() {
					t.Errorf("%s on sheet %s: found %q on sheet %q", tg.id, d.Sheets[s].Name(), hit.ID, hit.Sheet)
				}
				gx, gy := pose.ImageXY(tg.x, tg.y)
				worstPx = math.Max(worstPx, math.Hypot(gx-ix, gy-iy))
				px, py := pose.Placed(tg.x, tg.y)
				truth = append(truth, [2]float64{wx, wy})
				got = append(got, [2]float64{px, py})
				single = append(single, [2]float64{tg.x, tg.y})
			}
			resid := func(est [][2]float64) float64 {
				m, err := chart.FitHomography(truth, est)
				if err != nil {
					t.Fatal(err)
				}
				var worst float64
				for i := range truth {
					x, y := m.Apply(truth[i][0], truth[i][1])
					worst = math.Max(worst, math.Hypot(x-est[i][0], y-est[i][1])*shortMM)
				}
				return worst
			}
			placed, alone := resid(got), resid(single)
			t.Logf("%d targets: image positions within %.3f px (%.3f mm), positions on the assembled chart within %.3f mm (the assembled chart's homography alone: %.2f mm)",
				len(ts), worstPx, worstPx/pxPerMM, placed, alone)
			// The issue asks 0.5 mm; README quotes 0.06 mm (the 3 x 3 case's
			// 0.054), asserted here at 0.1 mm.
			if worstPx/pxPerMM > 0.1 || placed > 0.1 {
				t.Errorf("targets placed within %.3f mm in the image and %.3f mm on the assembled chart, want 0.1 mm", worstPx/pxPerMM, placed)
			}
			if alone <= 0.5 {
				t.Errorf("the assembled chart's homography alone places targets within %.3f mm: the sheets' misalignment is too small to test", alone)
			}
			seams := pose.Seams(shortMM)
			if len(seams) != 2*c.n*(c.n-1) {
				t.Fatalf("%d seams, want %d", len(seams), 2*c.n*(c.n-1))
			}
			warned := 0
			for _, sm := range seams {
				var a, b int
				for i, s := range d.Sheets {
					if s.Name() == sm.A {
						a = i
					}
					if s.Name() == sm.B {
						b = i
					}
				}
				sa := d.Sheets[a]
				right := b == a+1
				mx, my, nx, ny := sa.X1, (sa.Y0+sa.Y1)/2, 1.0, 0.0
				if !right {
					mx, my, nx, ny = (sa.X0+sa.X1)/2, sa.Y1, 0, 1
				}
				ax, ay := hung[a].Map(sa, shortMM).Apply(mx, my)
				bx, by := hung[b].Map(d.Sheets[b], shortMM).Apply(mx, my)
				gap, slide := ((bx-ax)*nx+(by-ay)*ny)*shortMM, ((bx-ax)*ny+(by-ay)*nx)*shortMM
				turn := hung[b].TurnDeg - hung[a].TurnDeg
				t.Logf("seam %s|%s: gap %.2f mm (true %.2f), slide %.2f mm (%.2f), turn %.2f deg (%.2f)", sm.A, sm.B, sm.GapMM, gap, sm.SlideMM, slide, sm.TurnDeg, turn)
				if math.Abs(sm.GapMM-gap) > 0.25 || math.Abs(sm.SlideMM-slide) > 0.25 || math.Abs(sm.TurnDeg-turn) > 0.1 {
					t.Errorf("seam %s|%s: gap %.2f slide %.2f mm turn %.2f deg, want %.2f, %.2f, %.2f", sm.A, sm.B, sm.GapMM, sm.SlideMM, sm.TurnDeg, gap, slide, turn)
				}
				if math.Abs(gap) > chart.MaxSeamMM || math.Abs(slide) > chart.MaxSeamMM || math.Abs(turn) > chart.MaxSeamDeg {
					warned++
				}
			}
			texts, codes := chart.SeamWarnings(seams)
			if len(texts) != warned || len(codes) != warned {
				t.Errorf("%d seam warnings, want %d", len(texts), warned)
			}
			for i := range codes {
				if codes[i] != string(note.SetupSheetsMisaligned) {
					t.Errorf("code %q", codes[i])
				}
			}
			if len(texts) > 0 {
				t.Logf("%s", texts[0])
			}
		})
	}
}

// TestOneSheetAlone: a photo of one sheet of the 2 x 2 chart, alone and
// filling the frame, is not placed (its four marks repeat on every sheet)
// and the note says to frame the whole assembled chart.
func TestOneSheetAlone(t *testing.T) {
	d, err := chart.NewDesign(chart.Code{Aspect: "3:2", Sheets: 2})
	if err != nil {
		t.Fatal(err)
	}
	s := d.Sheets[1]
	sub := *d
	sub.Squares, sub.Stars, sub.Gratings, sub.Marks, sub.Wedge = nil, nil, nil, nil, chart.Wedge{}
	for _, q := range d.Squares {
		if s.Contains(q.X, q.Y) {
			sub.Squares = append(sub.Squares, q)
		}
	}
	for _, m := range d.Marks {
		if m.Sheet == 1 {
			sub.Marks = append(sub.Marks, m)
		}
	}
	w, h := 900, 600
	sc := 0.95 * math.Min(float64(w)/(s.X1-s.X0), float64(h)/(s.Y1-s.Y0))
	cx, cy := (s.X0+s.X1)/2, (s.Y0+s.Y1)/2
	hom := chart.Homography{sc, 0, float64(w)/2 - sc*cx, 0, sc, float64(h)/2 - sc*cy, 0, 0, 1}
	cam := simcam.Camera{W: w, H: h, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: lensSigma, Sigma2: lensSigma}}, FullWellE: 20000, ReadNoiseE: 3, Seed: 11}
	p, err := cam.Render(chartsim.Scene(&sub, hom, chartsim.Print{}))
	if err != nil {
		t.Fatal(err)
	}
	pose, why := chart.Recognise(p)
	if pose != nil || why.Code != note.ChartOneSheet {
		t.Fatalf("pose %v, note %q (%s); want none and %q", pose != nil, why.Code, why.Text, note.ChartOneSheet)
	}
	t.Log(why.Text)
}
