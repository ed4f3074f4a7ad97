package chart

import (
	"bytes"
	"errors"
	"image/png"
	"math"
	"testing"

	"sagitta/core/internal/coarse"
	"sagitta/core/plane"
)

// TestSheetPieces: every chart across sheets is cut along grid lines into
// N x N pieces that tile the frame, each with four marks of its own on
// its piece, the marks of a sheet at four distinct corners of a rectangle
// of grid corners (so a homography is fixed by them), and no target
// crosses a seam (every target's extent lies on the piece of its centre).
func TestSheetPieces(t *testing.T) {
	for _, code := range allCodes() {
		if code.Sheets == 0 {
			continue
		}
		d, err := NewDesign(code)
		if err != nil {
			t.Fatal(err)
		}
		n := code.Sheets
		if len(d.Sheets) != n*n {
			t.Fatalf("%v: %d sheets, want %d", code, len(d.Sheets), n*n)
		}
		var area float64
		for si, s := range d.Sheets {
			area += (s.X1 - s.X0) * (s.Y1 - s.Y0)
			var ms []Mark
			for _, m := range d.Marks {
				if m.Sheet == si {
					ms = append(ms, m)
				}
			}
			if len(ms) != 4 {
				t.Errorf("%v sheet %s: %d marks, want 4", code, s.Name(), len(ms))
				continue
			}
			for k, m := range ms {
				want := k
				if n == 3 {
					want += 4
				}
				if m.Index != want || !s.Contains(m.X, m.Y) {
					t.Errorf("%v sheet %s: mark %d has index %d at (%.3f, %.3f), want index %d on the piece", code, s.Name(), k, m.Index, m.X, m.Y, want)
				}
			}
			if !(ms[1].X > ms[0].X && ms[2].X > ms[3].X && ms[3].Y > ms[0].Y && ms[2].Y > ms[1].Y) {
				t.Errorf("%v sheet %s: marks do not make a quadrilateral in corner order: %+v", code, s.Name(), ms)
			}
		}
		if math.Abs(area-d.W*d.H) > 1e-9 {
			t.Errorf("%v: pieces cover %.4f, frame %.4f", code, area, d.W*d.H)
		}
		on := func(id string, x0, y0, x1, y1 float64) {
			s := d.Sheets[d.SheetAt((x0+x1)/2, (y0+y1)/2)]
			if !s.Contains(x0, y0) || !s.Contains(x1, y1) {
				t.Errorf("%v: %s crosses a seam of sheet %s", code, id, s.Name())
			}
		}
		for _, q := range d.Squares {
			h := q.Side / math.Sqrt2
			on(q.ID, q.X-h, q.Y-h, q.X+h, q.Y+h)
		}
		for _, st := range d.Stars {
			on(st.ID, st.X-st.Radius, st.Y-st.Radius, st.X+st.Radius, st.Y+st.Radius)
		}
		for _, g := range d.Gratings {
			on(g.ID, g.X-g.W/2, g.Y-g.H/2, g.X+g.W/2, g.Y+g.H/2)
		}
		w := d.Wedge
		on("wedge", w.X-w.W/2, w.Y-w.H/2, w.X+w.W/2, w.Y+w.H/2)
	}
}

// TestSheetsRender: a 2 x 2 A4 chart is one PDF of four A4 pages (ISO 216:
// 297 x 210 mm landscape, 841.89 x 595.28 pt; ISO 32000-1 MediaBox), each
// sheet's piece drawn at one scale, the assembled chart larger than the one
// sheet's; SVG and PNG come as one file per sheet.
func TestSheetsRender(t *testing.T) {
	one, err := NewLayout(Options{})
	if err != nil {
		t.Fatal(err)
	}
	// 150 dpi keeps the sine patterns' rasters small; the pages and the
	// pieces' sizes do not depend on it.
	ls, err := NewSheets(Options{Sheets: "2x2", DPI: 150})
	if err != nil {
		t.Fatal(err)
	}
	if len(ls) != 4 {
		t.Fatalf("%d sheets, want 4", len(ls))
	}
	w1, h1 := one.ChartMM()
	w, h := ls[0].ChartMM()
	t.Logf("one sheet: chart %.1f x %.1f mm; 2 x 2: %.1f x %.1f mm", w1, h1, w, h)
	if h < 1.5*h1 {
		t.Errorf("the 2 x 2 chart is %.1f mm tall, want at least 1.5 times the one sheet's %.1f mm", h, h1)
	}
	for _, l := range ls {
		if l.UnitMM != ls[0].UnitMM {
			t.Errorf("sheet %s drawn at %.3f mm per unit, sheet 1-1 at %.3f", l.Piece.Name(), l.UnitMM, ls[0].UnitMM)
		}
		if l.PieceMM[0] < 10 || l.PieceMM[1] < 10 || l.PieceMM[2] > l.PageW-10 || l.PieceMM[3] > l.PageH-10 {
			t.Errorf("sheet %s: piece %v leaves the printable area", l.Piece.Name(), l.PieceMM)
		}
	}
	b, err := Render(Options{Sheets: "2x2", DPI: 150}, "pdf")
	if err != nil {
		t.Fatal(err)
	}
	if got := bytes.Count(b, []byte("/Type /Page /Parent 2 0 R /MediaBox [0 0 841.8898 595.2756]")); got != 4 {
		t.Errorf("%d A4 landscape pages, want 4", got)
	}
	files, err := SheetFiles(ls, "chart", "svg")
	if err != nil {
		t.Fatal(err)
	}
	if len(files) != 4 || files[1].Name != "chart-1-2.svg" {
		t.Errorf("files %d, second named %q", len(files), files[1].Name)
	}
	one2, err := Render(Options{Sheets: "2x2", DPI: 150, Sheet: 2}, "svg")
	if err != nil || !bytes.Equal(one2, files[1].Bytes) {
		t.Errorf("sheet 2 alone: %v, %d bytes, want chart-1-2.svg's %d", err, len(one2), len(files[1].Bytes))
	}
	for _, bad := range []Options{{Sheets: "4x4"}, {Sheets: "3x3", Aspect: "1:1"}, {Sheets: "2x2", Sheet: 5}} {
		var oe OptionError
		if _, err := Render(bad, "svg"); !errors.As(err, &oe) {
			t.Errorf("%+v: got %v, want an OptionError", bad, err)
		}
	}
}

// TestSheetFilesMarks reads each sheet's PNG file of the 2 x 2 chart back
// (Go's image/png decoder) and finds its marks with the recogniser's own
// disc finder and ring reader: each sheet shows exactly its four marks,
// with the chart code's words, at the design's positions through the
// sheet's layout within 0.2 mm (a ring's sector is now and then read as a
// disc of its own, as on the one-sheet chart; such readings lie on their
// mark, and the recogniser keeps the most certain reading of each). The files are what is printed; this ties
// them to the design the recogniser expects.
func TestSheetFilesMarks(t *testing.T) {
	const dpi = 150
	ls, err := NewSheets(Options{Sheets: "2x2", DPI: dpi})
	if err != nil {
		t.Fatal(err)
	}
	files, err := SheetFiles(ls, "chart", "png")
	if err != nil {
		t.Fatal(err)
	}
	d := ls[0].Design
	want := Code{Aspect: "3:2", Sheets: 2}.value()
	for i, f := range files {
		img, err := png.Decode(bytes.NewReader(f.Bytes))
		if err != nil {
			t.Fatal(err)
		}
		b := img.Bounds()
		p := plane.New(b.Dx(), b.Dy())
		for y := 0; y < b.Dy(); y++ {
			for x := 0; x < b.Dx(); x++ {
				r, _, _, _ := img.At(b.Min.X+x, b.Min.Y+y).RGBA()
				p.Pix[y*p.W+x] = float32(r) / 0xffff
			}
		}
		best := map[int]float64{} // designed mark index -> nearest reading, mm
		for _, dc := range findDiscs(coarse.NewViews(p)) {
			m, ok := readMark(p, dc)
			if !ok {
				continue
			}
			// Pixel centres: (i + 0.5) / dots per mm.
			xmm, ymm := m.XPx*25.4/dpi, m.YPx*25.4/dpi
			u, v := (xmm-ls[i].CentreMM[0])/ls[i].UnitMM, (ymm-ls[i].CentreMM[1])/ls[i].UnitMM
			var dm Mark
			for _, c := range d.Marks {
				if c.Sheet == i && c.Index == m.Index {
					dm = c
				}
			}
			e := math.Hypot(u-dm.X, v-dm.Y)
			if m.code != want || dm.R == 0 || e > dm.R {
				t.Errorf("%s: a mark of code %d index %d at (%.1f, %.1f) mm, want code %d and on one of the sheet's marks", f.Name, m.code, m.Index, xmm, ymm, want)
				continue
			}
			if b, seen := best[m.Index]; !seen || e*ls[i].UnitMM < b {
				best[m.Index] = e * ls[i].UnitMM
			}
		}
		if len(best) != 4 {
			t.Errorf("%s: %d of the sheet's 4 marks read", f.Name, len(best))
		}
		for k, e := range best {
			if e > 0.2 {
				t.Errorf("%s: mark %d found %.2f mm from its designed place", f.Name, k, e)
			}
		}
	}
}
