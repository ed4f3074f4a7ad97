package main

import (
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"strconv"
	"strings"

	"sagitta/core/plan"
)

func cmdPlan(args []string, stdout io.Writer) error {
	fs := flag.NewFlagSet("plan", flag.ContinueOnError)
	fs.SetOutput(stdout)
	readChart := chartFlags(fs)
	var (
		opt     plan.Options
		pixels  = fs.String("pixels", "", "photo size in pixels, WxH (e.g. 6000x4000); gives the pixel pitch with --sensor")
		chartMM = fs.String("chart-mm", "", "size of a chart already printed, WxH in mm (instead of the size the sheet gives)")
		freqs   = fs.String("freqs", "", "field frequencies on the sensor in lp/mm, comma separated (default 10,30)")
		asJSON  = fs.Bool("json", false, "print the plan as JSON")
	)
	fs.Float64Var(&opt.FocalMM, "focal-mm", 0, "focal length of the lens, mm (required)")
	fs.StringVar(&opt.Sensor, "sensor", "", "sensor size in mm as WxH (e.g. 36x24), or "+plan.SensorNames()+" (required)")
	fs.Float64Var(&opt.PitchUM, "pitch-um", 0, "pixel pitch in micrometres (or give --pixels)")
	fs.StringVar(&opt.Surface, "surface", "photo", "paper surface: photo (coated) or plain; sets how far ink spreads")
	fs.Float64Var(&opt.InkSpreadUM, "ink-spread-um", 0, "ink spread on paper in micrometres (standard deviation), instead of the surface's typical value")
	fs.Usage = func() {
		fmt.Fprintln(stdout, "usage: sagitta plan --focal-mm F --sensor WxH [options]")
		fmt.Fprintln(stdout, "Tells how far to stand so the chart fills the frame, and whether the print is sharp enough.")
		printOptions(fs, stdout)
	}
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() > 0 {
		return fmt.Errorf("%w: unexpected argument %q", errUsage, fs.Arg(0))
	}
	if opt.FocalMM == 0 || opt.Sensor == "" {
		return fmt.Errorf("%w: plan needs --focal-mm and --sensor", errUsage)
	}
	var err error
	if opt.Chart, err = readChart(); err != nil {
		return fmt.Errorf("%w: %v", errUsage, err)
	}
	if *pixels != "" {
		px, err := pair(*pixels, "x")
		if err != nil || px[0] < 1 || px[1] < 1 {
			return fmt.Errorf("%w: --pixels: %q is not a size in pixels like 6000x4000", errUsage, *pixels)
		}
		opt.Pixels = [2]int{int(px[0]), int(px[1])}
	}
	if *chartMM != "" {
		if opt.ChartMM, err = pair(*chartMM, "x"); err != nil {
			return fmt.Errorf("%w: --chart-mm: %v", errUsage, err)
		}
	}
	if *freqs != "" {
		for _, f := range strings.Split(*freqs, ",") {
			v, err := strconv.ParseFloat(strings.TrimSpace(f), 64)
			if err != nil {
				return fmt.Errorf("%w: --freqs: %q is not a number", errUsage, f)
			}
			opt.FreqsLPMM = append(opt.FreqsLPMM, v)
		}
	}
	p, err := plan.Compute(opt)
	if err != nil {
		return err
	}
	if *asJSON {
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", " ")
		return enc.Encode(p)
	}
	writePlan(stdout, opt, p)
	return nil
}

// writePlan prints the plan for people.
func writePlan(w io.Writer, opt plan.Options, p plan.Plan) {
	fmt.Fprintf(w, "Chart:          %s, %.1f x %.1f mm (%s), printed at %g dpi\n", p.Paper, p.ChartMM[0], p.ChartMM[1], p.Aspect, p.DPI)
	pitch := ""
	if p.PitchUM > 0 {
		pitch = fmt.Sprintf(", pixel pitch %.3g um", p.PitchUM)
	}
	fmt.Fprintf(w, "Camera:         %g mm lens, %g x %g mm sensor%s\n", opt.FocalMM, p.SensorMM[0], p.SensorMM[1], pitch)
	fmt.Fprintf(w, "Magnification:  %.4f (the chart's %s fills the frame's)\n", p.Magnification, p.Limit)
	fmt.Fprintf(w, "Distance:       %.0f mm from the lens to the chart (%.1f focal lengths); %.0f mm from the sensor (thin lens)\n",
		p.ObjectDistanceMM, p.FocalLengths, p.SensorToChartMM)
	for _, f := range p.Freqs {
		fmt.Fprintf(w, "On paper:       %g lp/mm on the sensor is %.3g lp/mm on paper; the print keeps %.0f %% of its contrast there\n",
			f.SensorLPMM, f.PaperLPMM, 100*f.PrintMTF)
	}
	if n := p.Nyquist; n != nil {
		fmt.Fprintf(w, "Nyquist:        %.0f lp/mm on the sensor is %.3g lp/mm on paper; the print keeps %.0f %%\n", n.SensorLPMM, n.PaperLPMM, 100*n.PrintMTF)
	}
	blur := fmt.Sprintf("Print blur:     %.1f um on paper (ink spread %g um, from memory), %.2f um on the sensor", p.PrintBlurUM, p.InkSpreadUM, p.PrintBlurSensorUM)
	if p.BlurOverPitch > 0 {
		blur += fmt.Sprintf(" (%.2f pixel)", p.BlurOverPitch)
	}
	fmt.Fprintln(w, blur)
	fmt.Fprintf(w, "Verdict:        %s. %s\n", p.Verdict, p.Summary)
	for _, a := range p.Advice {
		fmt.Fprintf(w, "  - %s\n", a)
	}
	if t := p.Tiling; t != nil && t.Enough {
		fmt.Fprintf(w, "Across sheets:  sagitta chart --sheets %s -o chart.pdf (%.0f x %.0f mm; %.0f mm from the lens to the chart)\n", t.Sheets, t.ChartMM[0], t.ChartMM[1], t.ObjectDistanceMM)
	}
	for _, a := range p.Warnings {
		fmt.Fprintf(w, "Note: %s\n", a)
	}
}
