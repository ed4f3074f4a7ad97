package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"sagitta/core/analyze"
	"sagitta/core/plan"
	"sagitta/core/plot"
	"sagitta/core/series"
)

// errHelp is returned after a command printed its own help.
var errHelp = errors.New("help shown")

func cmdAnalyze(args []string, stdout io.Writer) error {
	fs := flag.NewFlagSet("analyze", flag.ContinueOnError)
	fs.SetOutput(stdout)
	var (
		s        analyze.Settings
		sensor   = fs.String("sensor", "", "sensor size in mm as WxH (e.g. 36x24), or "+plan.SensorNames()+"; sets the pitch from the image width")
		center   = fs.String("center", "", "optical centre in px, X,Y (default: the image centre)")
		freqs    = fs.String("freqs", "", "field frequencies in lp/mm, comma separated (default 10,30)")
		asJSON   = fs.Bool("json", false, "print the results as JSON")
		asCSV    = fs.Bool("csv", false, "print one CSV row per measurement")
		workers  = fs.Int("workers", 0, "measurements in parallel (default: one per CPU)")
		maxPixel = fs.Int("max-pixels", 0, "refuse photos larger than this many pixels (default 120000000)")
		plots    = fs.String("plots", "", "also write the plots of each photo as SVG and PNG into this folder")
		asSeries = fs.Bool("series", false, "the photos are one lens at several f-numbers: name the sharpest stop in the centre, middle and corners")
		fNumbers = fs.String("f-numbers", "", "with --series: the photos' f-numbers, comma separated (default: from Exif)")
		turned   = fs.Float64("turned", 0, "two photos of one set-up, the camera turned about the lens axis between them by this many degrees (90, 180, 270; or -1: read the turn from the chart): split a softer side into lens and set-up")
	)
	fs.Float64Var(&s.PitchUM, "pitch-um", 0, "pixel pitch in micrometres (else from --sensor or the photo's Exif)")
	fs.Float64Var(&s.PrintDPI, "print-dpi", 0, "printer resolution the chart was printed at, dots per inch (default 600, as the chart's text block says)")
	fs.Float64Var(&s.ChartMM, "chart-mm", 0, "the printed chart's short side in mm, as its text block says (default: the A4 sheet's)")
	fs.StringVar(&s.Tone, "tone", "", "tone curve of the files: srgb, linear or gamma:G (default: sRGB unless the file says linear)")
	fs.StringVar(&s.Method, "method", "", "edge estimator: refined (default) or iso (the published ISO 12233 procedure)")
	fs.BoolVar(&s.Channels, "channels", false, "also measure each edge's MTF in red, green and blue (a raw DNG always is)")
	fs.Usage = func() {
		fmt.Fprintln(stdout, "usage: sagitta analyze [options] PHOTO...")
		printOptions(fs, stdout)
	}
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() == 0 {
		return fmt.Errorf("%w: analyze needs at least one photo", errUsage)
	}
	if *asJSON && *asCSV {
		return fmt.Errorf("%w: choose one of --json and --csv", errUsage)
	}
	var err error
	if *sensor != "" {
		var ok bool
		if s.SensorMM, ok = plan.SensorByName(*sensor); !ok {
			if s.SensorMM, err = pair(*sensor, "x"); err != nil {
				return fmt.Errorf("%w: --sensor: %v, nor one of %s", errUsage, err, plan.SensorNames())
			}
		}
	}
	if *center != "" {
		c, err := pair(*center, ",")
		if err != nil {
			return fmt.Errorf("%w: --center: %v", errUsage, err)
		}
		s.CentrePx = &c
	}
	if *freqs != "" {
		if s.FreqsLPMM, err = numbers(*freqs); err != nil {
			return fmt.Errorf("%w: --freqs: %v", errUsage, err)
		}
	}
	s.Workers, s.MaxPixels = *workers, *maxPixel
	var fnums []float64
	if *fNumbers != "" {
		if fnums, err = numbers(*fNumbers); err != nil {
			return fmt.Errorf("%w: --f-numbers: %v", errUsage, err)
		}
		if len(fnums) != fs.NArg() {
			return fmt.Errorf("%w: --f-numbers gives %d values for %d photos", errUsage, len(fnums), fs.NArg())
		}
	}
	if *asSeries && *turned != 0 {
		return fmt.Errorf("%w: choose one of --series and --turned", errUsage)
	}
	if *turned != 0 && fs.NArg() != 2 {
		return fmt.Errorf("%w: --turned compares exactly two photos", errUsage)
	}

	var res analyze.Result
	for _, path := range fs.Args() {
		data, err := os.ReadFile(path)
		if err != nil {
			return fmt.Errorf("cannot read %s: %v", path, unwrapPath(err))
		}
		img, err := analyze.Run(context.Background(), filepath.Base(path), data, s, nil)
		if err != nil {
			return fmt.Errorf("%s: %v", path, err)
		}
		res.Images = append(res.Images, img)
	}
	out := output{Result: res}
	switch {
	case *asSeries:
		if out.Series, err = series.ApertureSeries(res.Images, fnums); err != nil {
			return err
		}
	case *turned != 0:
		deg := *turned
		if deg < 0 {
			deg = 0 // read from the chart
		}
		if out.Turned, err = series.TurnedPair(res.Images[0], res.Images[1], deg); err != nil {
			return err
		}
	}
	if *plots != "" {
		if err := writePlots(*plots, res); err != nil {
			return err
		}
		if out.Series != nil {
			if err := writeFigure(*plots, "aperture-series", plot.ApertureSeries(out.Series)); err != nil {
				return err
			}
		}
	}
	switch {
	case *asJSON:
		return analyze.WriteJSON(stdout, out)
	case *asCSV:
		return analyze.WriteCSV(stdout, res)
	}
	if err := writeText(stdout, res); err != nil {
		return err
	}
	return writeSeriesText(stdout, out)
}

// output is what analyze prints as JSON: the contract's images, and the
// answer of a series or a turned pair when one was asked for.
type output struct {
	analyze.Result
	Series *series.Aperture `json:"series,omitempty"`
	Turned *series.Turned   `json:"turned_pair,omitempty"`
}

// writeSeriesText prints the answer of a series or a turned pair.
func writeSeriesText(w io.Writer, out output) error {
	if a := out.Series; a != nil {
		fmt.Fprintln(w, "aperture series:")
		fmt.Fprintf(w, "%8s", "f-number")
		for _, z := range a.Zones {
			fmt.Fprintf(w, " %22s", z+" MTF50 lp/mm")
		}
		fmt.Fprintf(w, " %18s\n", "perfect lens")
		for _, st := range a.Stops {
			fmt.Fprintf(w, "%8s", "f/"+num(st.FNumber))
			for _, v := range st.MTF50LPMM {
				fmt.Fprintf(w, " %22s", fix(float64(v.Value), 1)+" ± "+fix(2*float64(v.SE), 1))
			}
			fmt.Fprintf(w, " %18s\n", fix(float64(st.PerfectMTF50LPMM), 1))
		}
		fmt.Fprintln(w, a.Text)
		fmt.Fprintln(w, "note: "+a.Caution)
	}
	if t := out.Turned; t != nil {
		fmt.Fprintf(w, "turned pair (%s, then %s; turned %g degrees, from the %s):\n", t.Files[0], t.Files[1], t.TurnDeg, t.TurnSource)
		fmt.Fprintln(w, t.Text)
		fmt.Fprintln(w, "note: "+t.Caution)
	}
	return nil
}

// numbers parses a comma-separated list of numbers.
func numbers(s string) ([]float64, error) {
	var out []float64
	for _, f := range strings.Split(s, ",") {
		v, err := strconv.ParseFloat(strings.TrimSpace(f), 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("%q is not a number", f)
		}
		out = append(out, v)
	}
	return out, nil
}

// pair parses "A<sep>B" into two positive numbers.
func pair(s, sep string) ([2]float64, error) {
	parts := strings.Split(strings.ToLower(s), sep)
	if len(parts) != 2 {
		return [2]float64{}, fmt.Errorf("%q is not two numbers separated by %q", s, sep)
	}
	var out [2]float64
	for i, p := range parts {
		v, err := strconv.ParseFloat(strings.TrimSpace(p), 64)
		if err != nil || v < 0 || math.IsInf(v, 0) {
			return out, fmt.Errorf("%q is not two numbers separated by %q", s, sep)
		}
		out[i] = v
	}
	return out, nil
}

func unwrapPath(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}

// writeText prints a short human-readable report.
func writeText(w io.Writer, res analyze.Result) error {
	for _, img := range res.Images {
		fmt.Fprintf(w, "%s: %d x %d px, pitch %s um (%s), tone %s (%s), method %s\n",
			img.File, img.Width, img.Height, num(img.PitchUM), img.PitchSource, img.Tone, img.ToneSource, img.Method)
		if r := img.Raw; r != nil {
			fmt.Fprintf(w, "%s: %s; each record's curve is the %s channel's\n", r.Text, r.Description, r.Main)
		}
		kinds := map[string]int{}
		for _, m := range img.Measurements {
			kinds[m.Kind]++
		}
		fmt.Fprintf(w, "%d edges measured, %d set aside; %d sine stars, %d sine gratings (%d records)\n",
			kinds["edge"], len(img.Rejected), len(img.Stars), len(img.Gratings), kinds["star"]+kinds["grating"])
		if ca := img.LateralCA; ca != nil {
			fmt.Fprintln(w, ca.Text) // the verdict: "Colour fringes ..."
		}
		if a := img.Agreement; a != nil {
			fmt.Fprintf(w, "stars against nearby edges: %.3f rms difference in MTF at %.2f-%.2f cy/px (edges %+.3f on average)\n",
				a.RMSDiff, a.LoCyPx, a.HiCyPx, a.MeanDiff)
		}
		if len(img.Measurements) > 0 {
			fmt.Fprintln(w, "columns: dist. mm = distance from the optical centre (mm); orient. = orientation; @F lp/mm = MTF at F lp/mm")
			fmt.Fprintf(w, "%4s %-7s %8s %8s %9s %-10s %11s %11s", "id", "kind", "x px", "y px", "dist. mm", "orient.", "MTF50 cy/px", "MTF50 lp/mm")
			for _, f := range img.FreqsLPMM {
				fmt.Fprintf(w, " %9s", "@"+num(f)+" lp/mm")
			}
			fmt.Fprintln(w, "  notes")
			for _, m := range img.Measurements {
				fmt.Fprintf(w, "%4d %-7s %8.1f %8.1f %9.2f %-10s %11s %11s", m.ID, m.Kind, m.XPx, m.YPx, m.HeightMM, m.Orientation,
					fix(float64(m.MTF50), 3), fix(float64(m.MTF50LPMM), 1))
				for _, v := range m.MTFAtFreqs {
					fmt.Fprintf(w, " %9s", fix(float64(v), 3))
				}
				notes := append(beyondNotes(m, img), m.Warnings...)
				if len(m.Channels) > 0 {
					var cs []string
					for _, c := range m.Channels {
						cs = append(cs, c.Channel+" "+fix(float64(c.MTF50), 3))
					}
					notes = append([]string{"MTF50 by channel: " + strings.Join(cs, ", ")}, notes...)
				}
				fmt.Fprintf(w, "  %s\n", strings.Join(notes, "; "))
			}
		}
		writeGeometryText(w, img)
		for _, warn := range img.Warnings {
			fmt.Fprintln(w, "note: "+warn)
		}
		fmt.Fprintln(w)
	}
	return nil
}

// beyondNotes says why a star's or gratings' MTF at a field frequency is
// n/a: the frequency lies outside those the pattern measured.
func beyondNotes(m analyze.Measurement, img *analyze.Image) []string {
	if m.MeasuredCyPx == nil || !(img.PitchUM > 0) {
		return nil
	}
	var beyond []float64
	for i, v := range m.MTFAtFreqs {
		if math.IsNaN(float64(v)) && i < len(img.FreqsLPMM) {
			beyond = append(beyond, img.FreqsLPMM[i])
		}
	}
	if len(beyond) == 0 {
		return nil
	}
	at := make([]string, len(beyond))
	for i, f := range beyond {
		at[i] = num(f)
	}
	lo, hi := m.MeasuredCyPx[0]*1000/img.PitchUM, m.MeasuredCyPx[1]*1000/img.PitchUM
	return []string{fmt.Sprintf("n/a at %s lp/mm: beyond the frequencies this %s measured (%.0f-%.0f lp/mm)", strings.Join(at, " and "), kindNoun(m.Kind), lo, hi)}
}

// kindNoun names a kind of target in a sentence.
func kindNoun(kind string) string {
	if kind == "grating" {
		return "set of gratings"
	}
	return kind
}

func num(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// fix formats v with d decimals, or "n/a" when it is not finite.
func fix(v float64, d int) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "n/a"
	}
	return strconv.FormatFloat(v, 'f', d, 64)
}
