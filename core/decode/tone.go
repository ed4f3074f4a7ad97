package decode

import (
	"errors"
	"fmt"
	"math"
	"sagitta/core/decode/srgb"
	"strconv"
	"strings"
	"sync"
)

// ToneKind says how code values map to linear light.
type ToneKind int

// Tone kinds. The zero value is ToneAuto.
const (
	// ToneAuto uses what the file declares (a PNG gAMA, sRGB or iCCP
	// chunk) and sRGB otherwise.
	ToneAuto ToneKind = iota
	// ToneSRGB is the sRGB decoding of IEC 61966-2-1.
	ToneSRGB
	// ToneLinear means the code values are already linear: L = V.
	ToneLinear
	// ToneGamma is a pure power law, L = V^Gamma.
	ToneGamma
)

// Limits of a user-given decoding gamma.
const (
	MinGamma = 0.2
	MaxGamma = 5.0
)

// Tone is a decoding tone curve. Gamma is used only by ToneGamma. The zero
// value is ToneAuto. Tone marshals to and from the text ParseTone accepts.
type Tone struct {
	Kind  ToneKind
	Gamma float64
}

// Convenience values.
var (
	Auto   = Tone{Kind: ToneAuto}
	SRGB   = Tone{Kind: ToneSRGB}
	Linear = Tone{Kind: ToneLinear}
)

// Gamma returns the power-law tone L = V^g.
func Gamma(g float64) Tone { return Tone{Kind: ToneGamma, Gamma: g} }

var errTone = errors.New(`decode: tone must be "auto", "srgb", "linear" or "gamma:G" with G in [0.2, 5]`)

// ParseTone reads a tone from its text form: "" or "auto", "srgb",
// "linear", or "gamma:G" with G a decimal number in [MinGamma, MaxGamma]
// (for example "gamma:2.2"). Case and surrounding spaces are ignored.
func ParseTone(s string) (Tone, error) {
	s = strings.ToLower(strings.TrimSpace(s))
	switch s {
	case "", "auto":
		return Auto, nil
	case "srgb":
		return SRGB, nil
	case "linear":
		return Linear, nil
	}
	rest, ok := strings.CutPrefix(s, "gamma:")
	if !ok {
		return Tone{}, fmt.Errorf("%w, not %q", errTone, s)
	}
	g, err := strconv.ParseFloat(strings.TrimSpace(rest), 64)
	t := Gamma(g)
	if err != nil || t.Check() != nil {
		return Tone{}, fmt.Errorf("%w, not %q", errTone, s)
	}
	return t, nil
}

// String returns the text form ParseTone reads: "auto", "srgb", "linear" or
// "gamma:G" with G in the shortest decimal that reads back exactly.
func (t Tone) String() string {
	switch t.Kind {
	case ToneAuto:
		return "auto"
	case ToneSRGB:
		return "srgb"
	case ToneLinear:
		return "linear"
	case ToneGamma:
		return "gamma:" + strconv.FormatFloat(t.Gamma, 'g', -1, 64)
	}
	return fmt.Sprintf("ToneKind(%d)", int(t.Kind))
}

// Check reports an error for an unknown kind or a gamma outside
// [MinGamma, MaxGamma].
func (t Tone) Check() error {
	switch t.Kind {
	case ToneAuto, ToneSRGB, ToneLinear:
		return nil
	case ToneGamma:
		if t.Gamma >= MinGamma && t.Gamma <= MaxGamma {
			return nil
		}
		return fmt.Errorf("decode: gamma %v outside [%v, %v]", t.Gamma, MinGamma, MaxGamma)
	}
	return fmt.Errorf("decode: unknown tone kind %d", int(t.Kind))
}

// MarshalText implements encoding.TextMarshaler.
func (t Tone) MarshalText() ([]byte, error) { return []byte(t.String()), nil }

// UnmarshalText implements encoding.TextUnmarshaler with ParseTone.
func (t *Tone) UnmarshalText(b []byte) error {
	v, err := ParseTone(string(b))
	if err != nil {
		return err
	}
	*t = v
	return nil
}

// Linearize returns the linear value of a normalised code value V in
// [0, 1] (code value / largest code value) under tone t. ToneAuto is
// treated as sRGB. Full scale (V = 1) gives exactly 1 for every tone.
func (t Tone) Linearize(v float64) float64 {
	v = math.Min(math.Max(v, 0), 1)
	switch t.Kind {
	case ToneLinear:
		return v
	case ToneGamma:
		return math.Pow(v, t.Gamma)
	}
	return srgb.ToLinear(v)
}

// Lookup tables, one per distinct tone, built once each and shared. Gamma
// tones with arbitrary exponents are cached up to maxCachedTones; beyond
// that tables are built per call (a long browser session must not grow its
// memory, which WebAssembly never gives back).
const maxCachedTones = 16

type tables struct {
	once8, once16 sync.Once
	t8            *[256]float32
	t16           *[65536]float32
}

var (
	tablesMu sync.Mutex
	tableMap = map[Tone]*tables{}
)

func tablesFor(t Tone) *tables {
	if t.Kind == ToneAuto {
		t = SRGB
	}
	if t.Kind != ToneGamma {
		t.Gamma = 0
	}
	tablesMu.Lock()
	defer tablesMu.Unlock()
	e := tableMap[t]
	if e == nil {
		e = &tables{}
		if len(tableMap) < maxCachedTones {
			tableMap[t] = e
		}
	}
	return e
}

// lut8 returns the linear value of each 8-bit code value under t.
func (t Tone) lut8() *[256]float32 {
	e := tablesFor(t)
	e.once8.Do(func() {
		e.t8 = new([256]float32)
		for i := range e.t8 {
			e.t8[i] = float32(t.Linearize(float64(i) / 255))
		}
	})
	return e.t8
}

// lut16 returns the linear value of each 16-bit code value under t.
func (t Tone) lut16() *[65536]float32 {
	e := tablesFor(t)
	e.once16.Do(func() {
		e.t16 = new([65536]float32)
		for i := range e.t16 {
			e.t16[i] = float32(t.Linearize(float64(i) / 65535))
		}
	})
	return e.t16
}
