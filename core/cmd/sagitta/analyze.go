package main

import (
	"context"
	"encoding/json"
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
)

// errHelp is returned after a command printed its own help.
var errHelp = errors.New("help shown")

func cmdAnalyze(args []string, stdout io.Writer) error {
	fs := flag.NewFlagSet("analyze", flag.ContinueOnError)
	fs.SetOutput(stdout)
	var (
		s        analyze.Settings
		sensor   = fs.String("sensor", "", "sensor size in mm, WxH (e.g. 36x24); sets the pitch from the image width")
		center   = fs.String("center", "", "optical centre in px, X,Y (default: the image centre)")
		freqs    = fs.String("freqs", "", "field frequencies in lp/mm, comma separated (default 10,30)")
		asJSON   = fs.Bool("json", false, "print the results as JSON")
		asCSV    = fs.Bool("csv", false, "print one CSV row per measurement")
		workers  = fs.Int("workers", 0, "measurements in parallel (default: one per CPU)")
		maxPixel = fs.Int("max-pixels", 0, "refuse photos larger than this many pixels (default 120000000)")
		plots    = fs.String("plots", "", "also write the plots of each photo as SVG and PNG into this folder")
	)
	fs.Float64Var(&s.PitchUM, "pitch-um", 0, "pixel pitch in micrometres (else from --sensor or the photo's Exif)")
	fs.Float64Var(&s.PrintDPI, "print-dpi", 0, "printer resolution the chart was printed at, dots per inch (default 600, as the chart's text block says)")
	fs.Float64Var(&s.ChartMM, "chart-mm", 0, "the printed chart's short side in mm, as its text block says (default: the A4 sheet's)")
	fs.StringVar(&s.Tone, "tone", "", "tone curve of the files: srgb, linear or gamma:G (default: sRGB unless the file says linear)")
	fs.StringVar(&s.Method, "method", "", "edge estimator: refined (default) or iso (the published ISO 12233 procedure)")
	fs.Usage = func() {
		fmt.Fprintln(stdout, "usage: sagitta analyze [options] PHOTO...")
		fs.PrintDefaults()
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
		if s.SensorMM, err = pair(*sensor, "x"); err != nil {
			return fmt.Errorf("%w: --sensor: %v", errUsage, err)
		}
	}
	if *center != "" {
		c, err := pair(*center, ",")
		if err != nil {
			return fmt.Errorf("%w: --center: %v", errUsage, err)
		}
		s.CenterPx = &c
	}
	if *freqs != "" {
		for _, f := range strings.Split(*freqs, ",") {
			v, err := strconv.ParseFloat(strings.TrimSpace(f), 64)
			if err != nil {
				return fmt.Errorf("%w: --freqs: %q is not a number", errUsage, f)
			}
			s.FreqsLPMM = append(s.FreqsLPMM, v)
		}
	}
	s.Workers, s.MaxPixels = *workers, *maxPixel

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
	if *plots != "" {
		if err := writePlots(*plots, res); err != nil {
			return err
		}
	}
	switch {
	case *asJSON:
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", " ")
		return enc.Encode(res)
	case *asCSV:
		return analyze.WriteCSV(stdout, res)
	}
	return writeText(stdout, res)
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
		kinds := map[string]int{}
		for _, m := range img.Measurements {
			kinds[m.Kind]++
		}
		fmt.Fprintf(w, "%d edges measured, %d set aside; %d sine stars, %d sine gratings (%d records)\n",
			kinds["edge"], len(img.Rejected), len(img.Stars), len(img.Gratings), kinds["star"]+kinds["grating"])
		if a := img.Agreement; a != nil {
			fmt.Fprintf(w, "stars against nearby edges: %.3f rms difference in MTF at %.2f-%.2f cy/px (edges %+.3f on average)\n",
				a.RMSDiff, a.LoCyPx, a.HiCyPx, a.MeanDiff)
		}
		if len(img.Measurements) > 0 {
			fmt.Fprintf(w, "%4s %-7s %8s %8s %9s %-10s %11s %11s", "id", "kind", "x px", "y px", "height mm", "orient.", "MTF50 cy/px", "MTF50 lp/mm")
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
				fmt.Fprintf(w, "  %s\n", strings.Join(m.Warnings, "; "))
			}
		}
		for _, warn := range img.Warnings {
			fmt.Fprintln(w, "note: "+warn)
		}
		fmt.Fprintln(w)
	}
	return nil
}

func num(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// fix formats v with d decimals, or "n/a" when it is not finite.
func fix(v float64, d int) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "n/a"
	}
	return strconv.FormatFloat(v, 'f', d, 64)
}
