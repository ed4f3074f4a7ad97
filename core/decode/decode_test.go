package decode

import (
	"bytes"
	"image"
	"image/color"
	"image/jpeg"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"golang.org/x/image/tiff"

	"sagitta/core/exif"
	"sagitta/core/internal/imagemagick"
)

// TestRec709Weights: pure 8-bit red, green and blue give the BT.709
// luminance coefficients (Rec. ITU-R BT.709-6, item 3.2), white gives 1.
func TestRec709Weights(t *testing.T) {
	tests := []struct {
		name string
		in   color.RGBA
		want float64
		tol  float64
	}{
		{"red -> 0.2126 (BT.709)", color.RGBA{255, 0, 0, 255}, 0.2126, 1e-6},
		{"green -> 0.7152 (BT.709)", color.RGBA{0, 255, 0, 255}, 0.7152, 1e-6},
		{"blue -> 0.0722 (BT.709)", color.RGBA{0, 0, 255, 255}, 0.0722, 1e-6},
		{"white -> exactly 1 (plane convention)", color.RGBA{255, 255, 255, 255}, 1, 0},
		{"black -> 0", color.RGBA{0, 0, 0, 255}, 0, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			m := image.NewRGBA(image.Rect(0, 0, 3, 2))
			for i := 0; i < len(m.Pix); i += 4 {
				m.Pix[i], m.Pix[i+1], m.Pix[i+2], m.Pix[i+3] = tc.in.R, tc.in.G, tc.in.B, tc.in.A
			}
			for _, tone := range []Tone{SRGB, Linear, Gamma(2.2)} {
				for _, f := range []struct {
					name string
					data []byte
				}{{"png", encodePNG(t, m)}, {"tiff", encodeTIFF(t, m, tiff.Uncompressed)}} {
					im, err := Decode(f.data, Options{Tone: tone})
					if err != nil {
						t.Fatal(err)
					}
					for _, v := range im.Lum.Pix {
						if math.Abs(float64(v)-tc.want) > tc.tol {
							t.Fatalf("%s %v: Y = %v, want %v", f.name, tone, v, tc.want)
						}
					}
				}
			}
		})
	}
}

// TestFormats decodes every supported format, bit depth and colour model
// and compares each pixel with the reference luminance (refLum: the sRGB
// formula of IEC 61966-2-1 and the BT.709 weights applied to the source
// image, or for lossy JPEG to libjpeg-turbo's decoding of it: the core
// decodes JPEG as libjpeg-turbo does, see core/decode/jpegdec).
func TestFormats(t *testing.T) {
	const w, h = 37, 23 // odd sizes: partial chroma blocks and strides
	cmykStored := [4][]uint8{{0, 40, 200}, {255, 90, 17}, {128, 128, 3}, {64, 250, 128}}
	type tcase struct {
		name      string
		data      []byte
		src       image.Image // reference pixels; nil: decode data with the std decoder
		format    string
		depth     int
		colour    bool
		alphaWarn bool
	}
	gray, gray16 := randGray(w, h), randGray16(w, h)
	rgb, rgba := randNRGBA(w, h, true), randNRGBA(w, h, false)
	rgb16, rgba16 := randNRGBA64(w, h, true), randNRGBA64(w, h, false)
	pal, pal16 := randPaletted(w, h, 200), randPaletted(w, h, 16)
	greyPal := image.NewPaletted(gray.Rect, color.Palette{color.Gray{0}, color.Gray{77}, color.Gray{255}})
	for i := range greyPal.Pix {
		greyPal.Pix[i] = uint8(i % 3)
	}
	// Grey+alpha PNGs written by hand (colour type 4, ISO/IEC 15948 11.2.2):
	// the std encoder never writes them.
	ga8, ga16 := make([][]byte, h), make([][]byte, h)
	ga8src, ga16src := image.NewGray(gray.Rect), image.NewGray16(gray.Rect)
	for y := range h {
		for x := range w {
			v := gray.Pix[y*w+x]
			ga8[y] = append(ga8[y], v, uint8(x*7))
			ga8src.Pix[y*w+x] = v
			v0, v1 := gray16.Pix[2*(y*w+x)], gray16.Pix[2*(y*w+x)+1]
			ga16[y] = append(ga16[y], v0, v1, uint8(y), 0x80)
			ga16src.Pix[2*(y*w+x)], ga16src.Pix[2*(y*w+x)+1] = v0, v1
		}
	}
	cmykSrc := image.NewCMYK(image.Rect(0, 0, 24, 8))
	for y := range 8 {
		for x := range 24 {
			i := cmykSrc.PixOffset(x, y)
			for c := range 4 {
				cmykSrc.Pix[i+c] = 255 - cmykStored[c][x/8] // Adobe CMYK is stored inverted
			}
		}
	}
	photo := smoothRGBA(w, h)
	tests := []tcase{
		{"PNG grey 8", encodePNG(t, gray), gray, FormatPNG, 8, false, false},
		{"PNG grey 16", encodePNG(t, gray16), gray16, FormatPNG, 16, false, false},
		{"PNG grey+alpha 8", buildPNG(t, w, h, 8, 4, ga8), ga8src, FormatPNG, 8, false, true},
		{"PNG grey+alpha 16", buildPNG(t, w, h, 16, 4, ga16), ga16src, FormatPNG, 16, false, true},
		{"PNG RGB 8", encodePNG(t, asRGBA(rgb)), rgb, FormatPNG, 8, true, false},
		{"PNG RGB 16", encodePNG(t, asRGBA64(rgb16)), rgb16, FormatPNG, 16, true, false},
		{"PNG RGBA 8", encodePNG(t, rgba), rgba, FormatPNG, 8, true, true},
		{"PNG RGBA 16", encodePNG(t, rgba16), rgba16, FormatPNG, 16, true, true},
		{"PNG palette 8-bit index", encodePNG(t, pal), pal, FormatPNG, 8, true, false},
		{"PNG palette 4-bit index", encodePNG(t, pal16), pal16, FormatPNG, 4, true, false},
		{"PNG grey palette", encodePNG(t, greyPal), greyPal, FormatPNG, 2, false, false},
		{"JPEG grey", encodeJPEG(t, gray, 90), nil, FormatJPEG, 8, false, false},
		{"JPEG YCbCr 4:2:0", encodeJPEG(t, photo, 90), nil, FormatJPEG, 8, true, false},
		{"JPEG CMYK (Adobe)", cmykJPEG(cmykStored, true), cmykSrc, FormatJPEG, 8, true, false},
		{"TIFF grey 8", encodeTIFF(t, gray, tiff.Uncompressed), gray, FormatTIFF, 8, false, false},
		{"TIFF grey 16", encodeTIFF(t, gray16, tiff.Uncompressed), gray16, FormatTIFF, 16, false, false},
		{"TIFF RGB 8 deflate", encodeTIFF(t, asRGBA(rgb), tiff.Deflate), rgb, FormatTIFF, 8, true, false},
		{"TIFF RGB 16", encodeTIFF(t, asRGBA64(rgb16), tiff.Uncompressed), rgb16, FormatTIFF, 16, true, false},
		{"TIFF RGBA 8 unassociated", encodeTIFF(t, rgba, tiff.Deflate), rgba, FormatTIFF, 8, true, true},
		{"TIFF RGBA 16 unassociated", encodeTIFF(t, rgba16, tiff.Uncompressed), rgba16, FormatTIFF, 16, true, true},
		{"TIFF palette", encodeTIFF(t, pal, tiff.Uncompressed), pal, FormatTIFF, 8, true, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			for _, tone := range []struct {
				tone Tone
				lin  func(float64) float64
			}{
				{SRGB, refSRGB},
				{Linear, func(v float64) float64 { return v }},
				{Gamma(1.8), func(v float64) float64 { return math.Pow(v, 1.8) }},
			} {
				im, err := Decode(tc.data, Options{Tone: tone.tone})
				if err != nil {
					t.Fatal(err)
				}
				src := tc.src
				if src == nil {
					src = libjpegPixels(t, tc.data)
				}
				b := src.Bounds()
				if im.Format != tc.format || im.Width != b.Dx() || im.Height != b.Dy() ||
					im.BitDepth != tc.depth || im.Colour != tc.colour || im.Tone != tone.tone || im.ToneSource != "user" {
					t.Errorf("got %s %dx%d depth %d colour %v tone %v (%s)", im.Format, im.Width, im.Height,
						im.BitDepth, im.Colour, im.Tone, im.ToneSource)
				}
				if d := maxDiff(t, im.Lum.Pix, refLum(src, tone.lin)); d > 2e-6 {
					t.Errorf("%v: max |Y - reference| = %g", tone.tone, d)
				}
				hasWarn := slices.ContainsFunc(im.Warnings, func(s string) bool { return strings.Contains(s, "alpha") })
				if hasWarn != tc.alphaWarn {
					t.Errorf("alpha warning %v, want %v (%q)", hasWarn, tc.alphaWarn, im.Warnings)
				}
			}
		})
	}
}

// TestCMYKJPEGValues: the hand-built CMYK JPEG decodes to the stored
// values: flat DC-only blocks reconstruct exactly (T.81 A.3.3), and Go
// inverts Adobe CMYK, so C = 255 - stored; R = 255 (1-C)(1-K) per
// color.CMYKToRGB.
func TestCMYKJPEGValues(t *testing.T) {
	stored := [4][]uint8{{0, 255}, {255, 0}, {128, 255}, {255, 255}}
	img, err := jpeg.Decode(bytes.NewReader(cmykJPEG(stored, true)))
	if err != nil {
		t.Fatal(err)
	}
	m, ok := img.(*image.CMYK)
	if !ok {
		t.Fatalf("decoded %T, want *image.CMYK", img)
	}
	for k := range 2 {
		c := m.CMYKAt(8*k+3, 4)
		want := color.CMYK{255 - stored[0][k], 255 - stored[1][k], 255 - stored[2][k], 255 - stored[3][k]}
		if c != want {
			t.Errorf("block %d: %v, want %v", k, c, want)
		}
	}
	// Without the Adobe segment a 4-component JPEG is not decodable.
	_, err = Decode(cmykJPEG(stored, false), Options{})
	var ue *UnsupportedError
	if !asErr(err, &ue) {
		t.Errorf("no Adobe segment: %v, want UnsupportedError", err)
	}
}

// TestYCbCrRatios checks the direct YCbCr path for every subsampling
// ratio, odd sizes and a sub-image with a non-zero origin, against
// image.YCbCr.YCbCrAt and color.YCbCrToRGB (Go's reference conversion).
func TestYCbCrRatios(t *testing.T) {
	ratios := []image.YCbCrSubsampleRatio{
		image.YCbCrSubsampleRatio444, image.YCbCrSubsampleRatio422, image.YCbCrSubsampleRatio420,
		image.YCbCrSubsampleRatio440, image.YCbCrSubsampleRatio411, image.YCbCrSubsampleRatio410,
	}
	r := rng()
	for _, ratio := range ratios {
		t.Run(ratio.String(), func(t *testing.T) {
			m := image.NewYCbCr(image.Rect(0, 0, 45, 31), ratio)
			for _, s := range [][]byte{m.Y, m.Cb, m.Cr} {
				for i := range s {
					s[i] = uint8(r.IntN(256))
				}
			}
			for _, img := range []*image.YCbCr{m, m.SubImage(image.Rect(3, 5, 44, 30)).(*image.YCbCr)} {
				conv := newConverter(SRGB)
				p := conv.luminance(img)
				if d := maxDiff(t, p.Pix, refLum(img, refSRGB)); d > 2e-6 {
					t.Errorf("%v: max diff %g", img.Rect, d)
				}
			}
		})
	}
}

// TestYCbCrToRGBExhaustive compares ycbcrToRGB with color.YCbCrToRGB for
// all 2^24 inputs.
func TestYCbCrToRGBExhaustive(t *testing.T) {
	if testing.Short() {
		t.Skip("2^24 conversions")
	}
	for y := range 256 {
		for cb := range 256 {
			for cr := range 256 {
				r0, g0, b0 := color.YCbCrToRGB(uint8(y), uint8(cb), uint8(cr))
				r1, g1, b1 := ycbcrToRGB(uint8(y), uint8(cb), uint8(cr))
				if r0 != r1 || g0 != g1 || b0 != b1 {
					t.Fatalf("YCbCr(%d,%d,%d): %d,%d,%d want %d,%d,%d", y, cb, cr, r1, g1, b1, r0, g0, b0)
				}
			}
		}
	}
}

// TestPremultiplied: associated-alpha data (image.RGBA / RGBA64 with alpha
// below full) is un-premultiplied before linearising; reference:
// color.NRGBAModel, Go's un-premultiplication.
func TestPremultiplied(t *testing.T) {
	m := image.NewRGBA(image.Rect(0, 0, 3, 1))
	copy(m.Pix, []byte{100, 50, 20, 200, 0, 0, 0, 0, 128, 128, 128, 128})
	p := newConverter(Linear).luminance(m)
	for x := range 3 {
		n := color.NRGBAModel.Convert(m.At(x, 0)).(color.NRGBA)
		want := (0.2126*float64(n.R) + 0.7152*float64(n.G) + 0.0722*float64(n.B)) / 255
		if math.Abs(float64(p.Pix[x])-want) > 1.5/255 { // rounding of the two un-premultiplications
			t.Errorf("pixel %d: %v, want %v", x, p.Pix[x], want)
		}
	}
}

func TestParallelRowsMatchSerial(t *testing.T) {
	if testing.Short() {
		t.Skip("large image")
	}
	m := randNRGBA(700, 500, true) // above the 2^18-pixel threshold
	p := newConverter(SRGB).luminance(m)
	if d := maxDiff(t, p.Pix, refLum(m, refSRGB)); d > 2e-6 {
		t.Errorf("max diff %g", d)
	}
}

func TestExif(t *testing.T) {
	want := exif.Tags{Make: "Sagitta", Model: "Sagitta Simulated Camera", Orientation: 6, FNumber: 4,
		FocalPlaneXRes: 2500, FocalPlaneResUnit: exif.UnitCentimetre}
	j, err := exif.InsertJPEG(encodeJPEG(t, smoothRGBA(16, 16), 80), want)
	if err != nil {
		t.Fatal(err)
	}
	g := randGray(5, 3)
	tiffFile := greyTIFF(5, 3, g.Pix, "Sagitta", 6, 40, 2500)
	pngFile := insertAfterIHDR(encodePNG(t, g), pngChunk("eXIf", exif.Encode(want)[6:]))
	for _, tc := range []struct {
		name string
		data []byte
	}{{"JPEG APP1", j}, {"TIFF IFD0 + Exif IFD", tiffFile}, {"PNG eXIf", pngFile}} {
		t.Run(tc.name, func(t *testing.T) {
			im, err := Decode(tc.data, Options{})
			if err != nil {
				t.Fatal(err)
			}
			got := im.Exif
			if got.Make != want.Make || got.Orientation != 6 || got.FNumber != 4 || got.FocalPlaneXRes != 2500 {
				t.Errorf("Exif %+v", got)
			}
			if p, ok := got.PixelPitchUM(); !ok || p != 4 { // 10000 um / 2500 per cm
				t.Errorf("pitch %v %v", p, ok)
			}
			if !slices.ContainsFunc(im.Warnings, func(s string) bool { return strings.Contains(s, "orientation 6") }) {
				t.Errorf("no orientation warning: %q", im.Warnings)
			}
		})
	}
	// The hand-built TIFF's pixels decode as stored (orientation not applied).
	im, err := Decode(tiffFile, Options{Tone: Linear})
	if err != nil {
		t.Fatal(err)
	}
	if im.Width != 5 || im.Height != 3 || maxDiff(t, im.Lum.Pix, refLum(g, func(v float64) float64 { return v })) > 1e-7 {
		t.Errorf("TIFF pixels changed: %dx%d", im.Width, im.Height)
	}
	// A broken Exif block is a warning, not a failure.
	broken := insertAfterIHDR(encodePNG(t, g), pngChunk("eXIf", []byte("MM\x00*\xff\xff\xff\xff")))
	im, err = Decode(broken, Options{})
	if err != nil || !slices.ContainsFunc(im.Warnings, func(s string) bool { return strings.Contains(s, "Exif data unreadable") }) {
		t.Errorf("broken eXIf: %v %q", err, im.Warnings)
	}
}

// libjpegPixels decodes a JPEG with libjpeg-turbo's defaults, pinned
// (reference: libjpeg-turbo 2.1 via ImageMagick 6.9, Debian 12; the test
// skips when ImageMagick is missing).
func libjpegPixels(t *testing.T, data []byte) *image.NRGBA {
	t.Helper()
	convert := imagemagick.Convert()
	if convert == "" {
		t.Skip("ImageMagick is not installed (apt-get install imagemagick; make tools installs it): the JPEG reference is skipped")
	}
	cfg, err := jpeg.DecodeConfig(bytes.NewReader(data))
	if err != nil {
		t.Fatal(err)
	}
	file := filepath.Join(t.TempDir(), "in.jpg")
	if err := os.WriteFile(file, data, 0o644); err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command(convert, "-define", "jpeg:dct-method=islow", "-define", "jpeg:fancy-upsampling=on",
		file, "-depth", "8", "rgb:-").Output()
	if err != nil || len(out) != 3*cfg.Width*cfg.Height {
		t.Fatalf("ImageMagick: %v (%d bytes)", err, len(out))
	}
	m := image.NewNRGBA(image.Rect(0, 0, cfg.Width, cfg.Height))
	for i := 0; i < cfg.Width*cfg.Height; i++ {
		copy(m.Pix[4*i:4*i+3], out[3*i:3*i+3])
		m.Pix[4*i+3] = 255
	}
	return m
}
