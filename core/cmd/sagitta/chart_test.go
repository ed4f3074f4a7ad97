package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"sagitta/core/plan"
)

// TestChartCommand writes the chart in each format named by the extension
// and checks each file's signature (PDF: "%PDF-", ISO 32000-1 §7.5.2; SVG:
// an <svg element; PNG: the 8-byte signature, ISO/IEC 15948 §5.2).
func TestChartCommand(t *testing.T) {
	dir := t.TempDir()
	for _, c := range []struct {
		file, head string
	}{
		{"c.pdf", "%PDF-"},
		{"c.svg", "<svg"},
		{"c.PNG", "\x89PNG\r\n\x1a\n"},
	} {
		var out, errb bytes.Buffer
		path := filepath.Join(dir, c.file)
		code := run([]string{"chart", "--paper", "A4", "--dpi", "100", "-o", path}, &out, &errb)
		if code != 0 {
			t.Fatalf("%s: exit %d: %s", c.file, code, errb.String())
		}
		b, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.HasPrefix(b, []byte(c.head)) {
			t.Errorf("%s starts %q, want %q", c.file, b[:min(len(b), 8)], c.head)
		}
		if !strings.Contains(out.String(), "S1-3:2-L") {
			t.Errorf("%s: summary %q lacks the chart code", c.file, out.String())
		}
	}
}

func TestChartCommandErrors(t *testing.T) {
	dir := t.TempDir()
	for _, c := range []struct {
		args []string
		code int
		want string
	}{
		{[]string{"chart"}, 2, "output file"},
		{[]string{"chart", "-o", filepath.Join(dir, "c.tiff")}, 2, ".pdf, .svg or .png"},
		{[]string{"chart", "--paper", "B5", "-o", filepath.Join(dir, "c.pdf")}, 1, "unknown paper"},
		{[]string{"chart", "--paper", "20x30", "-o", filepath.Join(dir, "c.pdf")}, 1, "custom sheet"},
		{[]string{"plan", "--sensor", "36x24"}, 2, "--focal-mm"},
		{[]string{"plan", "--focal-mm", "50", "--sensor", "big"}, 1, "sensor"},
	} {
		var out, errb bytes.Buffer
		code := run(c.args, &out, &errb)
		msg := errb.String()
		if code != c.code || !strings.Contains(msg, c.want) || strings.Count(msg, "\n") != 1 {
			t.Errorf("%q: exit %d, stderr %q; want exit %d and one line with %q", c.args, code, msg, c.code, c.want)
		}
	}
}

// TestPlanCommand: the JSON plan of the worked example in core/plan
// (f = 50 mm, 36 x 24 mm, chart 360 x 240 mm: m = 0.1, u = 550 mm) and the
// text form's key lines.
func TestPlanCommand(t *testing.T) {
	var out, errb bytes.Buffer
	code := run([]string{"plan", "--focal-mm", "50", "--sensor", "36x24", "--chart-mm", "360x240", "--pitch-um", "6", "--json"}, &out, &errb)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errb.String())
	}
	var p plan.Plan
	if err := json.Unmarshal(out.Bytes(), &p); err != nil {
		t.Fatal(err)
	}
	if math.Abs(p.Magnification-0.1) > 1e-12 || math.Abs(p.ObjectDistanceMM-550) > 1e-9 {
		t.Errorf("m = %g, u = %g mm; want 0.1 and 550 mm", p.Magnification, p.ObjectDistanceMM)
	}
	out.Reset()
	code = run([]string{"plan", "--focal-mm", "50", "--sensor", "full-frame", "--paper", "A3", "--pixels", "6000x4000"}, &out, &errb)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errb.String())
	}
	for _, want := range []string{"Magnification:", "from the lens to the chart", "30 lp/mm on the sensor is", "Nyquist:", "Verdict:"} {
		if !strings.Contains(out.String(), want) {
			t.Errorf("plan text lacks %q:\n%s", want, out.String())
		}
	}
}
