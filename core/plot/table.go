package plot

import (
	"bytes"
	"encoding/csv"
	"math"
	"strconv"
)

// Table is the data behind a plot, for screen readers (the page renders it
// as an HTML table next to the picture) and for export as CSV. Every cell
// is text; numbers are formatted with the precision they carry and missing
// values are empty cells.
type Table struct {
	// Caption says what the table holds.
	Caption string `json:"caption"`
	// Columns are the column headers, with units.
	Columns []string `json:"columns"`
	// Rows hold one record each, with len(Columns) cells.
	Rows [][]string `json:"rows"`
}

// CSV returns the table as CSV (RFC 4180): the header row, then the rows.
func (t Table) CSV() []byte {
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	w.Write(t.Columns)
	for _, r := range t.Rows {
		w.Write(r)
	}
	w.Flush() // writing to a bytes.Buffer cannot fail
	return b.Bytes()
}

// cell formats v with d decimals, or "" when it is not finite.
func cell(v float64, d int) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return ""
	}
	if d >= 0 {
		v = math.Round(v*math.Pow10(d)) / math.Pow10(d)
		if v == 0 {
			v = 0 // no "-0"
		}
	}
	return strconv.FormatFloat(v, 'f', d, 64)
}

// fnum formats v compactly ("10", "2.5") for labels.
func fnum(v float64) string {
	return strconv.FormatFloat(math.Round(v*1000)/1000, 'f', -1, 64)
}
