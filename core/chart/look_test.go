package chart

import (
	"os"
	"path/filepath"
	"testing"

	"sagitta/core/internal/look"
)

// TestLookWrite writes the A4 and A3 charts (3:2) and the charts across 2 x 2
// and 3 x 3 A4 sheets (one page per sheet) as PDF to
// $SAGITTA_LOOK/chart for inspection, e.g. with pdftoppm (skipped unless
// SAGITTA_LOOK is set).
func TestLookWrite(t *testing.T) {
	dir := look.Need(t, "chart")
	for name, opt := range map[string]Options{"a4": {}, "a3": {Paper: "A3"}, "a4-2x2": {Sheets: "2x2"}, "a4-3x3": {Sheets: "3x3"}} {
		b, err := Render(opt, "pdf")
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(dir, name+".pdf"), b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
}
