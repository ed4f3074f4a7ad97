package chart

import "testing"

// TestTiledMarksStray: a chart on one sheet whose photo also shows one
// stray reading of a mark index far from that mark (seen on a simulated
// 24 MP photo: a smaller disc read as index 0 with a sector error, near the
// corner mark 3) stays one sheet; the marks of a 2 x 2 chart, each index
// on every sheet, are sheets.
func TestTiledMarksStray(t *testing.T) {
	one := []FoundMark{}
	xy := [][2]float64{{629, 619}, {5339, 638}, {5339, 3362}, {629, 3381}, {2738, 628}, {5339, 1728}, {3261, 3370}, {629, 2276}}
	for i, p := range xy {
		one = append(one, FoundMark{Index: i, XPx: p[0], YPx: p[1], rPx: 35})
	}
	stray := FoundMark{Index: 0, XPx: 645, YPx: 3462, rPx: 24.8, Errors: 1}
	if tiled, _ := tiledMarks(append(one, stray), 0); tiled {
		t.Error("one stray reading turned a chart on one sheet into sheets")
	}
	clean := stray
	clean.Errors, clean.rPx = 0, 35
	if tiled, _ := tiledMarks(append(one, clean), 0); tiled {
		t.Error("a single clean duplicate turned a chart on one sheet into sheets")
	}
	var four []FoundMark
	for s := range 4 {
		for i := range 4 {
			four = append(four, FoundMark{Index: i, XPx: float64(1000*(s%2) + 400*(i%2)), YPx: float64(1000*(s/2) + 400*(i/2)), rPx: 20})
		}
	}
	if tiled, n := tiledMarks(four, 0); !tiled || n != 2 {
		t.Errorf("the marks of a 2 x 2 chart: tiled %v, %d sheets per side; want true, 2", tiled, n)
	}
}
