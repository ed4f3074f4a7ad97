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
	"sagitta/core/internal/coarse"
	"sagitta/core/internal/parallel"
	"sagitta/core/note"
	"sagitta/core/plane"
	"sagitta/core/sine"
)

// Run's three stages, for front ends that spread one photo's regions over
// several processes (the page's workers, each its own WebAssembly
// instance):
//
//	Find     decode, tone, the chart's pose, the sine patterns and edge
//	         candidates found (not measured): the targets
//	Measure  a range [lo, hi) of the targets, on the Found itself or on
//	         a Measurer that Prepare made from the same photo elsewhere
//	Finish   the Parts of every target, merged in the photo's order,
//	         placed in the field and summarised once
//
// The targets are the plan's edge candidates (0 .. len(Regions)-1), then
// its sine patterns. Run is Find, Measure(0, Targets()) and Finish in one
// process; any split of the targets into ranges, measured anywhere and
// passed through JSON, gives the same Image (TestStagesEqualRun).

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

// Plan is what measuring part of a photo's targets needs besides the
// photo: the edge candidates' regions, in the photo's order, the sine
// patterns found, the optical centre (the stars' records lie along and
// across the field radius), and the tone curve fitted to the chart's grey
// steps when the photo was linearised with it. It passes between
// processes as JSON.
type Plan struct {
	Regions  []edge.Region `json:"regions"`
	Patterns []PatternJob  `json:"patterns,omitempty"`
	Centre   [2]float64    `json:"centre_px"`
	// ToneX, ToneY and TonePaper are the points and the paper level of
	// the fitted tone curve (fitTone), empty when none was applied.
	ToneX     []float64 `json:"tone_x,omitempty"`
	ToneY     []float64 `json:"tone_y,omitempty"`
	TonePaper float64   `json:"tone_paper,omitempty"`
}

// Part is the outcome of measuring one target. An edge candidate gives a
// record, or the reason it was set aside; a sine pattern gives a star, a
// grating, a reason (a star too small to measure) or nothing. It passes
// between processes as JSON.
type Part struct {
	Index    int           `json:"index"` // the target's place: Plan.Regions, then Plan.Patterns
	Record   *Measurement  `json:"record,omitempty"`
	Rejected *Rejected     `json:"rejected,omitempty"`
	Star     *StarPart     `json:"star,omitempty"`
	Grating  *sine.Grating `json:"grating,omitempty"`
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
	settings  Settings
	// cands are every edge candidate found, in the photo's order, and
	// slot the place of each in plan.Regions (-1: left out of the plan,
	// as it meets a pattern's area; see possibleAreas); rejects are the
	// edge search's own rejects. Finish keeps those clear of the measured
	// patterns.
	cands   []edge.Region
	slot    []int
	rejects []edgefind.Reject
}

// Targets is the number of targets to measure: edge candidates, then sine
// patterns.
func (m *Measurer) Targets() int { return len(m.plan.Regions) + len(m.plan.Patterns) }

// Frame returns the photo's size in px and its Exif orientation (0 when
// none), for showing it while its targets are measured.
func (f *Found) Frame() (width, height, orientation int) {
	return f.dec.Width, f.dec.Height, f.dec.Exif.Orientation
}

// Plan returns the plan that Prepare needs to measure this photo's
// candidates elsewhere.
func (f *Found) Plan() Plan { return f.plan }

// Find runs the first stage on a photo: decode, tone, the chart's pose and
// tone curve, and the targets: sine patterns and edge candidates, found
// here and measured by Measure.
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
	// One set of reduced views of the luminance plane for every search
	// (coarse.Views), made again when the tone curve changes the plane.
	views := coarse.NewViews(dec.Lum)
	pose, chartNote := chart.RecogniseIn(views)
	f.pose, f.chartNote = pose, chartNote
	switch {
	case pose != nil:
		tf, why := fitTone(dec.Lum, pose, chk.tone.Kind == decode.ToneAuto)
		img.ToneFit = tf
		f.opt.toneMap = tf.mapper() // the fitted tone curve, for colour planes (fringes.go)
		if tf != nil && tf.Applied {
			f.plan.ToneX, f.plan.ToneY, f.plan.TonePaper = tf.fitX, tf.fitY, tf.PaperLevel
			views = coarse.NewViews(dec.Lum)
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
	cands, rejects := edgefind.Edges(dec.Lum, edgefind.Options{Views: views})
	// Sine stars and gratings, and the chart's gratings from its design
	// (sine.go, chartgratings.go): measured as targets. Edge candidates on
	// them are left out of the plan; Finish drops those (and any others)
	// that meet the patterns as measured.
	f.plan.Patterns = findPatterns(views, geo, pose)
	f.plan.Centre = [2]float64{geo.CentreX, geo.CentreY}
	f.rejects = rejects
	f.cands = make([]edge.Region, len(cands))
	for i, c := range cands {
		f.cands[i] = c.Region
	}
	f.planRegions()
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	return f, nil
}

// planRegions puts in the plan the edge candidates that meet none of the
// areas the found patterns may keep clear (possibleAreas), and sets slot.
func (f *Found) planRegions() {
	possible := possibleAreas(f.plan.Patterns)
	f.plan.Regions, f.slot = nil, make([]int, len(f.cands))
	for i, r := range f.cands {
		f.slot[i] = -1
		if !possible.overlaps(r.Corners()) {
			f.slot[i] = len(f.plan.Regions)
			f.plan.Regions = append(f.plan.Regions, r)
		}
	}
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

// Measure measures the targets lo to hi-1 (0 <= lo <= hi <= Targets(),
// else it panics: a caller's error), in parallel over the settings'
// workers (the sine patterns, then the edges); done(n) reports
// how many of them are finished. It returns one Part per target, in
// order, or ctx.Err().
func (m *Measurer) Measure(ctx context.Context, lo, hi int, done func(n int)) ([]Part, error) {
	nr := len(m.plan.Regions)
	if lo < 0 || hi < lo || hi > m.Targets() {
		panic(fmt.Sprintf("analyze: Measure(%d, %d) outside the %d targets", lo, hi, m.Targets()))
	}
	if done == nil {
		done = func(int) {}
	}
	regions := m.plan.Regions[min(lo, nr):min(hi, nr)]
	jobs := m.plan.Patterns[max(lo, nr)-nr : max(hi, nr)-nr]
	// The sine patterns first (few, each longer than an edge), then the
	// edges, each over every worker.
	pats := make([]Part, len(jobs))
	var mu sync.Mutex // one progress report at a time
	patsDone := 0
	var failure any // a panic on a goroutine, raised again here (see measureSafely)
	parallel.For(len(jobs), m.workers, func(i int) {
		defer func() {
			if r := recover(); r != nil {
				mu.Lock()
				failure = r
				mu.Unlock()
			}
		}()
		if ctx.Err() != nil {
			return
		}
		pats[i] = measurePattern(m.dec.Lum, jobs[i], m.plan.Centre, max(lo, nr)+i)
		mu.Lock()
		patsDone++
		done(patsDone)
		mu.Unlock()
	})
	if failure != nil {
		panic(failure)
	}
	results := measureAll(ctx, m.dec, regions, m.opt, m.workers, func(n int) { done(patsDone + n) })
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	parts := make([]Part, 0, hi-lo)
	for i, r := range results {
		parts = append(parts, partOf(lo+i, regions[i], r))
	}
	return append(parts, pats...), nil
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
	nr := len(f.plan.Regions)
	for i, p := range sorted {
		ok := p.Index == i && (p.Record == nil) != (p.Rejected == nil) && p.Star == nil && p.Grating == nil // an edge
		if i >= nr {                                                                                        // a pattern
			n := 0
			for _, b := range []bool{p.Rejected != nil, p.Star != nil, p.Grating != nil} {
				if b {
					n++
				}
			}
			ok = p.Index == i && p.Record == nil && n <= 1
		}
		if !ok {
			return nil, fmt.Errorf("analyze: the measured parts do not match the %d targets (part %d of %d)", f.Targets(), p.Index, len(sorted))
		}
	}
	if len(sorted) != f.Targets() {
		return nil, fmt.Errorf("analyze: %d parts measured for %d targets", len(sorted), f.Targets())
	}
	pats := patternsOf(f.plan.Patterns, sorted[nr:], f.pose)
	img.Rejected = append(img.Rejected, pats.rejected...)
	for _, r := range f.rejects {
		if !pats.coversReject(r) {
			img.Rejected = append(img.Rejected, Rejected{r.X0, r.Y0, r.X1, r.Y1, r.Reason, string(r.Code)})
		}
	}
	colour := false
	for i, reg := range f.cands {
		if pats.overlaps(reg.Corners()) {
			continue // on a star's spokes or a grating's lines: not an edge
		}
		var p Part
		if k := f.slot[i]; k >= 0 {
			p = sorted[k]
		} else { // left out of the plan for a pattern that did not measure
			if err := ctx.Err(); err != nil {
				return nil, err
			}
			p = partOf(i, reg, measureOne(dec, reg, f.opt))
		}
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
	img.Measurements = append(img.Measurements, pats.starRecords(img)...)
	img.Gratings = gratingInfos(pats.gratings)
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
