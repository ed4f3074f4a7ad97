// Package demo holds Sagitta's built-in demonstration: an invented lens on
// an invented camera photographing a sheet of tilted squares, rendered by
// the simulated camera (core/sim/simcam). Every number here is made up for the
// demonstration; none describes a real product. Because the lens is
// simulated, its true MTF at every point is known, which makes the demo
// photo a test input too.
//
// The scenario: a 24 MP full-frame body (6000 x 4000 px, 6 um pitch,
// 36 x 24 mm) with an 85 mm f/1.8 portrait lens at f/2.8. The lens is
// slightly astigmatic (its PSF grows faster along the radius than across
// it, so tangential detail softens first towards the corners), slightly
// decentred (one side of the frame is softer than the other), bends
// straight lines a little outwards towards the corners (mild barrel
// distortion, -0.8 % at the corner) and darkens the corners by about two
// thirds of a stop at f/2.8 (the cosine-fourth law and a little more from
// the barrel). Its photos of the chart (Photo, RawPhoto) also show some
// lateral chromatic aberration: red imaged 0.03 % larger and blue 0.04 %
// smaller than green, about 1.1 px and 1.4 px at the corner of the 24 MP
// frame.
package demo

import (
	"math"

	"sagitta/core/chart"
	"sagitta/core/exif"
	"sagitta/core/sim/chartsim"
	"sagitta/core/sim/simcam"
)

// Scenario describes a simulated photo: sensor, lens and sheet.
type Scenario struct {
	W, H    int     // sensor size, px
	PitchUM float64 // pixel pitch, um
	Lens    simcam.FieldLens
	Dark    float64 // linear level of the squares
	Light   float64 // linear level of the paper
	// Exposure and file.
	FullWellE, ReadNoiseE float64
	Seed                  uint64
	JPEGQuality           int
	Tags                  exif.Tags
	// ChannelMag is the lens's lateral chromatic aberration in the chart
	// photos: red, green and blue magnifications differ by these fractions
	// (simcam.Camera.ChannelMag).
	ChannelMag [3]float64
	// Distortion and Falloff bend and shade the frame (simcam).
	Distortion simcam.Distortion
	Falloff    simcam.Falloff
}

// Portrait returns the built-in demo scenario at the full 24 MP size.
func Portrait() Scenario { return portrait(1) }

// PortraitSmall returns the same scenario on a sensor reduced by an integer
// factor (same field of view, pixels `reduce` times larger): quick to
// render, for tests and a fast first look.
func PortraitSmall(reduce int) Scenario { return portrait(reduce) }

func portrait(reduce int) Scenario {
	k := float64(max(reduce, 1))
	w, h := 6000/int(k), 4000/int(k)
	pitch := 6 * k
	// PSF widths in um, growing with image height h (mm): the tangential
	// width faster than the sagittal one (astigmatism), both from a sharp
	// centre. Converted to px of this sensor.
	px := func(um float64) float64 { return um / pitch }
	lens := simcam.FieldLens{
		CentreX: float64(w) / 2, CentreY: float64(h) / 2, PitchUM: pitch,
		SigmaT:    []float64{px(4.8), 0, px(0.030)},
		SigmaS:    []float64{px(4.8), 0, px(0.012)},
		TiltPerMM: 0.012, TiltDeg: 180, // left side softer
	}
	res := 10000 / pitch // px per cm on the focal plane
	return Scenario{
		W: w, H: h, PitchUM: pitch, Lens: lens,
		Dark: 0.04, Light: 0.72,
		FullWellE: 30000, ReadNoiseE: 4, Seed: 85,
		JPEGQuality: 92,
		ChannelMag:  [3]float64{0.0003, 0, -0.0004},
		Distortion:  simcam.Distortion{K1: -0.008},
		// The exit pupil about the focal length from the sensor (85 mm:
		// 14 degrees at the corner, -0.18 EV) and half a stop more from
		// the barrel at the corner.
		Falloff: simcam.Falloff{Cos4FocalPx: 85000 / pitch, CornerEV: 0.5},
		Tags: exif.Tags{
			Make: "Sagitta (simulated)", Model: "Simulated 24 MP body",
			LensModel: "Simulated 85 mm f/1.8 portrait lens",
			FNumber:   2.8, FocalLengthMM: 85, ExposureTimeS: 1.0 / 160, ISO: 100,
			FocalPlaneXRes: res, FocalPlaneYRes: res, FocalPlaneResUnit: exif.UnitCentimetre,
		},
	}
}

// Sheet returns the scene: a grid of dark squares on light paper filling
// the frame. Each square is turned so that its sides run along and across
// the radius from the image centre, plus a slant of a few degrees (about 5,
// common practice for the slanted-edge method) chosen so that no side lies
// within 1.5 degrees of a critical angle (a ratio of small integers) in the
// pixel grid.
func (s Scenario) Sheet() simcam.Scene {
	cols, rows := 9, 6
	cw, ch := float64(s.W)/float64(cols), float64(s.H)/float64(rows)
	side := 0.46 * math.Min(cw, ch)
	scene := simcam.Scene{Background: s.Light}
	cx, cy := float64(s.W)/2, float64(s.H)/2
	for j := 0; j < rows; j++ {
		for i := 0; i < cols; i++ {
			x := (float64(i) + 0.5) * cw
			y := (float64(j) + 0.5) * ch
			radial := math.Atan2(y-cy, x-cx) * 180 / math.Pi
			if x == cx && y == cy {
				radial = 0
			}
			scene.Polygons = append(scene.Polygons, simcam.Square(x, y, side, radial+slant(radial), s.Dark))
		}
	}
	return scene
}

// critical lists edge angles (degrees, modulo 90) whose tangent is a ratio
// of small integers: the pixel phases along such an edge repeat quickly.
var critical = []float64{0, 90, 45, 26.565, 63.435, 18.435, 71.565, 14.036, 75.964, 33.690, 56.310}

// slant returns a turn between 3 and 8 degrees that keeps both side
// directions of a square turned by radial+slant clear of critical angles.
func slant(radial float64) float64 {
	for s := 5.0; s <= 8; s += 0.25 {
		for _, c := range []float64{s, 10 - s} { // try 5, 5.25/4.75, ...
			if clear(radial + c) {
				return c
			}
		}
	}
	return 5
}

func clear(a float64) bool {
	a = math.Mod(math.Mod(a, 90)+90, 90)
	for _, c := range critical {
		if math.Abs(a-c) < 1.5 {
			return false
		}
	}
	return true
}

// Camera returns the simulated camera for the scenario, with the lens's
// fall-off (its distortion is added for the chart's photos: Photo,
// RawPhoto).
func (s Scenario) Camera() *simcam.Camera {
	return &simcam.Camera{
		W: s.W, H: s.H, Lens: s.Lens,
		FullWellE: s.FullWellE, ReadNoiseE: s.ReadNoiseE, Seed: s.Seed,
		Encoding: simcam.SRGB8, Colour: true, JPEGQuality: s.JPEGQuality,
		ExifAPP1: exif.Encode(s.Tags),
		Falloff:  &s.Falloff,
	}
}

// ChartScene returns Sagitta's own printed chart (3:2, 4:1 contrast) as
// the scenario's camera sees it: filling 97 % of the frame, turned by 0.4
// degrees and seen from a hair off square (0.3 degrees of yaw), as a
// careful home set-up would leave it. The chart's squares, marks, stars and
// gratings are all in view.
func (s Scenario) ChartScene() (simcam.Scene, error) {
	d, err := chart.NewDesign(chart.Code{Aspect: "3:2"})
	if err != nil {
		return simcam.Scene{}, err
	}
	focalPx := s.Tags.FocalLengthMM * 1000 / s.PitchUM
	v := chartsim.View{W: s.W, H: s.H, Fill: 0.97, RollDeg: 0.4, YawDeg: 0.3, FocalPx: focalPx}
	return chartsim.Scene(d, v.Homography(d), chartsim.Print{Paper: s.Light}), nil
}

// Photo renders the scenario's photo of Sagitta's chart as JPEG bytes with
// its Exif block.
func (s Scenario) Photo() ([]byte, error) {
	sc, err := s.ChartScene()
	if err != nil {
		return nil, err
	}
	return s.chartCamera().Encode(sc)
}

// chartCamera is the camera of the chart's photos: Camera with the lens's
// lateral chromatic aberration and distortion. The plain sheet of squares
// (SquaresPhoto) keeps the camera without them: its tests compare the
// luminance's MTF with the simulation's, which colour fringes would soften,
// and match each measured edge with the sheet's straight sides.
func (s Scenario) chartCamera() *simcam.Camera {
	c := s.Camera()
	c.ChannelMag = s.ChannelMag
	c.Distortion = &s.Distortion
	return c
}

// SquaresPhoto renders the scenario's photo of the plain sheet of squares
// (Sheet) as JPEG bytes.
func (s Scenario) SquaresPhoto() ([]byte, error) {
	return s.Camera().Encode(s.Sheet())
}

// RawPhoto renders the scenario's photo of Sagitta's chart as the camera's
// raw file: a DNG holding the RGGB mosaic (14-bit, lossless JPEG tiles;
// red and blue filters passing 55 % and 70 % of what green does), with the
// scenario's camera data. Raw data are neither sharpened nor compressed
// lossily, so they show the lens and the sensor alone.
func (s Scenario) RawPhoto() ([]byte, error) {
	sc, err := s.ChartScene()
	if err != nil {
		return nil, err
	}
	return s.chartCamera().EncodeDNG(sc, simcam.DNG{
		Gains: [3]float64{0.55, 1, 0.7}, Lossless: true, TileW: 256, TileH: 256,
		Make: s.Tags.Make, Model: s.Tags.Model, UniqueCameraModel: s.Tags.Model,
		FNumber: s.Tags.FNumber, FocalLengthMM: s.Tags.FocalLengthMM, PitchUM: s.PitchUM,
	})
}
