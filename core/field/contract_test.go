package field_test

import (
	"encoding/json"
	"fmt"
	"math"
	"regexp"
	"testing"

	"sagitta/core/analyze"
	"sagitta/core/field"
)

// TestSummaryJSON: the summary's keys in the JSON contract (README, "The
// JSON contract"; core/analyze/contract.go), null for what is not a
// number, and a round trip through the contract's types that keeps every
// field (SummaryOf and Field).
func TestSummaryJSON(t *testing.T) {
	geo := field.NewGeometry(6000, 4000, 6)
	freqs := []float64{10, 30}
	s, err := field.Summarise(geo, field.SynthPoints(geo, 60, freqs, 2), freqs)
	if err != nil {
		t.Fatal(err)
	}
	b, err := json.Marshal(analyze.SummaryOf(s))
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"freqs_lp_mm", "pitch_um", "center_px", "width_px", "height_px", "corner_mm", "smoother",
		"points", "curves", "mtf50_curves", "astigmatism", "map", "balance", "zones", "cautions", "warnings", "warning_codes"} {
		if _, ok := m[k]; !ok {
			t.Errorf("summary JSON lacks %q", k)
		}
	}
	points := m["points"].([]any)
	last := points[len(points)-1].(map[string]any)
	if last["orientation"] != "mixed" || last["mtf50_lp_mm"] != nil || last["weight"].([]any)[0] != nil {
		t.Errorf("mixed point: %v", last)
	}
	bal := m["balance"].(map[string]any)
	for _, k := range []string{"verdict", "text", "caution", "from_height_mm", "pairs", "quarters"} {
		if _, ok := bal[k]; !ok {
			t.Errorf("balance JSON lacks %q", k)
		}
	}
	// A round trip keeps the numbers (to the 5 decimals written).
	var back analyze.Summary
	if err := json.Unmarshal(b, &back); err != nil {
		t.Fatal(err)
	}
	if d := math.Abs(float64(back.Curves[1].Value[7] - s.Curves[1].Value[7])); d > 1e-5 {
		t.Errorf("round trip changed a value by %g", d)
	}
	if !math.IsNaN(float64(back.Points[len(back.Points)-1].MTF50LPMM)) {
		t.Error("null did not come back as NaN")
	}
	// The conversions lose nothing that is exported (compared printed, where
	// NaN equals NaN; the map is behind a pointer, compared apart).
	back2 := analyze.SummaryOf(s).Field()
	if back2.Map == nil || fmt.Sprintf("%+v", *back2.Map) != fmt.Sprintf("%+v", *s.Map) {
		t.Error("the map changed in SummaryOf(s).Field()")
	}
	clean := regexp.MustCompile(`Map:0x[0-9a-f]+| score:[^ }]+`)
	if got, want := clean.ReplaceAllString(fmt.Sprintf("%+v", *back2), ""), clean.ReplaceAllString(fmt.Sprintf("%+v", *s), ""); got != want {
		t.Errorf("SummaryOf(s).Field() differs from s:\n%.400s\n%.400s", got, want)
	}
}
