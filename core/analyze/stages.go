package analyze

import (
	"context"
	"errors"
	"fmt"
	"image"
	"runtime"
	"sort"
	"sync"

	"sagitta/core/chart"
	"sagitta/core/decode"
	"sagitta/core/edge"
	"sagitta/core/edgefind"
	"sagitta/core/field"
	"sagitta/core/internal/parallel"
	"sagitta/core/note"
	"sagitta/core/plane"
)

// Run's three stages, for front ends that spread one photo's regions over
// several processes (the page's workers, each its own WebAssembly
// instance):
//
//	Find     decode, tone, the chart's pose, sine patterns, edge candidates
//	Measure  a range [lo, hi) of the candidates, on the Found itself or on
//	         a Measurer that Prepare made from the same photo elsewhere
//	Finish   the Parts of every candidate, merged in the photo's order,
//	         placed in the field and summarised once
//
// Run is Find, Measure(0, Targets()) and Finish in one process; any split
// of the candidates into ranges, measured anywhere and passed through JSON,
// gives the same Image (TestStagesEqualRun).

// Photo is one photo given to the pipeline.
type Photo struct {
	Name string
	// Data is the file's bytes: its format, size, Exif and tone chunks are
	// always read from them.
	Data []byte
	// Pixels, when not nil, are the file's pixels as the browser decoded
	// them (8-bit, not premultiplied, no colour conversion, Exif
	// orientation not applied); the file is then not decoded again
	// (decode.FromPixels).
	Pixels image.Image
}

// decodePhoto decodes a photo, from its pixels when it has them.
func decodePhoto(ph Photo, opt decode.Options) (*decode.Image, error) {
	if ph.Pixels != nil {
		return decode.FromPixels(ph.Data, ph.Pixels, opt)
	}
	return decode.Decode(ph.Data, opt)
}

// Plan is what measuring part of a photo's candidates needs besides the
// photo: the candidate regions, in the photo's order, and the tone curve
// fitted to the chart's grey steps when the photo was linearised with it.
// It passes between processes as JSON.
type Plan struct {
	Regions []edge.Region `json:"regions"`
	// ToneX, ToneY and TonePaper are the points and the paper level of
	// the fitted tone curve (fitTone), empty when none was applied.
	ToneX     []float64 `json:"tone_x,omitempty"`
	ToneY     []float64 `json:"tone_y,omitempty"`
	TonePaper float64   `json:"tone_paper,omitempty"`
}

// Part is the outcome of measuring one candidate: a record, or the reason
// it was set aside. It passes between processes as JSON.
type Part struct {
	Index    int          `json:"index"` // the candidate's place in Plan.Regions
	Record   *Measurement `json:"record,omitempty"`
	Rejected *Rejected    `json:"rejected,omitempty"`
}

// Measurer measures candidates of one decoded photo.
type Measurer struct {
	dec     *decode.Image
	plan    Plan
	opt     measureOptions
	workers int // goroutines; 0 = GOMAXPROCS
	// prepared: made by Prepare, waiting for its plan (Use)
	prepared bool
}

// Found is a photo after the find stage: decoded, its candidates found,
// ready to be measured (Measure) and finished (Finish).
type Found struct {
	Measurer
	img       *Image
	geo       field.Geometry
	pose      *chart.Pose
	chartNote note.Note
	pats      *patterns
	settings  Settings
}

// Targets is the number of candidates to measure.
func (m *Measurer) Targets() int { return len(m.plan.Regions) }

// Frame returns the photo's size in px and its Exif orientation (0 when
// none), for showing it while its targets are measured.
func (f *Found) Frame() (width, height, orientation int) {
	return f.dec.Width, f.dec.Height, f.dec.Exif.Orientation
}

// Plan returns the plan that Prepare needs to measure this photo's
// candidates elsewhere.
func (f *Found) Plan() Plan { return f.plan }

// Find runs the first stage on a photo: decode, tone, the chart's pose and
// tone curve, sine patterns (measured here) and the edge candidates.
// Errors are those of Run; it never panics.
func Find(ctx context.Context, ph Photo, s Settings, progress Progress) (f *Found, err error) {
	defer func() {
		if r := recover(); r != nil {
			f, err = nil, fmt.Errorf("analyze: internal error on %s: %v", ph.Name, r)
		}
	}()
	if progress == nil {
		progress = func(string, float64) {}
	}
	chk, err := s.check()
	if err != nil {
		return nil, err
	}

	progress(StageReading, 0)
	dec, err := decodePhoto(ph, decode.Options{Tone: chk.tone, MaxPixels: s.MaxPixels})
	if err != nil {
		return nil, err
	}
	if dec.Width < MinSidePx || dec.Height < MinSidePx {
		return nil, &TooSmallError{Width: dec.Width, Height: dec.Height}
	}
	img := &Image{
		File: ph.Name, Width: dec.Width, Height: dec.Height,
		Format: dec.Format, BitDepth: dec.BitDepth,
		Tone: dec.Tone.String(), ToneSource: dec.ToneSource, ToneFrom: string(dec.ToneFrom),
		Method: chk.method.String(), Exif: exifOf(dec.Exif),
		Measurements: []Measurement{}, Rejected: []Rejected{},
		Stars: []StarInfo{}, Gratings: []GratingInfo{},
		Warnings: []string{}, WarningCodes: []string{},
		Raw: rawInfo(dec),
	}
	for i, w := range dec.Warnings {
		img.warn(note.New(dec.WarningCodes[i], w))
	}
	for _, n := range rawWarnings(dec, chk.method) {
		img.warn(n)
	}
	geo, err := placeFrame(img, s, chk.freqs)
	if err != nil {
		return nil, err
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}

	progress(StageFinding, 0.15)
	f = &Found{
		Measurer: Measurer{dec: dec, opt: measureOptions{Options: edge.Options{Method: chk.method}, channels: s.Channels}, workers: s.Workers},
		img:      img, geo: geo, settings: s,
	}
	// Sagitta's chart, if it is there (chart.go), first: its grey steps
	// give the photo's tone curve, needed before anything is measured
	// (tone.go).
	pose, chartNote := chart.Recognise(dec.Lum)
	f.pose, f.chartNote = pose, chartNote
	switch {
	case pose != nil:
		tf, why := fitTone(dec.Lum, pose, chk.tone.Kind == decode.ToneAuto)
		img.ToneFit = tf
		f.opt.toneMap = tf.mapper() // the fitted tone curve, for colour planes (fringes.go)
		if tf != nil && tf.Applied {
			f.plan.ToneX, f.plan.ToneY, f.plan.TonePaper = tf.fitX, tf.fitY, tf.PaperLevel
		}
		if why != "" {
			img.warn(note.New(note.ToneStepsUnread, "chart: "+why))
		}
		if w := toneWarning(tf, img.Tone); w != "" {
			tf.Code = FlagToneCurve
			img.warn(note.New(note.ToneCurve, w))
		}
	case chk.tone.Kind == decode.ToneAuto && dec.Format == decode.FormatJPEG:
		img.warn(note.New(note.ToneAssumed, toneAssumed))
	}
	cands, rejects := edgefind.Edges(dec.Lum, edgefind.Options{})
	pats := findPatterns(ctx, dec.Lum, geo, s.Workers) // sine stars and gratings (sine.go)
	pats.gratingsFromChart(dec.Lum, pose)              // its gratings measured from the design (chartgratings.go)
	cands, rejects = pats.exclude(cands, rejects)
	f.pats = pats
	img.Rejected = append(img.Rejected, pats.rejected...)
	for _, r := range rejects {
		img.Rejected = append(img.Rejected, Rejected{r.X0, r.Y0, r.X1, r.Y1, r.Reason, string(r.Code)})
	}
	f.plan.Regions = make([]edge.Region, len(cands))
	for i, c := range cands {
		f.plan.Regions[i] = c.Region
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	return f, nil
}

// Prepare decodes a photo in another process for measuring a part of the
// candidates that Find finds in it: the same decoding (the settings' tone
// and pixel limit, the same Pixels or none). It may run while Find runs
// elsewhere; Use then gives it Find's plan, and its Measure gives the same
// Parts as the Found's.
func Prepare(ph Photo, s Settings) (m *Measurer, err error) {
	defer func() {
		if r := recover(); r != nil {
			m, err = nil, fmt.Errorf("analyze: internal error on %s: %v", ph.Name, r)
		}
	}()
	chk, err := s.check()
	if err != nil {
		return nil, err
	}
	dec, err := decodePhoto(ph, decode.Options{Tone: chk.tone, MaxPixels: s.MaxPixels})
	if err != nil {
		return nil, err
	}
	return &Measurer{dec: dec, opt: measureOptions{Options: edge.Options{Method: chk.method}, channels: s.Channels}, workers: s.Workers, prepared: true}, nil
}

// Use sets the plan of a Measurer that Prepare made: its regions, and the
// tone curve fitted by Find, applied to the pixels as Find applied it. It
// may be called once.
func (m *Measurer) Use(plan Plan) error {
	if !m.prepared {
		return errors.New("analyze: Use on a measurer that has its plan")
	}
	m.prepared = false
	if len(plan.ToneX) > 0 {
		fit, err := decode.Fit(plan.ToneX, plan.ToneY)
		if err != nil {
			return fmt.Errorf("analyze: the plan's tone curve: %w", err)
		}
		fit.Apply(m.dec.Lum, plan.TonePaper)
		m.opt.toneMap = func(p *plane.Plane) { fit.Apply(p, plan.TonePaper) }
	}
	m.plan = plan
	return nil
}

// Measure measures the candidates lo to hi-1 (0 <= lo <= hi <= Targets(),
// else it panics: a caller's error), in parallel over the settings'
// workers; done(n) reports how many of them are finished. It returns one
// Part per candidate, in order, or ctx.Err().
func (m *Measurer) Measure(ctx context.Context, lo, hi int, done func(n int)) ([]Part, error) {
	if lo < 0 || hi < lo || hi > len(m.plan.Regions) {
		panic(fmt.Sprintf("analyze: Measure(%d, %d) outside the %d candidates", lo, hi, len(m.plan.Regions)))
	}
	if done == nil {
		done = func(int) {}
	}
	regions := m.plan.Regions[lo:hi]
	results := measureAll(ctx, m.dec, regions, m.opt, m.workers, done)
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	parts := make([]Part, len(regions))
	for i, r := range results {
		parts[i] = partOf(lo+i, regions[i], r)
	}
	return parts, nil
}

// partOf turns a measured candidate into its record, or its reason for
// being set aside.
func partOf(index int, reg edge.Region, r outcome) Part {
	p := Part{Index: index}
	if r.err != nil {
		rej := rejectOf(reg, note.New(note.NoCleanEdge, "no clean edge: "+plainError(r.err)))
		p.Rejected = &rej
		return p
	}
	if reason, ok := unusable(r.m); ok {
		rej := rejectOf(reg, reason)
		p.Rejected = &rej
		return p
	}
	rec := record(r.m, reg)
	rec.Channels = r.chans
	rec.ChannelEdge = r.colour
	p.Record = &rec
	return p
}

// Finish merges the Parts of every candidate (in any order, each exactly
// once), places everything in the field and summarises it: the photo's
// Image, as Run gives it. Finish may be called once.
func (f *Found) Finish(ctx context.Context, parts []Part, progress Progress) (img *Image, err error) {
	defer func() {
		if r := recover(); r != nil {
			img, err = nil, fmt.Errorf("analyze: internal error on %s: %v", f.img.File, r)
		}
	}()
	if progress == nil {
		progress = func(string, float64) {}
	}
	if f.img == nil {
		return nil, errors.New("analyze: this photo was already finished")
	}
	img, f.img = f.img, nil
	dec := f.dec
	f.dec = nil // the pixels are no longer needed once the paper is read (below)
	progress(StageSumming, 0.9)
	sorted := append([]Part(nil), parts...)
	sort.Slice(sorted, func(i, j int) bool { return sorted[i].Index < sorted[j].Index })
	for i, p := range sorted {
		if p.Index != i || (p.Record == nil) == (p.Rejected == nil) {
			return nil, fmt.Errorf("analyze: the measured parts do not match the %d candidates (part %d of %d)", len(f.plan.Regions), p.Index, len(sorted))
		}
	}
	if len(sorted) != len(f.plan.Regions) {
		return nil, fmt.Errorf("analyze: %d parts measured for %d candidates", len(sorted), len(f.plan.Regions))
	}
	colour := false
	for _, p := range sorted {
		if p.Rejected != nil {
			img.Rejected = append(img.Rejected, *p.Rejected)
		} else {
			img.Measurements = append(img.Measurements, *p.Record)
			colour = colour || p.Record.ChannelEdge != nil
		}
	}
	if n, ok := chromaNote(dec); ok && colour {
		img.warn(n)
	}
	img.Measurements = append(img.Measurements, f.pats.starRecords(img, f.geo)...)
	img.Gratings = gratingInfos(f.pats.gratings)
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	recogniseChart(img, f.pose, f.chartNote, f.settings) // tags measurements on Sagitta's chart (chart.go)
	samplePaper(img, dec.Lum, f.pose)                    // the chart's blank paper, for the fall-off (geometry.go)
	base, _ := img.notes()
	err = summarise(img, f.geo, base)
	if errors.Is(err, errNoRecords) {
		return nil, noTargets(img.Rejected)
	}
	if err != nil {
		return nil, err
	}
	progress(StageSumming, 1)
	return img, nil
}

type outcome struct {
	m      *edge.Measurement
	chans  []ChannelMTF // per colour channel: raw photos, or on request
	colour *ChannelEdge // where the edge lies in red and blue against green
	err    error
}

// measureOptions are what measureOne needs besides the region: the
// estimator, whether to measure each colour channel's MTF, and the tone
// curve fitted to the chart's grey steps (nil: none applied).
type measureOptions struct {
	edge.Options
	channels bool
	toneMap  func(*plane.Plane)
}

// measureAll measures every region, in parallel over workers goroutines
// (in WebAssembly GOMAXPROCS is 1 and this runs sequentially).
func measureAll(ctx context.Context, dec *decode.Image, regions []edge.Region, opt measureOptions, workers int, done func(int)) []outcome {
	out := make([]outcome, len(regions))
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	var mu sync.Mutex // one progress report at a time, in order
	finished := 0
	parallel.For(len(regions), workers, func(i int) {
		if ctx.Err() != nil {
			return // cancelled: the caller returns ctx.Err() and drops out
		}
		out[i] = measureOne(dec, regions[i], opt)
		mu.Lock()
		finished++
		if workers == 1 || finished%8 == 0 {
			done(finished)
		}
		mu.Unlock()
	})
	return out
}
