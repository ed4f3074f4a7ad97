package plan

import (
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// TestSensorNames: every name of the one table parses to its size (full
// frame 36 x 24 mm, common practice), case and spaces aside, and a bad name
// is refused with the list of names.
func TestSensorNames(t *testing.T) {
	for _, f := range Sensors {
		for _, s := range []string{f.Name, strings.ToUpper(f.Name), " " + f.Name + " "} {
			v, err := ParseSensor(s)
			if err != nil || v != [2]float64{f.WMM, f.HMM} {
				t.Errorf("%q: %v, %v", s, v, err)
			}
		}
	}
	if v, _ := ParseSensor("full-frame"); v != [2]float64{36, 24} {
		t.Errorf("full frame %v, want 36 x 24 mm", v)
	}
	if _, err := ParseSensor("medium"); err == nil || !strings.Contains(err.Error(), SensorNames()) {
		t.Errorf("bad name: %v", err)
	}
}

// TestPagePresets: the page's sensor presets (site/index.html) are this
// table, in the same order, with the same sizes.
func TestPagePresets(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("..", "..", "site", "index.html"))
	if err != nil {
		t.Fatal(err)
	}
	sel := regexp.MustCompile(`(?s)<select id="sensor-select">(.*?)</select>`).FindSubmatch(b)
	if sel == nil {
		t.Fatal("no sensor-select in the page")
	}
	opts := regexp.MustCompile(`<option value="([0-9.]+)x([0-9.]+)">([^<]*)</option>`).FindAllSubmatch(sel[1], -1)
	if len(opts) != len(Sensors) {
		t.Fatalf("%d presets on the page, %d in the table", len(opts), len(Sensors))
	}
	for i, o := range opts {
		f := Sensors[i]
		w, _ := strconv.ParseFloat(string(o[1]), 64)
		h, _ := strconv.ParseFloat(string(o[2]), 64)
		about := ""
		if f.Typical {
			about = "about "
		}
		want := fmt.Sprintf("%s, %s%s × %s mm", f.Label, about, strconv.FormatFloat(f.WMM, 'g', -1, 64), strconv.FormatFloat(f.HMM, 'g', -1, 64))
		if w != f.WMM || h != f.HMM || string(o[3]) != want {
			t.Errorf("page preset %d: %sx%s %q, want %q", i, o[1], o[2], o[3], want)
		}
	}
}
