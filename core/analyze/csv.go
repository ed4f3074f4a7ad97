package analyze

import (
	"encoding/csv"
	"io"
	"math"
	"strconv"
	"strings"
)

// WriteCSV writes one row per measurement of res, after a header row:
//
//	file, id, kind, x_px, y_px, height_mm, orientation, normal_deg,
//	mtf50_cy_px, mtf50p_cy_px, mtf50_lp_mm, mtf_nyquist,
//	mtf_at_F_lp_mm for each field frequency F of the first image, snr, warnings,
//	mtf50_se_cy_px, mtf_at_F_lp_mm_se for each F (standard errors),
//	r_minus_g_px, b_minus_g_px (where the edge lies in red and in blue
//	against green, along normal_deg; n/a for grey photos and sine patterns)
//
// Numbers have fixed decimals; values that are not finite are written "n/a".
// The command-line tool (`sagitta analyze --csv`) and the web page both call
// it, so their files are identical.
func WriteCSV(w io.Writer, res Result) error {
	cw := csv.NewWriter(w)
	head := []string{"file", "id", "kind", "x_px", "y_px", "height_mm", "orientation", "normal_deg",
		"mtf50_cy_px", "mtf50p_cy_px", "mtf50_lp_mm", "mtf_nyquist"}
	var freqs []float64
	if len(res.Images) > 0 {
		freqs = res.Images[0].FreqsLPMM
	}
	for _, f := range freqs {
		head = append(head, "mtf_at_"+strconv.FormatFloat(f, 'g', -1, 64)+"_lp_mm")
	}
	head = append(head, "snr", "warnings", "mtf50_se_cy_px")
	for _, f := range freqs {
		head = append(head, "mtf_at_"+strconv.FormatFloat(f, 'g', -1, 64)+"_lp_mm_se")
	}
	head = append(head, "r_minus_g_px", "b_minus_g_px")
	if err := cw.Write(head); err != nil {
		return err
	}
	for _, img := range res.Images {
		for _, m := range img.Measurements {
			row := []string{img.File, strconv.Itoa(m.ID), m.Kind, fixed(m.XPx, 1), fixed(m.YPx, 1),
				fixed(m.HeightMM, 3), string(m.Orientation), fixed(m.NormalDeg, 2),
				fixed(float64(m.MTF50), 4), fixed(float64(m.MTF50P), 4), fixed(float64(m.MTF50LPMM), 2),
				fixed(float64(m.MTFNyquist), 4)}
			for _, v := range m.MTFAtFreqs {
				row = append(row, fixed(float64(v), 4))
			}
			row = append(row, fixed(float64(m.SNR), 1), strings.Join(m.Warnings, "; "), fixed(float64(m.MTF50SE), 4))
			for k := range freqs {
				v := math.NaN()
				if k < len(m.MTFAtFreqsSE) {
					v = float64(m.MTFAtFreqsSE[k])
				}
				row = append(row, fixed(v, 4))
			}
			rg, bg := math.NaN(), math.NaN()
			if c := m.ChannelEdge; c != nil {
				rg, bg = c.RMinusGPx, c.BMinusGPx
			}
			row = append(row, fixed(rg, 4), fixed(bg, 4))
			if err := cw.Write(row); err != nil {
				return err
			}
		}
	}
	cw.Flush()
	return cw.Error()
}

// fixed formats v with d decimals, or "n/a" when it is not finite.
func fixed(v float64, d int) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "n/a"
	}
	return strconv.FormatFloat(v, 'f', d, 64)
}
