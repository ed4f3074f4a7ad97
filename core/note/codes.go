package note

// Every code the core gives beside a sentence, by where it appears in the
// JSON of `sagitta analyze --json` (README, "The JSON contract"). A key
// "warnings" (or "reason") has its codes in "warning_codes" (or
// "reason_code") beside it, aligned one for one.

// Photo warnings: the file's, in Image.warnings (core/decode).
const (
	// AlphaIgnored: the file has an alpha channel; colour values were used
	// as stored, nothing composited.
	AlphaIgnored Code = "alpha-ignored"
	// ICCNotRead: a PNG carries an ICC profile, which is not read; the
	// photo was decoded as sRGB.
	ICCNotRead Code = "icc-not-read"
	// GammaIgnored: a PNG's gAMA chunk gives a decoding gamma outside the
	// accepted range; it was ignored.
	GammaIgnored Code = "gamma-ignored"
	// GammaZero: a PNG's gAMA chunk holds 0; it was ignored.
	GammaZero Code = "gamma-zero"
	// NoToneCurve: a 16-bit file declares no tone curve and was decoded as
	// sRGB (it may hold linear data).
	NoToneCurve Code = "no-tone-curve"
	// ExifUnreadable: the Exif block could not be read; the pixels are
	// analysed all the same.
	ExifUnreadable Code = "exif-unreadable"
	// OrientationNotApplied: Exif asks for a turn or mirror; the pixels are
	// analysed as stored.
	OrientationNotApplied Code = "orientation-not-applied"
)

// Chart warnings: the search for Sagitta's chart, in Image.warnings, and
// its set-up checks, in chart.setup.warnings (and again in Image.warnings).
const (
	// ChartFewMarks: some of the chart's marks were read, too few to place
	// it.
	ChartFewMarks Code = "chart-few-marks"
	// ChartMarksDisagree: the marks read do not fit one chart (two charts,
	// or a damaged mark).
	ChartMarksDisagree Code = "chart-marks-disagree"
	// ChartOneSheet: the marks read are those of one sheet of a chart
	// across sheets (core/chart, photo_tiles.go); the whole assembled chart
	// must be in the photo.
	ChartOneSheet Code = "chart-one-sheet"
	// SetupCover: the chart fills too little of the frame.
	SetupCover Code = "setup-cover"
	// SetupCutOff: part of the chart lies outside the frame.
	SetupCutOff Code = "setup-cut-off"
	// SetupRotated: the chart is turned in the frame.
	SetupRotated Code = "setup-rotated"
	// SetupNotSquare: the chart's left and right sides are at different
	// distances (keystone left/right).
	SetupNotSquare Code = "setup-not-square"
	// SetupTilted: the chart's top and bottom are at different distances
	// (keystone top/bottom).
	SetupTilted Code = "setup-tilted"
	// SetupOffCentre: the chart's centre is away from the frame's centre.
	SetupOffCentre Code = "setup-off-centre"
	// SetupSheetsMisaligned: two neighbouring sheets of a chart across
	// sheets are hung apart, overlapping, shifted or turned against each
	// other by more than the seam limits (core/chart, photo_tiles.go).
	SetupSheetsMisaligned Code = "setup-sheets-misaligned"
)

// Analysis warnings, in Image.warnings.
const (
	// StarsEdgesDisagree: sine stars and nearby edges measure different
	// MTF (see Image.agreement).
	StarsEdgesDisagree Code = "stars-edges-disagree"
	// NoEdges: only sine patterns were measured; no edge.
	NoEdges Code = "no-edges"
)

// Summary warnings, in summary.warnings (core/field).
const (
	// NoFieldCurve: too few measurements of one orientation over a range
	// of heights for a field curve at one frequency.
	NoFieldCurve Code = "no-field-curve"
)

// Reasons a candidate was set aside, in rejected[].reason_code; a chart
// target with no measurement takes the reason of a candidate set aside on
// it, in chart.missing[].reason_code.
const (
	// TooShort: the straight run is too short to measure.
	TooShort Code = "too-short"
	// NotStraight: the run is not straight.
	NotStraight Code = "not-straight"
	// Crowded: the run is too close to other detail.
	Crowded Code = "crowded"
	// NearBorder: the run is too close to the image border.
	NearBorder Code = "near-border"
	// NoCleanEdge: the region gave no clean edge when measured.
	NoCleanEdge Code = "no-clean-edge"
	// Clipped: one side of the edge reaches the limit of the file's values.
	Clipped Code = "clipped"
	// Curved: the edge bows too much to be taken as straight.
	Curved Code = "curved"
	// StarTooSmall: a sine star too small for its number of cycles.
	StarTooSmall Code = "star-too-small"
)

// Reasons a chart target has no measurement when no candidate was set
// aside on it, in chart.missing[].reason_code.
const (
	// NotFound: no edge was found on the square's side.
	NotFound Code = "not-found"
	// StarNotFound: the chart's sine star was not found.
	StarNotFound Code = "star-not-found"
	// GratingNotFound: the chart's sine grating was not found.
	GratingNotFound Code = "grating-not-found"
)

// Causes to measure a photo again instead of applying new settings to its
// result (analyze.MeasureAgainError; the page's "resummarise" call gives
// them as remeasure_codes).
const (
	// AgainMethod: another estimator was chosen.
	AgainMethod Code = "method-changed"
	// AgainTone: another tone (or the file's own) was chosen.
	AgainTone Code = "tone-changed"
	// AgainCentreStars: the optical centre moved and the photo has sine
	// stars, measured along and across the radius from the old centre.
	AgainCentreStars Code = "centre-moved-stars"
	// AgainPrint: another print (dpi or chart size) was given, and the
	// photo's sine patterns were cut at the old print's limit.
	AgainPrint Code = "print-changed"
)

// Where the pixel pitch came from, in Image.pitch_from (pitch_source words
// it).
const (
	// PitchUser: the pitch given by the user.
	PitchUser Code = "user"
	// PitchSensor: a sensor width over the image width: the one given, or
	// the fallback sensor's when the file says nothing (as pitch_source,
	// which says "sensor size" for both, so that the page's result equals
	// the tool's given that sensor).
	PitchSensor Code = "sensor"
	// PitchExif: the Exif focal-plane resolution.
	PitchExif Code = "exif"
)

// Where the tone came from, in Image.tone_from (tone_source words it).
const (
	// ToneUser: the tone chosen by the user.
	ToneUser Code = "user"
	// ToneFile: the file's own tags (PNG sRGB, iCCP or gAMA chunks).
	ToneFile Code = "file"
	// ToneDefault: the file says nothing; sRGB is assumed.
	ToneDefault Code = "default"
)

// The shooting planner's warnings, in the plan's warnings (core/plan).
const (
	// PlanNoPitch: no pixel pitch, so the print is not checked up to
	// Nyquist.
	PlanNoPitch Code = "plan-no-pitch"
	// PlanCloseRange: the chart is only a few focal lengths away.
	PlanCloseRange Code = "plan-close-range"
	// PlanAspect: the chart's shape differs from the sensor's.
	PlanAspect Code = "plan-aspect"
)

// Raw (DNG) warnings, in Image.warnings (core/raw, core/decode, core/analyze).
const (
	// RawCropOutside: the DNG's default crop lies outside the active area;
	// the whole active area is used.
	RawCropOutside Code = "raw-crop-outside"
	// RawOpcodesNotApplied: the DNG carries opcode lists (the maker's
	// corrections), which are not applied.
	RawOpcodesNotApplied Code = "raw-opcodes-not-applied"
	// RawToneIgnored: a tone was chosen, but raw data are linear.
	RawToneIgnored Code = "raw-tone-ignored"
	// RawISORefined: the ISO estimator was chosen; mosaic planes are
	// measured with the refined one.
	RawISORefined Code = "raw-iso-uses-refined"
	// RawMosaicPlanes: the edges were measured on the mosaic's colour
	// planes (how, and in which units).
	RawMosaicPlanes Code = "raw-mosaic-planes"
)

// Tone warnings, in Image.warnings (core/analyze, tone.go).
const (
	// ToneCurve: the tone curve read from the chart's grey steps differs
	// from the decoding tone; the fitted curve was used.
	ToneCurve Code = "tone-curve"
	// ToneAssumed: a camera JPEG without Sagitta's chart: its tone curve is
	// assumed to be sRGB.
	ToneAssumed Code = "tone-assumed"
	// ToneStepsUnread: the chart's grey steps could not be used to fit the
	// tone curve (why in the text).
	ToneStepsUnread Code = "tone-steps-unread"
)

// Exposure advice, in Image.exposure.code and Image.warnings.
const (
	// Overexposed: the paper is at the top of the file's values: shoot
	// darker.
	Overexposed Code = "overexposed"
	// Underexposed: the paper sits low in the file's values: shoot
	// brighter.
	Underexposed Code = "underexposed"
)

// Colour fringes (lateral chromatic aberration): the verdict in
// lateral_ca.code, and the photo's note on its colour data in
// Image.warnings (core/fringe, core/analyze).
const (
	// CABarely: the largest red-green or blue-green displacement across
	// the measured field is under 0.5 px: fringes barely visible.
	CABarely Code = "ca-barely-visible"
	// CAVisible: the largest displacement is 0.5 to 1.5 px: fringes
	// visible at 100 % on high-contrast edges.
	CAVisible Code = "ca-visible"
	// CAStrong: the largest displacement exceeds 1.5 px: strong fringes.
	CAStrong Code = "ca-strong"
	// CAFewEdges: too few edges with their normal along the radius to
	// measure colour fringes.
	CAFewEdges Code = "ca-few-edges"
	// ChromaSubsampled: the JPEG stores colour at a lower resolution than
	// luminance (4:2:0, 4:2:2, ...): colour fringes are measured less
	// precisely.
	ChromaSubsampled Code = "chroma-subsampled"
)

// Distortion, in Image.distortion: the verdict ("code"), why it was not
// measured ("reason_code") and its cautions ("caution_codes").
const (
	// DistortionNegligible: the largest radial displacement from the centre
	// to the frame's corner is below the visibility threshold.
	DistortionNegligible Code = "distortion-negligible"
	// DistortionBarrel: straight lines bow outwards (the image is
	// compressed towards the corners).
	DistortionBarrel Code = "distortion-barrel"
	// DistortionPincushion: straight lines bow inwards (the image is
	// stretched towards the corners).
	DistortionPincushion Code = "distortion-pincushion"
	// DistortionMoustache: barrel over part of the frame, pincushion over
	// another (the displacement changes sign).
	DistortionMoustache Code = "distortion-moustache"
	// DistortionNoChart: the photo does not show Sagitta's chart, and too
	// few long straight edges say how lines bend.
	DistortionNoChart Code = "distortion-no-chart"
	// DistortionFewPoints: the chart was recognised but too few of its
	// targets were located to fit the distortion.
	DistortionFewPoints Code = "distortion-few-points"
	// DistortionTiled: the chart is printed across sheets; their small
	// misalignments would read as distortion, so it is not measured.
	DistortionTiled Code = "distortion-tiled"
	// DistortionSetup: the chart's set-up checks warn (turned, tilted, not
	// filling the frame): the fitted distortion is unreliable.
	DistortionSetup Code = "distortion-setup"
	// DistortionScatter: the targets scatter about the fitted model more
	// than a flat chart gives (a curled or wavy sheet).
	DistortionScatter Code = "distortion-scatter"
	// DistortionShortReach: the located targets stop well short of the
	// frame's corner; the corner value is extrapolated.
	DistortionShortReach Code = "distortion-short-reach"
	// DistortionFromEdges: measured from the bow of straight edges, not
	// from the chart: less precise, and only the shape of the curve.
	DistortionFromEdges Code = "distortion-from-edges"
)

// Light fall-off, in Image.falloff: why it was not measured
// ("reason_code") and its cautions ("caution_codes").
const (
	// FalloffNoChart: the photo does not show Sagitta's chart, so no blank
	// paper is known to sample.
	FalloffNoChart Code = "falloff-no-chart"
	// FalloffFewPatches: too few blank patches of the chart were inside
	// the frame and unclipped.
	FalloffFewPatches Code = "falloff-few-patches"
	// FalloffLighting: the caution that uneven lighting of the chart looks
	// the same as the lens's fall-off.
	FalloffLighting Code = "falloff-lighting"
	// FalloffUneven: the two halves of the frame differ at equal heights
	// by more than the lens alone explains: the lighting is probably
	// uneven.
	FalloffUneven Code = "falloff-uneven"
	// FalloffClipped: some patches of paper reach the file's limit and
	// were left out; the fall-off near the centre may be understated.
	FalloffClipped Code = "falloff-clipped"
)
