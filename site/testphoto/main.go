// Command testphoto writes a simulated photo of a chart of slanted squares
// for the page's browser tests and timings: a W x H frame from the simulated
// camera (core/sim/simcam) behind an invented lens that softens towards the
// corners, sagittal and tangential differently, with photon and read noise,
// saved as JPEG (or PNG, a 16-bit TIFF, or a raw DNG by extension) with Exif naming the
// "Sagitta Simulated Camera".
//
//	testphoto -w 3000 -h 2000 -f 5.6 -o photo.jpg
package main

import (
	"bytes"
	"flag"
	"fmt"
	"image"
	"math"
	"os"
	"path/filepath"
	"strings"

	"golang.org/x/image/tiff"

	sheet "sagitta/core/chart"
	"sagitta/core/exif"
	"sagitta/core/sim/chartsim"
	"sagitta/core/sim/simcam"
)

func main() {
	w := flag.Int("w", 3000, "width, px")
	h := flag.Int("h", 2000, "height, px")
	fnum := flag.Float64("f", 5.6, "f-number written to Exif; the lens gets softer at wider apertures")
	pitch := flag.Float64("pitch-um", 4.35, "pixel pitch, um (written to Exif as the focal-plane resolution)")
	seed := flag.Uint64("seed", 1, "noise seed")
	onChart := flag.Bool("chart", false, "photograph Sagitta's printed chart (3:2, core/chart) instead of the grid of squares, turned 2 degrees away")
	sheets := flag.Bool("sheets", false, "with -chart: the chart across 2 x 2 A4 sheets, each hung up to 2 mm off and turned up to 1 degree")
	patterns := flag.Bool("patterns", false, "add a sine star at the centre and a set of sine gratings below it")
	orient := flag.Int("orientation", 0, "Exif orientation to write (1..8; 0 = none): how a viewer should turn the stored pixels")
	out := flag.String("o", "photo.jpg", "output file: .jpg, .png, .tif or .dng")
	flag.Parse()
	if err := run(*w, *h, *fnum, *pitch, *seed, *orient, *patterns, *onChart, *sheets, *out); err != nil {
		fmt.Fprintln(os.Stderr, "testphoto: "+err.Error())
		os.Exit(1)
	}
}

func run(w, h int, fnum, pitch float64, seed uint64, orient int, patterns, onChart, sheets bool, out string) error {
	scene := chart(w, h)
	switch {
	case onChart && sheets:
		ls, err := sheet.NewSheets(sheet.Options{Sheets: "2x2"})
		if err != nil {
			return err
		}
		d := ls[0].Design
		v := chartsim.View{W: w, H: h, Fill: 0.96, YawDeg: 2, FocalPx: 2 * float64(w)}
		hung := []chartsim.Hung{{DXMM: 1.5, DYMM: -1, TurnDeg: 0.6}, {DXMM: -2, DYMM: 1, TurnDeg: -0.4}, {DXMM: 1, DYMM: 2, TurnDeg: 0.3}, {DXMM: -1, DYMM: -1.5, TurnDeg: -1}}
		scene = chartsim.TiledScene(d, v.Homography(d), hung, ls[0].UnitMM, chartsim.Print{})
	case onChart:
		d, err := sheet.NewDesign(sheet.Code{Aspect: "3:2"})
		if err != nil {
			return err
		}
		v := chartsim.View{W: w, H: h, Fill: 0.96, YawDeg: 2, FocalPx: 2 * float64(w)}
		scene = chartsim.Scene(d, v.Homography(d), chartsim.Print{})
	}
	if patterns {
		addPatterns(&scene, w, h)
	}
	// An invented lens: 0.55 px blur at the centre, growing with the square
	// of the image height, faster tangentially; sharpest at f/5.6, softer
	// wide open and a little softer stopped down.
	k := 1 + 0.6*math.Max(0, 5.6-fnum)/4 + 0.05*math.Max(0, fnum-5.6)
	lens := simcam.FieldLens{
		CentreX: float64(w) / 2, CentreY: float64(h) / 2, PitchUM: pitch,
		SigmaT: []float64{0.55 * k, 0, 0.03 * k}, SigmaS: []float64{0.55 * k, 0, 0.012 * k},
	}
	cam := simcam.Camera{W: w, H: h, Lens: lens, FullWellE: 30000, ReadNoiseE: 3, Seed: seed, Encoding: simcam.SRGB8}
	tags := exif.Tags{
		Make: "Sagitta", Model: "Sagitta Simulated Camera", LensModel: "Sagitta Simulated 35mm",
		FNumber: fnum, FocalLengthMM: 35, ExposureTimeS: 1.0 / 125, ISO: 100,
		FocalPlaneXRes: 10000 / pitch, FocalPlaneYRes: 10000 / pitch, FocalPlaneResUnit: exif.UnitCentimetre,
		Orientation: orient,
	}
	var data []byte
	var err error
	switch strings.ToLower(filepath.Ext(out)) {
	case ".jpg", ".jpeg":
		cam.JPEGQuality = 95
		cam.ExifAPP1 = exif.Encode(tags)
		data, err = cam.Encode(scene)
	case ".png":
		data, err = cam.Encode(scene)
	case ".tif", ".tiff":
		cam.Encoding = simcam.SRGB16
		var buf bytes.Buffer
		var img image.Image
		if err = cam.Validate(); err == nil {
			img = cam.Capture(scene)
			err = tiff.Encode(&buf, img, &tiff.Options{Compression: tiff.Deflate})
		}
		data = buf.Bytes()
	case ".dng":
		// The raw file: an RGGB mosaic with filters of different
		// transmission, 14-bit lossless JPEG tiles (core/sim/simcam).
		data, err = cam.EncodeDNG(scene, simcam.DNG{
			Gains: [3]float64{0.55, 1, 0.7}, Lossless: true, TileW: 256, TileH: 256,
			Make: tags.Make, Model: tags.Model, UniqueCameraModel: tags.Model,
			FNumber: fnum, FocalLengthMM: 35, PitchUM: pitch,
		})
	default:
		return fmt.Errorf("unknown output type %q", out)
	}
	if err != nil {
		return err
	}
	return os.WriteFile(out, data, 0o644)
}

// chart lays out dark squares, turned 5 degrees so that their edges are
// slanted, on a light background over the whole frame.
func chart(w, h int) simcam.Scene {
	s := simcam.Scene{Background: 0.75}
	side := float64(h) / 9
	cols := int(float64(w) / (side * 1.9))
	rows := int(float64(h) / (side * 1.9))
	dx := float64(w) / float64(cols)
	dy := float64(h) / float64(rows)
	for j := 0; j < rows; j++ {
		for i := 0; i < cols; i++ {
			cx, cy := (float64(i)+0.5)*dx, (float64(j)+0.5)*dy
			s.Polygons = append(s.Polygons, simcam.Square(cx, cy, side, 5, 0.04))
		}
	}
	return s
}

// addPatterns puts a sinusoidal star at the centre of the frame and a set of
// four sine gratings (0.02, 0.1, 0.2 and 0.3 cycles/pixel; the first is the
// reference) below it, and removes the squares that would overlap them
// (patterns and polygons must not meet, see simcam.Scene).
func addPatterns(s *simcam.Scene, w, h int) {
	cx, cy := float64(w)/2, float64(h)/2
	r := float64(h) / 7
	s.Stars = append(s.Stars, simcam.Star{X: cx, Y: cy, Radius: r, Cycles: 48, Mean: 0.42, Amplitude: 0.32})
	gw, gh := float64(w)/9, float64(h)/14
	gy := cy + r + gh
	var areas [][4]float64 // x0, y0, x1, y1 of each pattern, px
	areas = append(areas, [4]float64{cx - r, cy - r, cx + r, cy + r})
	for i, f := range []float64{0.02, 0.1, 0.2, 0.3} {
		gx := cx + (float64(i)-1.5)*gw*1.15
		c := [4][2]float64{{gx - gw/2, gy - gh/2}, {gx + gw/2, gy - gh/2}, {gx + gw/2, gy + gh/2}, {gx - gw/2, gy + gh/2}}
		s.Gratings = append(s.Gratings, simcam.Grating{Corners: c, FreqCyPx: f, Mean: 0.42, Amplitude: 0.3})
		areas = append(areas, [4]float64{gx - gw/2, gy - gh/2, gx + gw/2, gy + gh/2})
	}
	const margin = 30 // px kept clear around each pattern
	kept := s.Polygons[:0]
	for _, p := range s.Polygons {
		x0, y0, x1, y1 := math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
		for _, q := range p.Pts {
			x0, y0 = math.Min(x0, q[0]), math.Min(y0, q[1])
			x1, y1 = math.Max(x1, q[0]), math.Max(y1, q[1])
		}
		clear := true
		for _, a := range areas {
			if x1+margin > a[0] && x0-margin < a[2] && y1+margin > a[1] && y0-margin < a[3] {
				clear = false
			}
		}
		if clear {
			kept = append(kept, p)
		}
	}
	s.Polygons = kept
}
