package raw

import (
	"math"
	"testing"

	"sagitta/core/sim/simcam"
)

// variants are the simulated camera's DNG layouts every reader test runs
// through. Names are invented.
// libraw marks the layouts libraw 0.20 (Debian 12's libraw-bin) reads:
// it stops with "Unexpected end of file" on our uncompressed tiled files,
// even with tiles as wide as the image, whose bytes are then exactly those
// of the strips it reads, and it reads only the first strip of a lossless JPEG file in strips, so
// those two layouts are checked against the writer's codes only. Strips
// carry restart intervals; T.81 H.1.2.1 restarts the prediction there (as we read it) as
// on the first line (Ra only), which libraw does not do for predictors
// 2 to 7 (it keeps predicting from the line above), so a strip with
// restarts is compared with predictor 1, where both readings agree.
var variants = []struct {
	name   string
	o      simcam.DNG
	libraw bool
}{
	{"14-bit strips LE", simcam.DNG{Make: "Orrery Optical", Model: "Fieldmark 7", Gains: [3]float64{0.55, 1, 0.7}, FNumber: 5.6, FocalLengthMM: 50, PitchUM: 4.3}, true},
	{"12-bit packed BE SubIFD crop", simcam.DNG{Bits: 12, BigEndian: true, SubIFD: true, Margin: 4, Pattern: "GRBG"}, true},
	{"16-bit tiles", simcam.DNG{Bits: 16, Black: 2048, TileW: 48, TileH: 32, Pattern: "BGGR"}, false},
	{"8-bit strips", simcam.DNG{Bits: 8, Black: 16, RowsPerStrip: 7}, true},
	{"10-bit packed tiles", simcam.DNG{Bits: 10, Black: 64, TileW: 40, TileH: 24, Pattern: "GBRG"}, false},
	{"lossless tiles pred 1", simcam.DNG{Lossless: true, TileW: 64, TileH: 32, Margin: 2}, true},
	{"lossless tiles pred 6 BE", simcam.DNG{Lossless: true, TileW: 32, TileH: 16, Predictor: 6, BigEndian: true, SubIFD: true}, true},
	{"lossless strips 16-bit pred 7", simcam.DNG{Lossless: true, Bits: 16, Black: 1000, Predictor: 7, RowsPerStrip: 40}, false},
	{"lossless one strip with restarts 16-bit", simcam.DNG{Lossless: true, Bits: 16, Black: 1000, RowsPerStrip: 120, Margin: 6}, true},
	{"12-bit per-site black and a linearisation table", simcam.DNG{Bits: 12, SiteBlack: []int{250, 260, 255, 270}, Table: curve12(), Pattern: "BGGR"}, true},
	{"lossless tiles pred 7 16-bit", simcam.DNG{Lossless: true, Bits: 16, TileW: 96, TileH: 64, Predictor: 7, Pattern: "GRBG"}, true},
}

// curve12 is a 12-bit linearisation table, 4095 (i/4095)^1.2.
func curve12() []uint16 {
	t := make([]uint16, 4096)
	for i := range t {
		t[i] = uint16(math.Round(4095 * math.Pow(float64(i)/4095, 1.2)))
	}
	return t
}

// testCamera renders a slanted edge with photon noise, so every code
// differs from its neighbours.
func testCamera() (*simcam.Camera, simcam.Scene) {
	c := &simcam.Camera{W: 200, H: 120, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: 1, Sigma2: 1}}, FullWellE: 4000, Seed: 7}
	return c, simcam.HalfPlaneScene(200, 120, 5, 0.05, 0.8)
}

// TestReadBack checks every variant against the codes the simulated camera
// wrote (simcam.MosaicCodes of the same noisy plane) and the decoded values
// against (code - black) / (white - black).
func TestReadBack(t *testing.T) {
	c, s := testCamera()
	for _, v := range variants {
		t.Run(v.name, func(t *testing.T) {
			data, err := c.EncodeDNG(s, v.o)
			if err != nil {
				t.Fatal(err)
			}
			r, err := ReadRaster(data, Options{})
			if err != nil {
				t.Fatal(err)
			}
			if r.W != 200 || r.H != 120 || r.Samples != 1 {
				t.Fatalf("raster %dx%dx%d", r.W, r.H, r.Samples)
			}
			img, err := Decode(data, Options{})
			if err != nil {
				t.Fatal(err)
			}
			o := v.o
			bits := max(o.Bits, 0)
			if bits == 0 {
				bits = 14
			}
			white := o.White
			if white == 0 {
				white = 1<<bits - 1
			}
			black := o.Black
			if black == 0 && bits >= 12 {
				black = 512
			}
			if img.Width != 200-2*o.Margin || img.Height != 120-2*o.Margin || !img.CFA || img.Bits != bits {
				t.Fatalf("image %dx%d cfa %v bits %d", img.Width, img.Height, img.CFA, img.Bits)
			}
			pat := o.Pattern
			if pat == "" {
				pat = "RGGB"
			}
			if img.Pattern.String() != pat { // even margins keep the phase
				t.Errorf("pattern %s, want %s", img.Pattern, pat)
			}
			siteBlack := func(x, y int) float64 { return float64(black) }
			if len(o.SiteBlack) == 4 {
				black = (o.SiteBlack[0] + o.SiteBlack[1] + o.SiteBlack[2] + o.SiteBlack[3]) / 4
				siteBlack = func(x, y int) float64 { return float64(o.SiteBlack[(y%2)*2+x%2]) }
			}
			if math.Abs(img.Black-float64(black)) > 1 || img.White != float64(white) {
				t.Errorf("levels %v %v, want %d %d", img.Black, img.White, black, white)
			}
			var worst float64
			for y := 0; y < img.Height; y++ {
				for x := 0; x < img.Width; x++ {
					code := float64(r.Codes[(y+o.Margin)*r.W+x+o.Margin])
					if o.Table != nil {
						code = float64(o.Table[int(code)])
					}
					b := siteBlack(x+o.Margin, y+o.Margin)
					want := (code - b) / (float64(white) - b)
					worst = math.Max(worst, math.Abs(float64(img.Mosaic.At(x, y))-want))
				}
			}
			if worst > 1e-6 {
				t.Errorf("decoded values off by %g", worst)
			}
		})
	}
	// Noise-free, the codes are exactly those the camera computes.
	quiet := *c
	quiet.FullWellE = 0
	p, err := quiet.Render(s)
	if err != nil {
		t.Fatal(err)
	}
	for _, v := range variants {
		data, _ := quiet.EncodeDNG(s, v.o)
		r, err := ReadRaster(data, Options{})
		if err != nil {
			t.Fatal(err)
		}
		want := simcam.MosaicCodes(p, v.o)
		for i := range want {
			if r.Codes[i] != want[i] {
				t.Fatalf("%s: code %d = %d, want %d", v.name, i, r.Codes[i], want[i])
			}
		}
	}
	// The camera data of the first variant.
	data, _ := c.EncodeDNG(s, variants[0].o)
	img, err := Decode(data, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if img.Make != "Orrery Optical" || img.Exif.Model != "Fieldmark 7" || img.Exif.FNumber != 5.6 || img.Exif.FocalLengthMM != 50 || img.UniqueCameraModel != "Simulated camera" {
		t.Errorf("camera data %+v / %+v", img, img.Exif)
	}
	if pitch, ok := img.Exif.PixelPitchUM(); !ok || math.Abs(pitch-4.3) > 1e-3 {
		t.Errorf("pitch %v %v", pitch, ok)
	}
	if len(img.Neutral) != 3 || math.Abs(img.Neutral[0]-0.55) > 1e-6 {
		t.Errorf("neutral %v", img.Neutral)
	}
}

// TestActiveArea: the colour filter pattern starts at the active area's
// top-left (DNG 1.4, chapter 4, ActiveArea and CFAPattern), and a default
// crop reaching outside the active area falls back to the whole active area
// with a note.
func TestActiveArea(t *testing.T) {
	data := dngOf(t, simcam.DNG{Pattern: "RGGB"})
	e, bo := rawEntry(t, data, tagActiveArea)
	b := append([]byte(nil), data...)
	for i, v := range []uint32{2, 1, 120, 200} { // top, left, bottom, right
		bo.PutUint32(b[e.off+4*uint64(i):], v)
	}
	img, err := Decode(b, Options{})
	if err != nil {
		t.Fatal(err)
	}
	r, _ := ReadRaster(b, Options{})
	if img.Width != 199 || img.Height != 118 {
		t.Fatalf("size %dx%d, want 199x118", img.Width, img.Height)
	}
	if img.Pattern.String() != "RGGB" {
		// The pattern is relative to the active area: its top-left site is
		// red whatever the offset.
		t.Errorf("pattern %s, want RGGB", img.Pattern)
	}
	want := (float64(r.Codes[2*r.W+1]) - 512) / (16383 - 512)
	if got := float64(img.Mosaic.At(0, 0)); math.Abs(got-want) > 1e-6 {
		t.Errorf("first value %v, want %v (raw (1, 2))", got, want)
	}
	if len(img.Warnings) == 0 {
		t.Error("no note about the default crop")
	}
	// A crop inside the active area shifts the pattern by its origin.
	c, s := testCamera()
	data2, _ := c.EncodeDNG(s, simcam.DNG{Pattern: "RGGB", Margin: 2})
	e2, bo2 := rawEntry(t, data2, tagDefaultCropOrigin)
	b2 := append([]byte(nil), data2...)
	bo2.PutUint32(b2[e2.off:], 3) // x origin 3: odd, so the crop starts on a green site
	img2, err := Decode(b2, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if img2.Pattern.String() != "GRBG" {
		t.Errorf("pattern of a crop starting at x = 3: %s, want GRBG", img2.Pattern)
	}
}
