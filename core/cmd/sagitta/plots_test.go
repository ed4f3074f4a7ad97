package main

import (
	"bytes"
	"encoding/json"
	"encoding/xml"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"testing"

	"sagitta/core/sim/simcam"
)

// TestPlotsFlag runs "sagitta analyze --json --plots DIR" on two simulated
// photos and checks that every plot is written as well-formed SVG and a
// decodable PNG, and that the JSON on stdout still parses and carries the
// summary.
func TestPlotsFlag(t *testing.T) {
	dir := t.TempDir()
	var files []string
	for i, name := range []string{"wide open.png", "stopped-down.png"} {
		const w, h = 900, 600
		lens := simcam.FieldLens{CentreX: w / 2, CentreY: h / 2, PitchUM: 8,
			SigmaT: []float64{0.6, 0, 0.2 / float64(i+1)}, SigmaS: []float64{0.6, 0.2}}
		sc := simcam.Scene{Background: 0.75}
		for j := 0; j < 6; j++ {
			for k := 0; k < 9; k++ {
				x, y := (float64(k)+0.5)*w/9, (float64(j)+0.5)*h/6
				sc.Polygons = append(sc.Polygons, simcam.Square(x, y, 60, math.Atan2(y-h/2, x-w/2)*180/math.Pi+5, 0.12))
			}
		}
		cam := simcam.Camera{W: w, H: h, Lens: lens, FullWellE: 10000, Seed: uint64(i + 1)}
		b, err := cam.Encode(sc)
		if err != nil {
			t.Fatal(err)
		}
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, b, 0o644); err != nil {
			t.Fatal(err)
		}
		files = append(files, p)
	}
	out := filepath.Join(dir, "plots")
	var stdout, stderr bytes.Buffer
	if code := run(append([]string{"analyze", "--pitch-um", "8", "--json", "--plots", out}, files...), &stdout, &stderr); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr.String())
	}
	var res struct {
		Images []struct {
			Summary *struct {
				Curves []any `json:"curves"`
			} `json:"summary"`
		} `json:"images"`
	}
	if err := json.Unmarshal(stdout.Bytes(), &res); err != nil || len(res.Images) != 2 || res.Images[0].Summary == nil {
		t.Fatalf("JSON: %v, %+v", err, res)
	}
	var want []string
	for _, base := range []string{"wide_open", "stopped-down"} {
		for _, s := range []string{"field-curves", "mtf50-map", "astigmatism", "target-centre", "target-corner"} {
			want = append(want, base+"-"+s)
		}
	}
	want = append(want, "field-curves-compared")
	for _, w := range want {
		svg, err := os.ReadFile(filepath.Join(out, w+".svg"))
		if err != nil {
			t.Error(err)
			continue
		}
		dec := xml.NewDecoder(bytes.NewReader(svg))
		for {
			if _, err := dec.Token(); err == io.EOF {
				break
			} else if err != nil {
				t.Errorf("%s.svg: %v", w, err)
				break
			}
		}
		b, err := os.ReadFile(filepath.Join(out, w+".png"))
		if err != nil {
			t.Error(err)
			continue
		}
		if _, err := png.Decode(bytes.NewReader(b)); err != nil {
			t.Errorf("%s.png: %v", w, err)
		}
	}
	// An unusable folder is a clear error.
	blocker := filepath.Join(dir, "file")
	os.WriteFile(blocker, nil, 0o644)
	stderr.Reset()
	if code := run([]string{"analyze", "--pitch-um", "8", "--plots", filepath.Join(blocker, "sub"), files[0]}, io.Discard, &stderr); code == 0 || stderr.Len() == 0 {
		t.Errorf("plots into a file: exit %d, %q", code, stderr.String())
	}
}

func TestPlotName(t *testing.T) {
	used := map[string]bool{}
	for _, tc := range []struct{ in, want string }{
		{"IMG 0042.JPG", "IMG_0042"},
		{"chart.f8.png", "chart.f8"},
		{"IMG 0042.png", "IMG_0042-2"},
		{".png", "photo"},
	} {
		if got := plotName(tc.in, used); got != tc.want {
			t.Errorf("plotName(%q) = %q, want %q", tc.in, got, tc.want)
		}
	}
}
