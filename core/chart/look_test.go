package chart

import (
	"os"
	"testing"
)

func TestLookWrite(t *testing.T) {
	dir := os.Getenv("CHART_LOOK")
	if dir == "" {
		t.Skip("set CHART_LOOK=dir to write charts for inspection")
	}
	for _, c := range []struct {
		name string
		opt  Options
	}{
		{"a4", Options{}},
		{"a3", Options{Paper: "A3"}},
	} {
		b, err := Render(c.opt, "pdf")
		if err != nil {
			t.Fatal(err)
		}
		os.WriteFile(dir+"/"+c.name+".pdf", b, 0o644)
	}
}
