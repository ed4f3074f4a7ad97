package analyze

import (
	"sagitta/core/edge"
	"sagitta/core/exif"
	"sagitta/core/field"
)

// Result is what one call of the command-line tool prints: one entry per
// photo. Its JSON form is the contract in DESIGN.md; fields may be added,
// the documented ones stay.
type Result struct {
	Images []*Image `json:"images"`
}

// Image is the analysis of one photo.
type Image struct {
	File        string  `json:"file"`
	Width       int     `json:"width"`
	Height      int     `json:"height"`
	PitchUM     float64 `json:"pitch_um"`
	PitchSource string  `json:"pitch_source"` // "user", "sensor size" or "Exif focal-plane resolution"
	// PitchAssumed is true when the pitch comes from the fallback sensor
	// size (a guess), not from the user, a sensor size given or Exif.
	PitchAssumed bool       `json:"pitch_assumed"`
	CenterPx     [2]float64 `json:"center_px"`
	CornerMM     float64    `json:"corner_mm"` // largest image height in the frame, mm
	Format       string     `json:"format"`
	BitDepth     int        `json:"bit_depth"`
	Tone         string     `json:"tone"`
	ToneSource   string     `json:"tone_source"`
	Method       string     `json:"method"`
	FreqsLPMM    []float64  `json:"freqs_lp_mm"` // the field frequencies used for summaries
	Exif         exif.Tags  `json:"exif"`

	Measurements []Measurement `json:"measurements"`
	Rejected     []Rejected    `json:"rejected"`
	Warnings     []string      `json:"warnings"`
	// Exposure is advice on the photo's exposure (also among Warnings),
	// null when the exposure is fine (see ExposureAdvice).
	Exposure *ExposureAdvice `json:"exposure"`

	// Stars and Gratings detail the sine patterns behind the records of
	// kind "star" and "grating" (see sine.go); Agreement compares stars
	// with nearby edges (null when no star has edges near it).
	Stars     []StarInfo    `json:"stars"`
	Gratings  []GratingInfo `json:"gratings"`
	Agreement *Agreement    `json:"agreement"`

	// Summary describes sharpness across the frame (field curves, MTF50
	// map, astigmatism, balance); see field.Summary.
	Summary *field.Summary `json:"summary"`

	// Chart is set when the photo shows Sagitta's printed chart (chart.go).
	Chart *ChartResult `json:"chart,omitempty"`
}

// Measurement is one measured target (one edge, or one orientation of a
// star) in the contract's shape.
type Measurement struct {
	Kind        string            `json:"kind"` // "edge", "star" or "grating"
	ID          int               `json:"id"`
	XPx         float64           `json:"x_px"`
	YPx         float64           `json:"y_px"`
	HeightMM    float64           `json:"height_mm"`
	Orientation field.Orientation `json:"orientation"`
	// RadiusAngleDeg is the angle between the direction of measurement and
	// the radius (0 = tangential, 90 = sagittal).
	RadiusAngleDeg Number   `json:"radius_angle_deg"`
	NormalDeg      float64  `json:"normal_deg"`
	MTF50          Number   `json:"mtf50_cy_px"`
	MTF50P         Number   `json:"mtf50p_cy_px"`
	MTFNyquist     Number   `json:"mtf_nyquist"`
	MTF50LPMM      Number   `json:"mtf50_lp_mm"`
	MTFAtFreqs     []Number `json:"mtf_at_freqs"` // at Image.FreqsLPMM
	// MTFAtFreqsSE and MTF50SE are the standard errors of MTFAtFreqs and
	// MTF50 from the noise (mtf_std_err interpolated; MTF50's from the
	// error at the crossing over the curve's slope there).
	MTFAtFreqsSE []Number  `json:"mtf_at_freqs_se"`
	MTF50SE      Number    `json:"mtf50_se_cy_px"`
	Freq         []float64 `json:"freq_cy_px"`
	MTF          []float64 `json:"mtf"`
	Warnings     []string  `json:"warnings"`
	Flags        []string  `json:"flags"` // machine-readable quality flags behind the warnings

	Region    [4][2]float64 `json:"region_px"` // corners of the measured area
	LengthPx  float64       `json:"length_px"`
	SlantDeg  float64       `json:"slant_deg"`
	SNR       Number        `json:"snr"`
	Contrast  Number        `json:"contrast"` // light/dark ratio, linear
	Overshoot float64       `json:"overshoot"`
	// DarkLinear and LightLinear are an edge's plateau levels (linear,
	// 1 = full scale).
	DarkLinear  float64      `json:"dark_linear,omitempty"`
	LightLinear float64      `json:"light_linear,omitempty"`
	ESF         edge.Profile `json:"esf"`
	LSF         edge.Profile `json:"lsf"`
	// Sharpening (edges only) holds the physical signs of sharpening found
	// and the estimated lift of MTF50 (see edge.Sharpening).
	Sharpening *edge.Sharpening `json:"sharpening,omitempty"`

	// Sine-pattern records only (see sine.go).
	PatternID    int            `json:"pattern_id,omitempty"`     // id in Image.Stars or Image.Gratings
	MeasuredCyPx *[2]float64    `json:"measured_cy_px,omitempty"` // frequencies actually measured; outside, freq_cy_px holds no data
	StdErr       []float64      `json:"mtf_std_err,omitempty"`    // standard error of each mtf value (edges too)
	Agreement    *StarAgreement `json:"agreement,omitempty"`      // stars: against nearby edges

	// On Sagitta's chart (chart.go): the target's id ("sq12", "star0"), the
	// square's edge (1..4; see chart.Square), and the target centre's
	// designed position, in chart units (the chart's short side is 1,
	// origin at its centre) and as a fraction of the way from the chart's
	// centre to its corner. Grating records, which group several gratings,
	// are not tagged; Chart.Patterns names each grating's target.
	TargetID   string      `json:"target_id,omitempty"`
	TargetEdge int         `json:"target_edge,omitempty"`
	ChartXY    *[2]float64 `json:"chart_xy,omitempty"`
	ChartField *float64    `json:"chart_field,omitempty"`
}

// Rejected is a candidate that was not measured or whose measurement was
// set aside, with the reason.
type Rejected struct {
	X0     float64 `json:"x0_px"`
	Y0     float64 `json:"y0_px"`
	X1     float64 `json:"x1_px"`
	Y1     float64 `json:"y1_px"`
	Reason string  `json:"reason"`
}

// Number is a float64 written to JSON as null when it is not a finite
// number (an MTF50 beyond the measured range, an infinite SNR of a
// noise-free simulation); see field.Number.
type Number = field.Number
