package main

import (
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"sagitta/core/chart"
)

// chartFlags registers the chart options shared by "chart" and "plan" and
// returns a function that reads them into a chart.Options.
func chartFlags(fs *flag.FlagSet) func() (chart.Options, error) {
	var (
		paper    = fs.String("paper", "A4", "sheet: "+strings.Join(chart.PaperNames(), ", ")+", or a size in mm as WxH (e.g. 300x400)")
		orient   = fs.String("orientation", "landscape", "landscape (the chart is wider than tall) or portrait (for a camera held upright)")
		aspect   = fs.String("aspect", "", "chart shape to match the camera's sensor: 3:2, 4:3, 16:9 or 1:1 (default 3:2)")
		margin   = fs.Float64("margin-mm", 0, "blank border on every side of the sheet, mm (default 10)")
		dpi      = fs.Float64("dpi", 0, "printer resolution, dots per inch (default 600)")
		contrast = fs.String("contrast", "4:1", "4:1 (dark parts reflect a quarter of the paper's light) or high (black ink)")
		ruler    = fs.Float64("ruler-measured-mm", 0, "length you measured on a printout of the 100 mm ruler; the chart is redrawn so it prints at 100 mm")
		sheets   = fs.String("sheets", "1x1", "1x1, or 2x2 or 3x3 for a larger chart across that many sheets, cut and assembled on a wall")
	)
	return func() (chart.Options, error) {
		o := chart.Options{Paper: *paper, Orientation: *orient, Aspect: *aspect, MarginMM: *margin, DPI: *dpi,
			Contrast: *contrast, RulerMM: *ruler, Sheets: *sheets}
		if strings.ContainsAny(*paper, "xX") && !strings.EqualFold(*paper, "tabloid") {
			wh, err := pair(*paper, "x")
			if err != nil {
				return o, fmt.Errorf("--paper: %v", err)
			}
			o.Paper, o.PaperMM = "custom", wh
		}
		return o, nil
	}
}

func cmdChart(args []string, stdout io.Writer) error {
	fs := flag.NewFlagSet("chart", flag.ContinueOnError)
	fs.SetOutput(stdout)
	read := chartFlags(fs)
	out := fs.String("o", "", "output file; the format follows the extension: .pdf, .svg or .png (required)")
	fs.Usage = func() {
		fmt.Fprintln(stdout, "usage: sagitta chart [options] -o chart.pdf|chart.svg|chart.png")
		fmt.Fprintln(stdout, "Draws the printable test chart for your sheet and printer. Print it at 100 % (no fit to page),")
		fmt.Fprintln(stdout, "measure the 100 mm ruler, and if it is off, draw again with --ruler-measured-mm.")
		printOptions(fs, stdout)
	}
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() > 0 {
		return fmt.Errorf("%w: unexpected argument %q (options come before nothing else; use -o FILE)", errUsage, fs.Arg(0))
	}
	if *out == "" {
		return fmt.Errorf("%w: chart needs an output file: -o chart.pdf (or .svg, .png)", errUsage)
	}
	ext := strings.ToLower(strings.TrimPrefix(filepath.Ext(*out), "."))
	switch ext {
	case chart.FormatPDF, chart.FormatSVG, chart.FormatPNG:
	default:
		return fmt.Errorf("%w: cannot tell the format of %q: end the name in .pdf, .svg or .png", errUsage, *out)
	}
	opt, err := read()
	if err != nil {
		return fmt.Errorf("%w: %v", errUsage, err)
	}
	ls, err := chart.NewSheets(opt)
	if err != nil {
		return err
	}
	l := ls[0]
	var files []chart.SheetFile
	if len(ls) > 1 && ext != chart.FormatPDF {
		// One file per sheet, named after the sheet: chart-1-1.svg ...
		base := strings.TrimSuffix(*out, filepath.Ext(*out))
		if files, err = chart.SheetFiles(ls, base, ext); err != nil {
			return err
		}
	} else {
		b, err := chart.Render(opt, ext)
		if err != nil {
			return err
		}
		files = []chart.SheetFile{{Name: *out, Bytes: b}}
	}
	for _, f := range files {
		if err := os.WriteFile(f.Name, f.Bytes, 0o644); err != nil {
			return fmt.Errorf("cannot write %s: %v", f.Name, unwrapPath(err))
		}
	}
	w, h := l.ChartMM()
	orient := "landscape"
	if l.Portrait {
		orient = "portrait"
	}
	names := files[0].Name
	if len(files) > 1 {
		names = fmt.Sprintf("%s ... %s", files[0].Name, files[len(files)-1].Name)
	}
	if len(ls) > 1 {
		n := l.Design.Code.Sheets
		fmt.Fprintf(stdout, "wrote %s: %d x %d sheets %s %s, chart %s (%.1f x %.1f mm assembled), %g dpi\n", names, n, n, l.Paper, orient, l.Design.Code, w, h, l.DPI)
		fmt.Fprintln(stdout, "Cut each sheet on its dashed lines and lay the cut edge on the next sheet's solid line; hang the assembled chart flat.")
	} else {
		fmt.Fprintf(stdout, "wrote %s: %s %s, chart %s (%.1f x %.1f mm), %g dpi\n", names, l.Paper, orient, l.Design.Code, w, h, l.DPI)
	}
	fmt.Fprintln(stdout, "Print at 100 % (no fit to page) and measure the 100 mm ruler; if it is off, run again with --ruler-measured-mm.")
	for _, n := range l.Notes() {
		fmt.Fprintln(stdout, "Note: "+n)
	}
	return nil
}
