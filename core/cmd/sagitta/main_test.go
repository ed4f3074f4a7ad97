package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"sagitta/core/plan"
	"sagitta/core/sim/simcam"
)

// runCLI runs a command line and returns stdout, stderr and the exit status.
func runCLI(args ...string) (string, string, int) {
	var out, errb bytes.Buffer
	code := run(args, &out, &errb)
	return out.String(), errb.String(), code
}

// edgePhoto writes a PNG of one slanted edge through a Gaussian lens.
func edgePhoto(t *testing.T, dir string) string {
	t.Helper()
	cam := simcam.Camera{W: 320, H: 240, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: 1, Sigma2: 1}}, Encoding: simcam.SRGB8}
	data, err := cam.Encode(simcam.HalfPlaneScene(320, 240, 5, 0.08, 0.7))
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, "edge.png")
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

func TestAnalyzeJSONContract(t *testing.T) {
	path := edgePhoto(t, t.TempDir())
	out, errs, code := runCLI("analyze", "--pitch-um", "4", "--json", path)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	// The contract of DESIGN.md, read generically so that a renamed field
	// fails here.
	var doc map[string][]map[string]any
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	imgs := doc["images"]
	if len(imgs) != 1 {
		t.Fatalf("%d images", len(imgs))
	}
	img := imgs[0]
	for _, k := range []string{"file", "width", "height", "pitch_um", "center_px", "measurements", "warnings"} {
		if _, ok := img[k]; !ok {
			t.Errorf("image lacks %q", k)
		}
	}
	if img["file"] != "edge.png" || img["width"] != 320.0 || img["pitch_um"] != 4.0 {
		t.Errorf("image header %v %v %v", img["file"], img["width"], img["pitch_um"])
	}
	ms := img["measurements"].([]any)
	if len(ms) == 0 {
		t.Fatal("no measurement")
	}
	for _, mi := range ms {
		m := mi.(map[string]any)
		for _, k := range []string{"kind", "x_px", "y_px", "height_mm", "orientation", "normal_deg", "mtf50_cy_px", "freq_cy_px", "mtf", "warnings"} {
			if _, ok := m[k]; !ok {
				t.Errorf("measurement lacks %q", k)
			}
		}
		if m["kind"] != "edge" {
			t.Errorf("kind %v", m["kind"])
		}
		switch m["orientation"] {
		case "sagittal", "tangential", "mixed":
		default:
			t.Errorf("orientation %v", m["orientation"])
		}
		f, v := m["freq_cy_px"].([]any), m["mtf"].([]any)
		if len(f) != len(v) || f[0] != 0.0 || f[len(f)-1].(float64) < 0.5 {
			t.Errorf("frequencies run %v..%v (%d values, %d mtf)", f[0], f[len(f)-1], len(f), len(v))
		}
		for i := 1; i < len(f); i++ {
			if f[i].(float64) <= f[i-1].(float64) {
				t.Fatal("frequencies do not ascend")
			}
		}
		if v[0] != 1.0 {
			t.Errorf("MTF at zero frequency %v, want 1", v[0])
		}
	}
}

func TestAnalyzeCSVAndText(t *testing.T) {
	path := edgePhoto(t, t.TempDir())
	out, errs, code := runCLI("analyze", "--pitch-um", "4", "--csv", path)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	lines := strings.Split(strings.TrimSpace(out), "\n")
	if len(lines) < 2 || !strings.HasPrefix(lines[0], "file,id,kind,x_px") {
		t.Errorf("csv:\n%s", out)
	}
	out, _, code = runCLI("analyze", "--sensor", "1.28x0.96", path)
	if code != 0 || !strings.Contains(out, "pitch 4 um (sensor size)") {
		t.Errorf("text output (exit %d):\n%s", code, out)
	}
}

func TestBadInput(t *testing.T) {
	dir := t.TempDir()
	flat := filepath.Join(dir, "flat.png")
	cam := simcam.Camera{W: 200, H: 150, Encoding: simcam.SRGB8}
	data, err := cam.Encode(simcam.Scene{Background: 0.5})
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(flat, data, 0o644); err != nil {
		t.Fatal(err)
	}
	// A 1 x 1 PNG (issue 17): too small, said before the pixel pitch (36 mm
	// over one pixel) is worked out.
	dot := filepath.Join(dir, "dot.png")
	one := simcam.Camera{W: 1, H: 1, Encoding: simcam.SRGB8}
	if data, err = one.Encode(simcam.Scene{Background: 0.5}); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(dot, data, 0o644); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name string
		args []string
		want string // substring of the one error line
		code int
	}{
		{"not an image", []string{"analyze", "--pitch-um", "5", "../../../testdata/bad/not-an-image.txt"}, "not a PNG, JPEG or TIFF", 1},
		{"truncated PNG", []string{"analyze", "--pitch-um", "5", "../../../testdata/bad/truncated.png"}, "truncated", 1},
		{"truncated JPEG", []string{"analyze", "--pitch-um", "5", "../../../testdata/bad/truncated.jpg"}, "JPEG", 1},
		{"no edge", []string{"analyze", "--pitch-um", "5", flat}, "no measurable edge", 1},
		{"missing file", []string{"analyze", "--pitch-um", "5", filepath.Join(dir, "nope.jpg")}, "cannot read", 1},
		{"no pitch", []string{"analyze", flat}, "pixel pitch is unknown", 1},
		{"bad tone", []string{"analyze", "--pitch-um", "5", "--tone", "sepia", flat}, "tone", 1},
		{"bad method", []string{"analyze", "--pitch-um", "5", "--method", "fast", flat}, "method", 1},
		{"1 x 1 px", []string{"analyze", "--sensor", "36x24", dot}, "1 x 1 px, too small to measure", 1},
		{"unknown command", []string{"measure"}, "unknown command", 2},
		{"no files", []string{"analyze", "--pitch-um", "5"}, "at least one photo", 2},
		{"bad sensor", []string{"analyze", "--sensor", "36by24", flat}, "--sensor", 2},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			out, errs, code := runCLI(c.args...)
			if code != c.code {
				t.Errorf("exit %d, want %d (stderr %q)", code, c.code, errs)
			}
			if strings.Count(errs, "\n") != 1 || !strings.Contains(errs, c.want) {
				t.Errorf("stderr %q, want one line containing %q", errs, c.want)
			}
			if out != "" {
				t.Errorf("stdout %q, want nothing", out)
			}
		})
	}
}

// TestHelpDashes: every command's help writes long options with two dashes,
// as its usage line and README do; one-letter options keep one.
func TestHelpDashes(t *testing.T) {
	long := regexp.MustCompile(`(?m)^  -[a-z][a-z0-9-]+`)
	for _, cmd := range []string{"analyze", "chart", "plan", "demo"} {
		out, _, _ := runCLI(cmd, "-h")
		if m := long.FindAllString(out, -1); len(m) > 0 {
			t.Errorf("%s -h lists %v with one dash", cmd, m)
		}
		if !strings.Contains(out, "\n  --") {
			t.Errorf("%s -h lists no --option:\n%s", cmd, out)
		}
	}
}

// TestAnalyzeSensorNames: analyze accepts every sensor name plan accepts
// (one table, core/plan Sensors) and sets the pitch to the width over the
// image width (320 px here; full frame, 36 mm wide by common practice,
// would give 112.5 um, beyond the 100 um the field accepts, so the small
// formats are used).
func TestAnalyzeSensorNames(t *testing.T) {
	path := edgePhoto(t, t.TempDir())
	for _, f := range plan.Sensors {
		if f.WMM/320*1000 > 100 {
			continue
		}
		out, errOut, code := runCLI("analyze", "--json", "--sensor", f.Name, path)
		if code != 0 {
			t.Fatalf("%s: exit %d: %s", f.Name, code, errOut)
		}
		var res struct {
			Images []struct {
				PitchUM float64 `json:"pitch_um"`
			} `json:"images"`
		}
		if err := json.Unmarshal([]byte(out), &res); err != nil || len(res.Images) != 1 || math.Abs(res.Images[0].PitchUM-f.WMM/320*1000) > 1e-9 {
			t.Errorf("%s: pitch %+v, %v; want %g um", f.Name, res, err, f.WMM/320*1000)
		}
	}
	if _, errOut, code := runCLI("analyze", "--sensor", "medium", path); code != 2 || !strings.Contains(errOut, "full-frame, aps-c") {
		t.Errorf("bad sensor name: exit %d, %q", code, errOut)
	}
}

// TestAnalyzeDNG: the tool reads a raw DNG and says how it measured it.
func TestAnalyzeDNG(t *testing.T) {
	cam := simcam.Camera{W: 320, H: 240, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: 1, Sigma2: 1}}}
	data, err := cam.EncodeDNG(simcam.HalfPlaneScene(320, 240, 5, 0.08, 0.7), simcam.DNG{Gains: [3]float64{0.5, 1, 0.7}, Lossless: true, TileW: 64, TileH: 64})
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "edge.dng")
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
	out, errs, code := runCLI("analyze", "--pitch-um", "4", path)
	if code != 0 || !strings.Contains(out, "raw: mosaic planes, no demosaicing") || !strings.Contains(out, "MTF50 by channel: R ") || !strings.Contains(out, "tone linear") {
		t.Errorf("exit %d: %s\n%s", code, errs, out)
	}
	out, _, code = runCLI("analyze", "--pitch-um", "4", "--json", path)
	var doc struct {
		Images []struct {
			Format string `json:"format"`
			Raw    struct {
				Code string `json:"code"`
			} `json:"raw"`
			Measurements []struct {
				Channels []struct {
					Channel string `json:"channel"`
				} `json:"channels"`
			} `json:"measurements"`
		} `json:"images"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil || code != 0 {
		t.Fatalf("exit %d, %v", code, err)
	}
	if im := doc.Images[0]; im.Format != "dng" || im.Raw.Code != "raw-mosaic-planes" || len(im.Measurements) == 0 || len(im.Measurements[0].Channels) != 3 {
		t.Errorf("JSON: %+v", im)
	}
}
