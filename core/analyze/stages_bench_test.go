//go:build linux

package analyze

import (
	"bytes"
	"context"
	"flag"
	"fmt"
	"image/jpeg"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"runtime"
	"runtime/debug"
	"strconv"
	"syscall"
	"testing"
	"time"

	sheet "sagitta/core/chart"
	"sagitta/core/decode"
	"sagitta/core/edgefind"
	"sagitta/core/exif"
	"sagitta/core/internal/coarse"
	"sagitta/core/internal/parallel"
	"sagitta/core/sim/chartsim"
	"sagitta/core/sim/simcam"
)

// The stage table of `make bench`: BenchmarkStageTable prints one markdown
// row per stage of the native analysis of simulated 24 MP and 50 MP photos of
// Sagitta's chart (JPEG q95 with photon and read noise), and, when -cli names
// the built command-line tool, its whole run on the same files. Never part
// of the tests: times are printed, not asserted.
var (
	tableCLI   = flag.String("cli", "", "BenchmarkStageTable: the sagitta binary whose whole run on each photo is timed too")
	tableSizes = flag.String("sizes", "24,50", "BenchmarkStageTable: photo sizes in MP, comma separated (24 and 50 are known)")
)

// benchFrame is the size of a stage-table photo: 6000 x 4000 and 8688 x
// 5792 px, both 3:2 like the chart, and the full well that makes its JPEG
// a camera's size (5.4 and 8.2 MB).
var benchFrame = map[string][3]int{"24": {6000, 4000, 3000}, "50": {8688, 5792, 6000}}

// benchChartPhoto returns the simulated chart photo of a size, rendered once
// and cached under the temp directory (it takes tens of seconds to render).
// The camera: full well 3000 e- (24 MP) or 6000 e- (50 MP) at full scale
// and 3 e- read noise (a high ISO's noise, which makes q95 files of 4-10 MB,
// as cameras write), colour
// JPEG with equal channels, chroma 4:2:0 as Go's encoder writes; an invented
// lens as site/testphoto's, 4.35 um pixels named in Exif.
func benchChartPhoto(b *testing.B, size string) (string, []byte) {
	wh, ok := benchFrame[size]
	if !ok {
		b.Fatalf("no stage-table photo of %s MP", size)
	}
	dir := filepath.Join(os.TempDir(), "sagitta-bench")
	path := filepath.Join(dir, fmt.Sprintf("chart-%sMP-%de.jpg", size, wh[2]))
	if data, err := os.ReadFile(path); err == nil {
		return path, data
	}
	w, h := wh[0], wh[1]
	d, err := sheet.NewDesign(sheet.Code{Aspect: "3:2"})
	if err != nil {
		b.Fatal(err)
	}
	v := chartsim.View{W: w, H: h, Fill: 0.96, YawDeg: 2, FocalPx: 2 * float64(w)}
	scene := chartsim.Scene(d, v.Homography(d), chartsim.Print{})
	const pitch = 4.35
	lens := simcam.FieldLens{
		CentreX: float64(w) / 2, CentreY: float64(h) / 2, PitchUM: pitch,
		SigmaT: []float64{0.55, 0, 0.03}, SigmaS: []float64{0.55, 0, 0.012},
	}
	tags := exif.Tags{
		Make: "Sagitta", Model: "Sagitta Simulated Camera", LensModel: "Sagitta Simulated 35mm",
		FNumber: 5.6, FocalLengthMM: 35, ExposureTimeS: 1.0 / 125, ISO: 800,
		FocalPlaneXRes: 10000 / pitch, FocalPlaneYRes: 10000 / pitch, FocalPlaneResUnit: exif.UnitCentimetre,
	}
	cam := simcam.Camera{W: w, H: h, Lens: lens, FullWellE: float64(wh[2]), ReadNoiseE: 3, Seed: 7,
		Encoding: simcam.SRGB8, Colour: true, JPEGQuality: 95, ExifAPP1: exif.Encode(tags)}
	data, err := cam.Encode(scene)
	if err != nil {
		b.Fatal(err)
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		b.Fatal(err)
	}
	tmp := path + ".tmp"
	if err := os.WriteFile(tmp, data, 0o644); err != nil {
		b.Fatal(err)
	}
	if err := os.Rename(tmp, path); err != nil {
		b.Fatal(err)
	}
	return path, data
}

// stageCost is what one stage took: wall time, bytes allocated and the peak
// resident set while it ran (with its inputs held), or -1 when the kernel
// does not let the peak be reset.
type stageCost struct {
	wall   time.Duration
	cpu    time.Duration // user + system time of the process (-1: unknown)
	alloc  uint64
	peakKB int64
}

// cpuTime is the process's user + system time so far (getrusage).
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if syscall.Getrusage(syscall.RUSAGE_SELF, &ru) != nil {
		return -1
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// measureStage runs f once after a collection that returns freed memory to
// the system, and resets the kernel's peak-RSS mark first (Linux
// /proc/self/clear_refs "5", proc(5)), so the peak is this stage's.
func measureStage(f func()) stageCost {
	runtime.GC()
	debug.FreeOSMemory()
	reset := os.WriteFile("/proc/self/clear_refs", []byte("5"), 0) == nil
	var m0, m1 runtime.MemStats
	runtime.ReadMemStats(&m0)
	c0 := cpuTime()
	t0 := time.Now()
	f()
	wall := time.Since(t0)
	c1 := cpuTime()
	runtime.ReadMemStats(&m1)
	c := stageCost{wall: wall, cpu: -1, alloc: m1.TotalAlloc - m0.TotalAlloc, peakKB: -1}
	if c0 >= 0 && c1 >= 0 {
		c.cpu = c1 - c0
	}
	if reset {
		c.peakKB = statusKB("VmHWM")
	}
	return c
}

// statusKB reads a "Name: N kB" line of /proc/self/status (-1 if absent).
func statusKB(name string) int64 {
	s, err := os.ReadFile("/proc/self/status")
	if err != nil {
		return -1
	}
	m := regexp.MustCompile(`(?m)^` + name + `:\s+(\d+) kB`).FindSubmatch(s)
	if m == nil {
		return -1
	}
	n, _ := strconv.ParseInt(string(m[1]), 10, 64)
	return n
}

// row prints one line of the table in the format shared with the browser
// rows: | where | size | stage | time | allocated | peak |; the stage names
// the CPU time beside the wall time (a busy machine inflates it less).
func row(where, size, stage string, c stageCost) {
	peak := "-"
	if c.peakKB >= 0 {
		peak = fmt.Sprintf("%.0f MB peak", float64(c.peakKB)/1024)
	}
	alloc := "-"
	if c.alloc > 0 {
		alloc = fmt.Sprintf("%.0f MB alloc", float64(c.alloc)/(1<<20))
	}
	if c.cpu >= 0 {
		stage += fmt.Sprintf(" (%.2f s CPU)", c.cpu.Seconds())
	}
	fmt.Printf("| %s | %s MP | %s | %.2f s | %s | %s |\n", where, size, stage, c.wall.Seconds(), alloc, peak)
}

// BenchmarkStageTable prints the native rows of `make bench` (see above).
// Run it alone with -benchtime 1x: it measures each stage once per photo.
func BenchmarkStageTable(b *testing.B) {
	sizes := regexp.MustCompile(`\d+`).FindAllString(*tableSizes, -1)
	fmt.Printf("\n| where | photo | stage | time | allocated | peak RSS |\n|---|---|---|---|---|---|\n")
	for b.Loop() {
		for _, size := range sizes {
			path, data := benchChartPhoto(b, size)
			stageRows(b, size, data)
			if *tableCLI != "" {
				cliRow(b, size, path)
			}
		}
	}
}

// stageRows measures the native stages of Run on one photo, each alone with
// its inputs prepared beforehand, then Run whole.
func stageRows(b *testing.B, size string, data []byte) {
	ctx := context.Background()
	row("native", size, "decode (JPEG only)", measureStage(func() {
		if _, err := jpeg.Decode(bytes.NewReader(data)); err != nil {
			b.Fatal(err)
		}
	}))
	var dec *decode.Image
	row("native", size, "decode + luminance", measureStage(func() {
		var err error
		if dec, err = decode.Decode(data, decode.Options{}); err != nil {
			b.Fatal(err)
		}
	}))
	img := &Image{Width: dec.Width, Height: dec.Height, Exif: exifOf(dec.Exif)}
	geo, err := placeFrame(img, Settings{}, DefaultFreqsLPMM)
	if err != nil {
		b.Fatal(err)
	}
	var pose *sheet.Pose
	row("native", size, "chart recognition + tone", measureStage(func() {
		pose, _ = sheet.Recognise(dec.Lum)
		if pose != nil {
			fitTone(dec.Lum, pose, true)
		}
	}))
	if pose == nil {
		b.Fatal("the chart was not recognised")
	}
	var cands []edgefind.Candidate
	row("native", size, "edge find", measureStage(func() {
		cands, _ = edgefind.Edges(dec.Lum, edgefind.Options{})
	}))
	var jobs []PatternJob
	row("native", size, "sine search", measureStage(func() {
		jobs = findPatterns(coarse.NewViews(dec.Lum), geo, pose)
	}))
	parts := make([]Part, len(jobs))
	row("native", size, fmt.Sprintf("sine patterns measured (%d)", len(jobs)), measureStage(func() {
		parallel.For(len(jobs), 0, func(i int) {
			parts[i] = measurePattern(dec.Lum, jobs[i], [2]float64{geo.CentreX, geo.CentreY}, i)
		})
	}))
	pats := patternsOf(jobs, parts, pose)
	kept := cands[:0]
	for _, c := range cands {
		if !pats.overlaps(c.Region.Corners()) {
			kept = append(kept, c)
		}
	}
	cands = kept
	row("native", size, fmt.Sprintf("edges measured (%d)", len(cands)), measureStage(func() {
		measureAll(ctx, dec, regionsOf(cands), measureOptions{}, 0, func(int) {})
	}))
	dec = nil
	res, err := Run(ctx, "chart.jpg", data, Settings{}, nil)
	if err != nil {
		b.Fatal(err)
	}
	row("native", size, "summarise (Resummarise)", measureStage(func() {
		if _, err := Resummarise(res, Settings{}); err != nil {
			b.Fatal(err)
		}
	}))
	res = nil
	row("native", size, "Run, whole", measureStage(func() {
		if _, err := Run(ctx, "chart.jpg", data, Settings{}, nil); err != nil {
			b.Fatal(err)
		}
	}))
}

// cliRow times the command-line tool's whole analysis of the file (JSON to
// a discarded output) and reads its CPU time (user + system, which a busy
// machine inflates less than the wall time) from the kernel's accounting of
// the child. Its peak RSS is the largest VmHWM read from /proc/PID/status
// while it runs (proc(5)), every 10 ms: the child's ru_maxrss is no use, as
// a forked child starts with its parent's high-water mark (this benchmark's
// own, 288 MB at 24 MP, was reported as the tool's).
func cliRow(b *testing.B, size, path string) {
	cmd := exec.Command(*tableCLI, "analyze", "--json", path)
	cmd.Stdout, cmd.Stderr = nil, os.Stderr
	t0 := time.Now()
	if err := cmd.Start(); err != nil {
		b.Fatalf("%s: %v", *tableCLI, err)
	}
	peak := make(chan int64)
	stop := make(chan struct{})
	go func() {
		var hwm int64 = -1
		status := fmt.Sprintf("/proc/%d/status", cmd.Process.Pid)
		for {
			if kb := vmHWM(status); kb > hwm {
				hwm = kb
			}
			select {
			case <-stop:
				peak <- hwm
				return
			case <-time.After(10 * time.Millisecond):
			}
		}
	}()
	err := cmd.Wait()
	close(stop)
	c := stageCost{wall: time.Since(t0), cpu: cmd.ProcessState.UserTime() + cmd.ProcessState.SystemTime(), peakKB: <-peak}
	if err != nil {
		b.Fatalf("%s: %v", *tableCLI, err)
	}
	st, _ := os.Stat(path)
	row("CLI", size, fmt.Sprintf("whole analysis, %.1f MB file", float64(st.Size())/1e6), c)
}

// vmHWMLine is the peak resident set's line of a /proc status file.
var vmHWMLine = regexp.MustCompile(`(?m)^VmHWM:\s+(\d+) kB`)

// vmHWM reads a process's peak resident set (kB) from its /proc status
// file, or -1.
func vmHWM(status string) int64 {
	b, err := os.ReadFile(status)
	if err != nil {
		return -1
	}
	m := vmHWMLine.FindSubmatch(b)
	if m == nil {
		return -1
	}
	kb, err := strconv.ParseInt(string(m[1]), 10, 64)
	if err != nil {
		return -1
	}
	return kb
}
