package field

import (
	"encoding/json"
	"math"
	"strconv"
)

// Number is a float64 written to JSON as null when it is not a finite number
// (a masked map cell, an MTF beyond the measured range). Finite values are
// written with at most 5 significant decimals after the point, enough for
// MTF (0..1) and lp/mm, and short enough for the page.
type Number float64

// MarshalJSON writes the number, or null for NaN and infinities.
func (n Number) MarshalJSON() ([]byte, error) {
	f := float64(n)
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return []byte("null"), nil
	}
	f = math.Round(f*1e5) / 1e5
	return strconv.AppendFloat(nil, f, 'g', -1, 64), nil
}

// UnmarshalJSON reads a number or null (as NaN).
func (n *Number) UnmarshalJSON(b []byte) error {
	if string(b) == "null" {
		*n = Number(math.NaN())
		return nil
	}
	var f float64
	if err := json.Unmarshal(b, &f); err != nil {
		return err
	}
	*n = Number(f)
	return nil
}

// numbers converts a float64 slice to Numbers.
func numbers(v []float64) []Number {
	out := make([]Number, len(v))
	for i, x := range v {
		out[i] = Number(x)
	}
	return out
}

// finite reports whether v is a finite number.
func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
