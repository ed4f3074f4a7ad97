package analyze

import (
	"bytes"
	"math"
	"strings"
	"testing"
)

func TestWriteCSV(t *testing.T) {
	res := Result{Images: []*Image{{
		File:      "a,b.jpg",
		FreqsLPMM: []float64{10, 2.5},
		Measurements: []Measurement{{
			Kind: "edge", ID: 3, XPx: 10.25, YPx: 20, HeightMM: 1.5, Orientation: "sagittal",
			NormalDeg: 95, MTF50: 0.25, MTF50P: Number(math.NaN()), MTF50LPMM: 62.5,
			MTFNyquist: 0.125, MTFAtFreqs: []Number{0.75, Number(math.Inf(1))}, SNR: 120,
			Warnings: []string{"noisy", "say \"hi\""},
			MTF50SE:  0.0031, MTFAtFreqsSE: []Number{0.0125, Number(math.NaN())},
			ChannelEdge: &ChannelEdge{RMinusGPx: 0.125, BMinusGPx: -0.5},
		}},
	}}}
	var buf bytes.Buffer
	if err := WriteCSV(&buf, res); err != nil {
		t.Fatal(err)
	}
	// Quoting follows RFC 4180, section 2 (fields holding commas or quotes
	// are quoted, quotes doubled); Go's strconv 'f' format rounds halves to
	// even on the exact binary value (10.25 -> "10.2").
	want := strings.Join([]string{
		"file,id,kind,x_px,y_px,height_mm,orientation,normal_deg,mtf50_cy_px,mtf50p_cy_px,mtf50_lp_mm,mtf_nyquist,mtf_at_10_lp_mm,mtf_at_2.5_lp_mm,snr,warnings,mtf50_se_cy_px,mtf_at_10_lp_mm_se,mtf_at_2.5_lp_mm_se,r_minus_g_px,b_minus_g_px",
		`"a,b.jpg",3,edge,10.2,20.0,1.500,sagittal,95.00,0.2500,n/a,62.50,0.1250,0.7500,n/a,120.0,"noisy; say ""hi""",0.0031,0.0125,n/a,0.1250,-0.5000`,
		"",
	}, "\n")
	if got := buf.String(); got != want {
		t.Fatalf("got\n%s\nwant\n%s", got, want)
	}
}
