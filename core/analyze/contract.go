package analyze

// The JSON contract: every type whose JSON the command-line tool prints
// (`sagitta analyze --json`), the page receives from the core, and
// Resummarise reads back, with the key of each field beside it. README's
// section "The JSON contract" points here. The domain packages (edge,
// sine, exif, chart, field) keep their own structs without JSON tags; this file
// converts them at the boundary (the mirror types at its end). Go names
// spell "centre"; the keys keep their historic "center_px" and
// "center_unc_px". The codes beside sentences are listed in core/note.
// (The printable chart's and the planner's options, read by the wasm glue,
// still carry their own tags in core/chart and core/plan.)

import (
	"sagitta/core/chart"
	"sagitta/core/curve"
	"sagitta/core/edge"
	"sagitta/core/exif"
	"sagitta/core/field"
	"sagitta/core/sine"
)

// Result is what one call of the command-line tool prints: one entry per
// photo. Its JSON form is the contract (README, "The JSON contract"); keys
// may be added, the documented ones stay.
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
	PitchFrom   string  `json:"pitch_from"`   // its code: "user", "sensor" or "exif" (core/note)
	// PitchAssumed is true when the pitch comes from the fallback sensor
	// size (a guess), not from the user, a sensor size given or Exif.
	PitchAssumed bool       `json:"pitch_assumed"`
	CentrePx     [2]float64 `json:"center_px"`
	CornerMM     float64    `json:"corner_mm"` // largest image height in the frame, mm
	Format       string     `json:"format"`
	BitDepth     int        `json:"bit_depth"`
	Tone         string     `json:"tone"`
	ToneSource   string     `json:"tone_source"`
	ToneFrom     string     `json:"tone_from"` // its code: "user", "file" or "default" (core/note)
	ToneFit      *ToneFit   `json:"tone_fit"`  // the tone curve read from the chart's grey steps (tone.go); null without them
	Method       string     `json:"method"`
	FreqsLPMM    []float64  `json:"freqs_lp_mm"` // the field frequencies used for summaries
	Exif         ExifTags   `json:"exif"`

	Measurements []Measurement `json:"measurements"`
	Rejected     []Rejected    `json:"rejected"` // "set aside" on the page and in the text report
	Warnings     []string      `json:"warnings"`
	WarningCodes []string      `json:"warning_codes"` // aligned with Warnings (core/note)
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
	Summary *Summary `json:"summary"`

	// Chart is set when the photo shows Sagitta's printed chart (chart.go).
	Chart *ChartResult `json:"chart,omitempty"`

	// Raw is set for a DNG: how its raw data were read and measured (raw.go).
	Raw *RawInfo `json:"raw,omitempty"`

	// LateralCA is the colour fringes across the frame, from where each
	// edge lies in red, green and blue (fringes.go); absent for grey photos.
	LateralCA *LateralCA `json:"lateral_ca,omitempty"`
	// Distortion and Falloff are the lens's radial distortion and light
	// fall-off, from Sagitta's chart (geometry.go); without the chart they
	// say why they were not measured. Absent in results made before them.
	Distortion *Distortion `json:"distortion,omitempty"`
	Falloff    *Falloff    `json:"falloff,omitempty"`
}

// Measurement is one measured target (one edge, or one orientation of a
// star) in the contract's shape.
type Measurement struct {
	Kind        string            `json:"kind"` // "edge", "star" or "grating"
	ID          int               `json:"id"`
	XPx         float64           `json:"x_px"`
	YPx         float64           `json:"y_px"`
	HeightMM    float64           `json:"height_mm"` // distance from the optical centre (mm)
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
	ESF       Profile       `json:"esf"`
	LSF       Profile       `json:"lsf"`
	// DarkLinear and LightLinear are an edge's plateau levels (linear,
	// 1 = full scale).
	DarkLinear  float64 `json:"dark_linear,omitempty"`
	LightLinear float64 `json:"light_linear,omitempty"`
	// Sharpening (edges only) holds the physical signs of sharpening found
	// and the estimated lift of MTF50 (edge.Sharpening).
	Sharpening *Sharpening `json:"sharpening,omitempty"`

	// Channels holds the edge measured on each colour plane: always for a
	// raw photo (raw.go; the record's own curve is then green's), on
	// request (Settings.Channels) for others (fringes.go).
	Channels []ChannelMTF `json:"channels,omitempty"`
	// ChannelEdge is where the edge lies in red and blue against green
	// (colour photos, edges only; fringes.go).
	ChannelEdge *ChannelEdge `json:"channel_edge,omitempty"`

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
	// On a chart across sheets: the number of the target's sheet ("1-2",
	// row-column) and where the target's centre lies on the assembled
	// chart, moved with its sheet (chart.Pose.Placed), chart units.
	Sheet    string      `json:"sheet,omitempty"`
	PlacedXY *[2]float64 `json:"placed_xy,omitempty"`
}

// Rejected is a candidate that was not measured or whose measurement was
// set aside, with the reason and its code (core/note).
type Rejected struct {
	X0         float64 `json:"x0_px"`
	Y0         float64 `json:"y0_px"`
	X1         float64 `json:"x1_px"`
	Y1         float64 `json:"y1_px"`
	Reason     string  `json:"reason"`
	ReasonCode string  `json:"reason_code"`
}

// Number is a float64 written to JSON as null when it is not a finite
// number (an MTF50 beyond the measured range, an infinite SNR of a
// noise-free simulation); see field.Number.
type Number = field.Number

// Settings are the user's choices for one analysis. The zero value is valid
// except that a pixel pitch must come from somewhere: PitchUM, SensorMM,
// the photo's Exif or FallbackSensorMM, in that order.
type Settings struct {
	PitchUM   float64     `json:"pitch_um,omitempty"`  // pixel pitch, micrometres
	SensorMM  [2]float64  `json:"sensor_mm,omitempty"` // sensor width and height, mm (pitch = width / image width)
	CentrePx  *[2]float64 `json:"center_px,omitempty"` // optical centre, px; nil = image centre
	Tone      string      `json:"tone,omitempty"`      // "", "srgb", "linear", "gamma:G"
	Method    string      `json:"method,omitempty"`    // "", "refined", "iso"
	FreqsLPMM []float64   `json:"freqs_lp_mm,omitempty"`
	MaxPixels int         `json:"max_pixels,omitempty"` // refuse larger photos; 0 = the decoder's default
	Workers   int         `json:"-"`                    // parallel measurements; 0 = GOMAXPROCS

	// FallbackSensorMM is the sensor size (mm) to assume when neither
	// PitchUM nor SensorMM is given and the photo's Exif gives no usable
	// pitch (the page's "read it from the file, else this format").
	FallbackSensorMM [2]float64 `json:"fallback_sensor_mm,omitempty"`

	// PrintDPI and ChartMM describe the printed chart (its printer
	// resolution and its short side in mm, as the sheet's text block gives
	// them): sine patterns are cut where the print holds no finer detail
	// (printlimit.go). 0 assumes the chart's default sheet (A4, 600 dpi).
	PrintDPI float64 `json:"print_dpi,omitempty"`
	ChartMM  float64 `json:"chart_mm,omitempty"`

	// Channels asks for each colour channel's MTF of every edge of a
	// colour photo (a raw photo's are always measured); where each edge
	// lies per channel is always measured (fringes.go).
	Channels bool `json:"channels,omitempty"`
}

// ChartResult is what the analysis learnt from a Sagitta chart in the
// photo: which chart, where, how it was photographed, and which of its
// targets were measured.
type ChartResult struct {
	Code string `json:"code"` // the chart code printed on the sheet, e.g. "S1-3:2-L"
	// Marks are the recognition marks read in the photo.
	Marks []FoundMark `json:"marks"`
	// Homography maps chart units (the chart's short side is 1, origin at
	// its centre, x right, y down) to image px, row-major 3 x 3.
	Homography chart.Homography `json:"homography"`
	Setup      Setup            `json:"setup"`
	// EdgesExpected counts the square edges that lie inside the photo;
	// EdgesIdentified those measured and tagged with their target.
	EdgesExpected   int `json:"edges_expected"`
	EdgesIdentified int `json:"edges_identified"`
	// Patterns names the chart target of each sine pattern the analysis
	// measured (Image.Stars and Image.Gratings, by their ids).
	Patterns []PatternTarget `json:"patterns"`
	// Missing lists the targets inside the photo that gave no measurement,
	// with the reason when one is known; OutsideFrame the targets that lie
	// (partly) outside the photo.
	Missing      []MissingTarget `json:"missing"`
	OutsideFrame []string        `json:"outside_frame"`
	// IgnoredOnMarks and IgnoredOnPatterns count the straight runs that
	// lie on the recognition marks (and the frame's corner marks and the
	// grey steps) or inside the sine patterns: they are parts of known
	// chart features, not candidate targets, and are left out of
	// Image.Rejected.
	IgnoredOnMarks    int `json:"ignored_on_marks"`
	IgnoredOnPatterns int `json:"ignored_on_patterns"`
	// Print is the print assumed to cut sine patterns at its limit
	// (printlimit.go).
	Print PrintInfo `json:"print"`
	// Sheets are the sheets of a chart across several (Code ends in
	// "-2x2" or "-3x3"), each with its own homography; Homography is then
	// the assembled chart's, fitted to all marks. Seams are the joins
	// between neighbouring sheets (chart.Seam); a join past the limits is
	// also a set-up warning (code setup-sheets-misaligned).
	Sheets []SheetResult `json:"sheets,omitempty"`
	Seams  []SeamResult  `json:"seams,omitempty"`
}

// SheetResult is one sheet of a chart across several, as found in the
// photo: its number ("row-column"), its own homography (chart units of
// the design to image px, row-major), and whether it was fitted to marks of
// its own (three or more) or is the assembled chart's.
type SheetResult struct {
	Sheet      string           `json:"sheet"`
	Homography chart.Homography `json:"homography"`
	Own        bool             `json:"own_pose"`
	Marks      int              `json:"marks"`
}

// SeamResult is the join between two neighbouring sheets (chart.Seam): the
// second sheet (right of or below the first) lies gap_mm farther across
// the seam than designed (negative: overlapping), slide_mm along it, and is
// turned turn_deg against the first.
type SeamResult struct {
	A       string  `json:"sheet_a"`
	B       string  `json:"sheet_b"`
	GapMM   float64 `json:"gap_mm"`
	SlideMM float64 `json:"slide_mm"`
	TurnDeg float64 `json:"turn_deg"`
}

// PatternTarget ties a measured sine pattern to its chart target.
type PatternTarget struct {
	Kind     string `json:"kind"` // "star" or "grating"
	ID       int    `json:"id"`   // in Image.Stars or Image.Gratings
	TargetID string `json:"target_id"`
}

// MissingTarget is a chart target (or one edge of a square) with no
// measurement.
type MissingTarget struct {
	TargetID   string `json:"target_id"`
	Edge       int    `json:"target_edge,omitempty"`
	Reason     string `json:"reason"`
	ReasonCode string `json:"reason_code"` // core/note
}

// StarInfo describes one measured star in the image JSON: where it is, how
// well it is located, and its per-segment curves for a polar plot.
type StarInfo struct {
	ID          int            `json:"id"`
	XPx         float64        `json:"x_px"`
	YPx         float64        `json:"y_px"`
	HeightMM    float64        `json:"height_mm"`
	CentreUncPx float64        `json:"center_unc_px"` // 1-sigma uncertainty of the centre, px
	Cycles      int            `json:"cycles"`
	RadiusPx    float64        `json:"radius_px"`
	InnerPx     float64        `json:"inner_px"` // smallest ring measured, px
	OuterPx     float64        `json:"outer_px"` // largest ring measured, px
	Modulation  float64        `json:"modulation"`
	RefFreq     float64        `json:"ref_freq_cy_px"`
	MaxFreq     float64        `json:"max_freq_cy_px"`
	Resolved    float64        `json:"resolved_cy_px"` // the modulation stays above 3 standard errors up to here
	AliasMod    float64        `json:"alias_modulation"`
	Segments    []Segment      `json:"segments"`
	Agreement   *StarAgreement `json:"agreement"` // against nearby edges; null when there are none
	Flags       []string       `json:"flags"`
	Warnings    []string       `json:"warnings"`
	Records     []int          `json:"records"` // ids of its measurement records
}

// GratingInfo describes one measured sine grating in the image JSON.
type GratingInfo struct {
	ID           int               `json:"id"`
	XPx          float64           `json:"x_px"`
	YPx          float64           `json:"y_px"`
	HeightMM     float64           `json:"height_mm"`
	Corners      [4][2]float64     `json:"corners_px"` // the area fitted
	FreqCyPx     float64           `json:"freq_cy_px"`
	DirectionDeg float64           `json:"direction_deg"`
	Orientation  field.Orientation `json:"orientation"`
	Modulation   float64           `json:"modulation"`
	ModStdErr    float64           `json:"modulation_std_err"`
	MTF          Number            `json:"mtf"` // Modulation / the reference's; null for the reference itself
	Reference    bool              `json:"reference"`
	Flags        []string          `json:"flags"`
}

// StarAgreement compares one star record with the edges of the same
// orientation at a similar image height.
type StarAgreement struct {
	Edges    int     `json:"edges"`     // edge records compared
	RMSDiff  float64 `json:"rms_diff"`  // rms of edge MTF - star MTF over the shared frequencies
	MeanDiff float64 `json:"mean_diff"` // mean of edge MTF - star MTF (positive: the edges read higher)
}

// Agreement is the per-photo figure of how well sine patterns and edges
// agree: the rms over all star records that have nearby edges of the
// difference between the edges' MTF (their mean) and the star's, at the
// shared frequencies between AgreeLoCyPx and AgreeHiCyPx.
type Agreement struct {
	Records  int     `json:"records"` // star records compared
	RMSDiff  float64 `json:"rms_diff"`
	MeanDiff float64 `json:"mean_diff"` // positive: edges read higher than stars
	LoCyPx   float64 `json:"lo_cy_px"`
	HiCyPx   float64 `json:"hi_cy_px"`
}

// Profile is a sampled curve across an edge (edge.Profile): x_px along the
// normal (0 at the edge, positive on the light side) and v, normalised to
// 0 (dark) and 1 (light) for the ESF, to a peak of 1 for the LSF.
type Profile struct {
	X []float64 `json:"x_px"`
	V []float64 `json:"v"`
}

// ExifTags are the Exif values Sagitta reads (exif.Tags; a zero value,
// left out of the JSON, means "not present").
type ExifTags struct {
	Make              string  `json:"make,omitempty"`
	Model             string  `json:"model,omitempty"`
	LensModel         string  `json:"lens_model,omitempty"`
	Orientation       int     `json:"orientation,omitempty"` // 1 = as stored .. 8 (TIFF 6.0, section 8)
	ExposureTimeS     float64 `json:"exposure_time_s,omitempty"`
	FNumber           float64 `json:"f_number,omitempty"`
	ExposureBiasEV    float64 `json:"exposure_bias_ev,omitempty"`
	FocalLengthMM     float64 `json:"focal_length_mm,omitempty"`
	FocalLength35MM   int     `json:"focal_length_35mm,omitempty"`
	ISO               int     `json:"iso,omitempty"`
	FocalPlaneXRes    float64 `json:"focal_plane_x_res,omitempty"` // sensor pixels per focal_plane_res_unit
	FocalPlaneYRes    float64 `json:"focal_plane_y_res,omitempty"`
	FocalPlaneResUnit int     `json:"focal_plane_res_unit,omitempty"` // 2 inch, 3 cm, 4 mm, 5 um
}

// Segment is one angular segment of a star (sine.Segment): the direction
// from the centre to its middle, the direction of measurement, its MTF
// curve and the standard error of each value.
type Segment struct {
	AngleDeg float64      `json:"angle_deg"`
	DirDeg   float64      `json:"dir_deg"`
	Curve    SegmentCurve `json:"curve"`
	StdErr   []float64    `json:"std_err"`
}

// SegmentCurve is a segment's MTF (curve.Curve): ascending frequencies in
// cycles/pixel and the values.
type SegmentCurve struct {
	Freq  []float64 `json:"freq_cy_px"`
	Value []float64 `json:"mtf"`
}

// FoundMark is one of the chart's recognition marks read in the photo
// (chart.FoundMark): which of the eight, the centre of its disc in image
// px, and the code sectors read wrongly and corrected.
type FoundMark struct {
	Index  int     `json:"index"`
	XPx    float64 `json:"x_px"`
	YPx    float64 `json:"y_px"`
	Errors int     `json:"sector_errors"`
}

// Setup is what the chart's pose says about the way the photo was taken
// (chart.Setup: the meaning and thresholds of each check are there).
type Setup struct {
	CoverPct      float64  `json:"frame_covered_pct"`
	VisiblePct    float64  `json:"chart_visible_pct"`
	RotationDeg   float64  `json:"rotation_deg"`
	KeystoneLRPct float64  `json:"keystone_left_right_pct"`
	KeystoneTBPct float64  `json:"keystone_top_bottom_pct"`
	OffCentrePct  float64  `json:"off_centre_pct"`
	TiltDeg       float64  `json:"tilt_deg,omitempty"`
	Warnings      []string `json:"warnings"`
	WarningCodes  []string `json:"warning_codes"` // aligned with Warnings (core/note)
}

// The conversions at the boundary. Struct conversions ignore tags, so a
// mirror with the same fields converts in one step; a field added on one
// side and not the other stops the build here.

func profileOf(p edge.Profile) Profile { return Profile(p) }

func exifOf(t exif.Tags) ExifTags { return ExifTags(t) }

// tags returns the Exif values as core/exif's type (for its methods).
func (t ExifTags) tags() exif.Tags { return exif.Tags(t) }

func segmentsOf(ss []sine.Segment) []Segment {
	if ss == nil {
		return nil
	}
	out := make([]Segment, len(ss))
	for i, s := range ss {
		out[i] = Segment{AngleDeg: s.AngleDeg, DirDeg: s.DirDeg, Curve: SegmentCurve(s.Curve), StdErr: s.StdErr}
	}
	return out
}

// segments returns the segments as core/sine's type.
func segments(ss []Segment) []sine.Segment {
	if ss == nil {
		return nil
	}
	out := make([]sine.Segment, len(ss))
	for i, s := range ss {
		out[i] = sine.Segment{AngleDeg: s.AngleDeg, DirDeg: s.DirDeg, Curve: curve.Curve(s.Curve), StdErr: s.StdErr}
	}
	return out
}

func marksOf(ms []chart.FoundMark) []FoundMark {
	if ms == nil {
		return nil
	}
	out := make([]FoundMark, len(ms))
	for i, m := range ms {
		out[i] = FoundMark{Index: m.Index, XPx: m.XPx, YPx: m.YPx, Errors: m.Errors}
	}
	return out
}

// marks returns the marks as core/chart's type.
func marks(ms []FoundMark) []chart.FoundMark {
	if ms == nil {
		return nil
	}
	out := make([]chart.FoundMark, len(ms))
	for i, m := range ms {
		out[i] = chart.FoundMark{Index: m.Index, XPx: m.XPx, YPx: m.YPx, Errors: m.Errors}
	}
	return out
}

func setupOf(s chart.Setup) Setup { return Setup(s) }

// Summary is the field summary (field.Summary, where each key is explained): sharpness
// across the frame.
type Summary struct {
	FreqsLPMM    []float64      `json:"freqs_lp_mm"`
	PitchUM      float64        `json:"pitch_um"`
	CentrePx     [2]float64     `json:"center_px"`
	WidthPx      int            `json:"width_px"`
	HeightPx     int            `json:"height_px"`
	CornerMM     float64        `json:"corner_mm"`
	Smoother     string         `json:"smoother"`
	Points       []SummaryPoint `json:"points"`
	Curves       []FieldCurve   `json:"curves"`
	MTF50Curves  []FieldCurve   `json:"mtf50_curves"`
	Astigmatism  []Astigmatism  `json:"astigmatism"`
	Map          *FieldMap      `json:"map"`
	Balance      Balance        `json:"balance"`
	Zones        []Zone         `json:"zones"`
	Cautions     []string       `json:"cautions"`
	Warnings     []string       `json:"warnings"`
	WarningCodes []string       `json:"warning_codes"`
}

// SummaryPoint is a measurement in the summary (field.SummaryPoint).
type SummaryPoint struct {
	ID          int               `json:"id"`
	Kind        string            `json:"kind"`
	XPx         float64           `json:"x_px"`
	YPx         float64           `json:"y_px"`
	HeightMM    float64           `json:"height_mm"`
	Orientation field.Orientation `json:"orientation"`
	MTF         []Number          `json:"mtf"`
	MTF50LPMM   Number            `json:"mtf50_lp_mm"`
	Weight      []Number          `json:"weight"`
}

// FieldCurve is a field curve (field.Curve): one quantity against image height.
type FieldCurve struct {
	Orientation field.Orientation `json:"orientation"`
	Quantity    string            `json:"quantity"`
	FreqLPMM    float64           `json:"freq_lp_mm"`
	Points      int               `json:"points"`
	HMinMM      float64           `json:"h_min_mm"`
	HMaxMM      float64           `json:"h_max_mm"`
	Span        float64           `json:"span"`
	Degree      int               `json:"degree"`
	ResidualSD  float64           `json:"residual_sd"`
	HeightMM    []float64         `json:"height_mm"`
	Value       []Number          `json:"value"`
	BandLo      []Number          `json:"band_lo"`
	BandHi      []Number          `json:"band_hi"`
}

// Astigmatism is the sagittal-tangential gap against height (field.Astigmatism).
type Astigmatism struct {
	FreqLPMM       float64   `json:"freq_lp_mm"`
	HeightMM       []float64 `json:"height_mm"`
	Gap            []Number  `json:"gap"`
	BandLo         []Number  `json:"band_lo"`
	BandHi         []Number  `json:"band_hi"`
	MaxGap         float64   `json:"max_gap"`
	MaxGapHeightMM float64   `json:"max_gap_height_mm"`
	MaxGapSE       float64   `json:"max_gap_se"`
	Notable        bool      `json:"notable"`
	Text           string    `json:"text"`
	Caution        string    `json:"caution"`
}

// FieldMap is MTF50 over the frame on a grid (field.Map).
type FieldMap struct {
	Cols           int      `json:"cols"`
	Rows           int      `json:"rows"`
	CellWPx        float64  `json:"cell_w_px"`
	CellHPx        float64  `json:"cell_h_px"`
	MTF50LPMM      []Number `json:"mtf50_lp_mm"`
	SagittalLPMM   []Number `json:"sagittal_lp_mm"`
	TangentialLPMM []Number `json:"tangential_lp_mm"`
	Min            float64  `json:"min_lp_mm"`
	Max            float64  `json:"max_lp_mm"`
	Points         int      `json:"points"`
	MaskDistancePx float64  `json:"mask_distance_px"`
	RadiusPx       float64  `json:"radius_px"`
	Method         string   `json:"method"`
}

// Balance compares opposite parts of the frame (field.Balance).
type Balance struct {
	Verdict      string        `json:"verdict"`
	Text         string        `json:"text"`
	Caution      string        `json:"caution"`
	FromHeightMM float64       `json:"from_height_mm"`
	Pairs        []BalancePair `json:"pairs"`
	Quarters     []PartOffset  `json:"quarters"`

	score float64
}

// BalancePair is one pair of opposite parts (field.BalancePair).
type BalancePair struct {
	A            string     `json:"a"`
	B            string     `json:"b"`
	ByFreq       []PairDiff `json:"by_freq"`
	BySagittal   []PairDiff `json:"by_freq_sagittal"`
	ByTangential []PairDiff `json:"by_freq_tangential"`
	Verdict      string     `json:"verdict"`
	Text         string     `json:"text"`
}

// PairDiff is a pair's difference at one frequency (field.PairDiff).
type PairDiff struct {
	FreqLPMM float64 `json:"freq_lp_mm"`
	Diff     Number  `json:"diff"`
	SE       Number  `json:"se"`
	NA       int     `json:"n_a"`
	NB       int     `json:"n_b"`
	Notable  bool    `json:"notable"`
}

// PartOffset is one quarter's offset (field.PartOffset).
type PartOffset struct {
	Part   string       `json:"part"`
	ByFreq []MeanOffset `json:"by_freq"`
}

// MeanOffset is a quarter's mean offset at one frequency (field.MeanOffset).
type MeanOffset struct {
	FreqLPMM float64 `json:"freq_lp_mm"`
	Offset   Number  `json:"offset"`
	SE       Number  `json:"se"`
	N        int     `json:"n"`
}

// The field summary at the boundary. Every struct but the four that hold
// others converts in one step.

func convert[S, T any](s []S, f func(S) T) []T {
	if s == nil {
		return nil
	}
	out := make([]T, len(s))
	for i := range s {
		out[i] = f(s[i])
	}
	return out
}

// SummaryOf converts the field summary to the contract's; nil stays nil.
func SummaryOf(s *field.Summary) *Summary {
	if s == nil {
		return nil
	}
	out := &Summary{
		FreqsLPMM: s.FreqsLPMM, PitchUM: s.PitchUM, CentrePx: s.CentrePx,
		WidthPx: s.WidthPx, HeightPx: s.HeightPx, CornerMM: s.CornerMM, Smoother: s.Smoother,
		Points:      convert(s.Points, func(p field.SummaryPoint) SummaryPoint { return SummaryPoint(p) }),
		Curves:      convert(s.Curves, func(c field.Curve) FieldCurve { return FieldCurve(c) }),
		MTF50Curves: convert(s.MTF50Curves, func(c field.Curve) FieldCurve { return FieldCurve(c) }),
		Astigmatism: convert(s.Astigmatism, func(a field.Astigmatism) Astigmatism { return Astigmatism(a) }),
		Balance: Balance{
			Verdict: s.Balance.Verdict, Text: s.Balance.Text, Caution: s.Balance.Caution, FromHeightMM: s.Balance.FromHeightMM,
			Pairs: convert(s.Balance.Pairs, func(p field.BalancePair) BalancePair {
				d := func(d field.PairDiff) PairDiff { return PairDiff(d) }
				return BalancePair{A: p.A, B: p.B, Verdict: p.Verdict, Text: p.Text,
					ByFreq: convert(p.ByFreq, d), BySagittal: convert(p.BySagittal, d), ByTangential: convert(p.ByTangential, d)}
			}),
			Quarters: convert(s.Balance.Quarters, func(q field.PartOffset) PartOffset {
				return PartOffset{Part: q.Part, ByFreq: convert(q.ByFreq, func(m field.MeanOffset) MeanOffset { return MeanOffset(m) })}
			}),
		},
		Zones:    convert(s.Zones, func(z field.Zone) Zone { return Zone(z) }),
		Cautions: s.Cautions, Warnings: s.Warnings, WarningCodes: s.WarningCodes,
	}
	if s.Map != nil {
		m := FieldMap(*s.Map)
		out.Map = &m
	}
	return out
}

// Sharpening is what an edge shows of sharpening (edge.Sharpening, where
// each is explained): the signs found ("negative-lobes", "rise",
// "above-diffraction-limit"), the deepest lobe in standard errors and as a
// fraction of the step, and the estimated lift of MTF50.
type Sharpening struct {
	Signs     []string `json:"signs"`
	LobeZ     float64  `json:"lobe_z"`
	LobeDepth float64  `json:"lobe_depth"`
	MTF50Lift float64  `json:"mtf50_lift"`
}

// Zone is one third of the distance from the optical centre to the
// farthest corner with its median figures (field.Zone, where each is
// explained): the numbers of the page's Compare table and of an aperture
// series.
type Zone struct {
	Name       string   `json:"name"`
	FromMM     float64  `json:"from_mm"`
	ToMM       float64  `json:"to_mm"`
	All        []Number `json:"all"`
	Sagittal   []Number `json:"sagittal"`
	Tangential []Number `json:"tangential"`
	N          []int    `json:"n"`
	AllSE      []Number `json:"all_se"`
	MTF50LPMM  Number   `json:"mtf50_lp_mm"`
	MTF50SE    Number   `json:"mtf50_se"`
	MTF50N     int      `json:"mtf50_n"`
}

// Field converts the contract's summary back to core/field's (core/plot
// draws from it); nil stays nil.
func (s *Summary) Field() *field.Summary {
	if s == nil {
		return nil
	}
	out := &field.Summary{
		FreqsLPMM: s.FreqsLPMM, PitchUM: s.PitchUM, CentrePx: s.CentrePx,
		WidthPx: s.WidthPx, HeightPx: s.HeightPx, CornerMM: s.CornerMM, Smoother: s.Smoother,
		Points:      convert(s.Points, func(p SummaryPoint) field.SummaryPoint { return field.SummaryPoint(p) }),
		Curves:      convert(s.Curves, func(c FieldCurve) field.Curve { return field.Curve(c) }),
		MTF50Curves: convert(s.MTF50Curves, func(c FieldCurve) field.Curve { return field.Curve(c) }),
		Astigmatism: convert(s.Astigmatism, func(a Astigmatism) field.Astigmatism { return field.Astigmatism(a) }),
		Balance: field.Balance{
			Verdict: s.Balance.Verdict, Text: s.Balance.Text, Caution: s.Balance.Caution, FromHeightMM: s.Balance.FromHeightMM,
			Pairs: convert(s.Balance.Pairs, func(p BalancePair) field.BalancePair {
				d := func(d PairDiff) field.PairDiff { return field.PairDiff(d) }
				return field.BalancePair{A: p.A, B: p.B, Verdict: p.Verdict, Text: p.Text,
					ByFreq: convert(p.ByFreq, d), BySagittal: convert(p.BySagittal, d), ByTangential: convert(p.ByTangential, d)}
			}),
			Quarters: convert(s.Balance.Quarters, func(q PartOffset) field.PartOffset {
				return field.PartOffset{Part: q.Part, ByFreq: convert(q.ByFreq, func(m MeanOffset) field.MeanOffset { return field.MeanOffset(m) })}
			}),
		},
		Zones:    convert(s.Zones, func(z Zone) field.Zone { return field.Zone(z) }),
		Cautions: s.Cautions, Warnings: s.Warnings, WarningCodes: s.WarningCodes,
	}
	if s.Map != nil {
		m := field.Map(*s.Map)
		out.Map = &m
	}
	return out
}

// Distortion is the lens's radial distortion (core/distortion): the model
// r_d = r_u (1 + k1 s^2 + k2 s^4), s the ideal image height over the
// frame's half-diagonal, fitted with the chart's homography to the located
// targets' centres (or, without the chart, to long straight edges).
// When it is not measured Measured is false, Reason and ReasonCode say
// why, the lists are absent and the numbers 0.
type Distortion struct {
	Measured   bool    `json:"measured"`
	Source     string  `json:"source,omitempty"` // "chart", or "edges" (long straight edges, without the chart)
	Reason     string  `json:"reason,omitempty"`
	ReasonCode string  `json:"reason_code,omitempty"` // core/note
	K1         float64 `json:"k1,omitempty"`
	K2         float64 `json:"k2,omitempty"`
	// HalfDiagonalPx is the unit of the heights' fractions.
	HalfDiagonalPx float64 `json:"half_diagonal_px,omitempty"`
	// The curve, from the optical centre to the farthest corner: image
	// height in mm and in fractions of the half-diagonal, and the radial
	// displacement there in per cent of the ideal height (negative: barrel).
	HeightMM        []float64 `json:"height_mm,omitempty"`
	HeightFrac      []float64 `json:"height_frac,omitempty"`
	DisplacementPct []float64 `json:"displacement_pct,omitempty"`
	CornerPct       float64   `json:"corner_pct"`
	LongEdgePct     float64   `json:"long_edge_pct"` // at the far end of the long axis
	// Kind is "negligible", "barrel", "pincushion" or "moustache"; Text
	// says it in words; Code is its note code.
	Kind         string   `json:"kind,omitempty"`
	Text         string   `json:"text,omitempty"`
	Code         string   `json:"code,omitempty"`
	ResidualPx   float64  `json:"residual_px"`     // rms distance of the targets from the model
	Points       int      `json:"points"`          // targets (or edge pieces) used
	Lines        int      `json:"lines,omitempty"` // long straight edges used (source "edges")
	Cautions     []string `json:"cautions,omitempty"`
	CautionCodes []string `json:"caution_codes,omitempty"` // aligned with Cautions (core/note)
	// Targets are the located targets the fit used or dropped.
	Targets []DistortionTarget `json:"targets,omitempty"`
}

// DistortionTarget is one chart target located for the distortion fit.
type DistortionTarget struct {
	Kind     string     `json:"kind"` // "square" (centre from its four edges), "mark" or "star"
	TargetID string     `json:"target_id"`
	XPx      float64    `json:"x_px"`
	YPx      float64    `json:"y_px"`
	ChartXY  [2]float64 `json:"chart_xy"` // designed centre, chart units
	// HeightFrac and HeightMM are its ideal image height; DisplacementPct
	// its own radial displacement (null near the centre).
	HeightFrac      float64 `json:"height_frac"`
	HeightMM        float64 `json:"height_mm"`
	DisplacementPct Number  `json:"displacement_pct"`
	ResidualPx      float64 `json:"residual_px"`
	Used            bool    `json:"used"`
}

// Falloff is the lens's light fall-off (core/falloff): blank paper sampled
// between the chart's targets, its level relative to the centre in stops
// (EV) as a curve against image height and a coarse map. When it is not
// measured Measured is false, Reason and ReasonCode say why, the curve and
// map are absent and the numbers 0 (Patches stay, if any were sampled).
type Falloff struct {
	Measured   bool   `json:"measured"`
	Reason     string `json:"reason,omitempty"`
	ReasonCode string `json:"reason_code,omitempty"` // core/note
	// The curve (even polynomial in the height): image height in mm and
	// in fractions of the half-diagonal, EV relative to the centre.
	HeightMM     []float64   `json:"height_mm,omitempty"`
	HeightFrac   []float64   `json:"height_frac,omitempty"`
	EV           []float64   `json:"ev,omitempty"`
	CornerEV     float64     `json:"corner_ev"`
	LongEdgeEV   float64     `json:"long_edge_ev"`
	ResidualEV   float64     `json:"residual_ev"` // rms of the patches about the curve
	Points       int         `json:"points"`      // patches used
	UnevenEV     float64     `json:"uneven_ev"`   // largest left-right or top-bottom difference at equal heights
	Map          *FalloffMap `json:"map,omitempty"`
	Cautions     []string    `json:"cautions,omitempty"`
	CautionCodes []string    `json:"caution_codes,omitempty"` // aligned with Cautions (core/note)
	// Patches are the paper patches sampled: centre, mean linear level
	// (the measurement itself), height and EV relative to the centre.
	Patches []FalloffPatch `json:"patches,omitempty"`
}

// FalloffMap is the fall-off over the frame: Cols x Rows cells, row by row
// from the top left, each the median EV of its patches (null if none).
type FalloffMap struct {
	Cols    int      `json:"cols"`
	Rows    int      `json:"rows"`
	CellWPx float64  `json:"cell_w_px"`
	CellHPx float64  `json:"cell_h_px"`
	EV      []Number `json:"ev"`
}

// FalloffPatch is one patch of blank paper.
type FalloffPatch struct {
	XPx        float64 `json:"x_px"`
	YPx        float64 `json:"y_px"`
	Level      float64 `json:"level"` // mean linear level
	HeightFrac float64 `json:"height_frac"`
	HeightMM   float64 `json:"height_mm"`
	EV         Number  `json:"ev"` // null when clipped
}
