package analyze

import (
	"bytes"
	"context"
	"encoding/json"
	"testing"
)

// TestStagesEqualRun splits the targets of a photo into ranges, measures
// them on the Found and on Measurers that Prepare made from the photo's
// bytes (as other workers of the page do), passes plan and parts through
// JSON and finishes: the JSON must be Run's, byte for byte, for 1, 2 and 5
// ranges and for ranges cut inside the sine patterns, in any order of
// arrival. The chart photo carries the fitted tone curve in its plan and
// the chart's gratings; the star photo has sine stars and gratings.
func TestStagesEqualRun(t *testing.T) {
	for _, tc := range []struct {
		name string
		f    *fixture
	}{{"chart", chartPhoto}, {"star", starPhoto}} {
		t.Run(tc.name, func(t *testing.T) {
			data := tc.f.photo(t)
			s := Settings{FallbackSensorMM: [2]float64{36, 24}}
			want, err := Run(context.Background(), "p.jpg", data, s, nil)
			if err != nil {
				t.Fatal(err)
			}
			wantJSON, _ := json.Marshal(want)
			for _, ranges := range []int{1, 2, 5, -1} {
				f, err := Find(context.Background(), Photo{Name: "p.jpg", Data: data}, s, nil)
				if err != nil {
					t.Fatal(err)
				}
				n, nr := f.Targets(), len(f.Plan().Regions)
				if n-nr < 3 {
					t.Fatalf("%d sine patterns found, want 3 or more", n-nr)
				}
				// Cuts: ranges of equal length, or (-1) one range per
				// pattern after one of all the edges.
				cuts := []int{0}
				for k := 1; k <= ranges; k++ {
					cuts = append(cuts, k*n/ranges)
				}
				if ranges < 0 {
					for k := nr; k <= n; k++ {
						cuts = append(cuts, k)
					}
				}
				planJSON, _ := json.Marshal(f.Plan())
				var plan Plan
				if err := json.Unmarshal(planJSON, &plan); err != nil {
					t.Fatal(err)
				}
				if tc.name == "chart" && len(plan.ToneX) == 0 {
					t.Fatal("the chart photo's plan carries no tone curve")
				}
				var parts []Part
				for k := len(cuts) - 2; k >= 0; k-- { // last range first: the order of arrival must not matter
					lo, hi := cuts[k], cuts[k+1]
					m := &f.Measurer
					if k%2 == 1 {
						if m, err = Prepare(Photo{Name: "p.jpg", Data: data}, s); err != nil {
							t.Fatal(err)
						}
						if err := m.Use(plan); err != nil {
							t.Fatal(err)
						}
					}
					got, err := m.Measure(context.Background(), lo, hi, nil)
					if err != nil {
						t.Fatal(err)
					}
					text, _ := json.Marshal(got)
					var back []Part
					if err := json.Unmarshal(text, &back); err != nil {
						t.Fatal(err)
					}
					parts = append(parts, back...)
				}
				img, err := f.Finish(context.Background(), parts, nil)
				if err != nil {
					t.Fatal(err)
				}
				gotJSON, _ := json.Marshal(img)
				if !bytes.Equal(gotJSON, wantJSON) {
					t.Errorf("%d ranges (-1: one per pattern): the JSON differs from Run's (%d and %d bytes)", ranges, len(gotJSON), len(wantJSON))
				}
			}
		})
	}
}

// TestFinishChecksParts refuses a missing or doubled part.
func TestFinishChecksParts(t *testing.T) {
	data := squaresPhoto.photo(t)
	s := Settings{FallbackSensorMM: [2]float64{36, 24}}
	for _, tc := range []struct {
		name string
		edit func([]Part) []Part
	}{
		{"missing", func(p []Part) []Part { return p[1:] }},
		{"doubled", func(p []Part) []Part { return append(p, p[0]) }},
	} {
		f, err := Find(context.Background(), Photo{Name: "p.jpg", Data: data}, s, nil)
		if err != nil {
			t.Fatal(err)
		}
		parts, err := f.Measure(context.Background(), 0, f.Targets(), nil)
		if err != nil {
			t.Fatal(err)
		}
		if _, err := f.Finish(context.Background(), tc.edit(parts), nil); err == nil {
			t.Errorf("%s part: no error", tc.name)
		}
	}
}

// TestFinishMeasuresLeftOut: edge candidates that Find leaves out of the
// plan because they lie on a sine pattern found are measured by Finish when
// that pattern does not measure, so the photo's JSON is Run's. A pattern
// that is not one (a star on the first edge candidate of the chart photo,
// where no star measures) is added to the plan.
func TestFinishMeasuresLeftOut(t *testing.T) {
	data := chartPhoto.photo(t)
	s := Settings{FallbackSensorMM: [2]float64{36, 24}}
	want, err := Run(context.Background(), "p.jpg", data, s, nil)
	if err != nil {
		t.Fatal(err)
	}
	wantJSON, _ := json.Marshal(want)
	f, err := Find(context.Background(), Photo{Name: "p.jpg", Data: data}, s, nil)
	if err != nil {
		t.Fatal(err)
	}
	r := f.cands[0]
	f.plan.Patterns = append(f.plan.Patterns, PatternJob{Kind: jobStar, X: r.X, Y: r.Y, RadiusPx: 2 * r.HalfLen})
	f.planRegions()
	left := 0
	for _, k := range f.slot {
		if k < 0 {
			left++
		}
	}
	if left == 0 {
		t.Fatal("no candidate was left out of the plan")
	}
	parts, err := f.Measure(context.Background(), 0, f.Targets(), nil)
	if err != nil {
		t.Fatal(err)
	}
	if p := parts[len(parts)-1]; p.Star != nil || p.Rejected != nil {
		t.Fatal("a star was measured on an edge")
	}
	img, err := f.Finish(context.Background(), parts, nil)
	if err != nil {
		t.Fatal(err)
	}
	if got, _ := json.Marshal(img); !bytes.Equal(got, wantJSON) {
		t.Errorf("%d candidates measured by Finish: the JSON differs from Run's", left)
	}
}
