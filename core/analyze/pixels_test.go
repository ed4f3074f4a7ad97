package analyze

import (
	"context"
	"fmt"
	"image"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"sagitta/core/internal/imagemagick"
	"strings"
	"testing"

	"sagitta/core/decode"
)

// TestPixelsFromOutsideDecoder measures JPEGs of the chart photo decoded by
// another decoder, ImageMagick (Debian package imagemagick, which reads JPEG
// through libjpeg-turbo, as Chromium does; reference: libjpeg-turbo 2.1 via
// ImageMagick 6.9, Debian 12, its defaults pinned: accurate integer DCT,
// fancy upsampling), handed to the pipeline as RGBA pixels as the page
// hands the browser's: baseline and progressive, 4:2:0, 4:2:2 and 4:4:4
// chroma (the grey photo tinted yellow, so that chroma and its upsampling
// count), grey, and with an ICC profile attached (not applied: colour values
// as stored). The core decodes JPEG as libjpeg-turbo does
// (core/decode/jpegdec), so the luminance must be the same bit for bit and
// every record found by both paths (edges, gratings, stars) must have the
// same MTF up to Nyquist: README ("Speed in the page") quotes 0 for both,
// within the 0.002 that makes the browser's decoding interchangeable with
// the core's.
func TestPixelsFromOutsideDecoder(t *testing.T) {
	im := imagemagick.Convert()
	if im == "" {
		t.Skip("ImageMagick is not installed (make tools installs it): no outside JPEG decoder")
	}
	if testing.Short() {
		t.Skip("six ImageMagick encodes and twelve analyses; run without -short")
	}
	dir := t.TempDir()
	src := filepath.Join(dir, "src.jpg")
	if err := os.WriteFile(src, chartPhoto.photo(t), 0o644); err != nil {
		t.Fatal(err)
	}
	icc := "/usr/share/color/icc/ghostscript/a98.icc"
	variants := []struct {
		name string
		args []string
	}{
		{"baseline 4:2:0", []string{"-quality", "95", "-type", "TrueColor", "-channel", "B", "-evaluate", "multiply", "0.8", "+channel", "-sampling-factor", "2x2"}},
		{"progressive", []string{"-quality", "95", "-type", "TrueColor", "-channel", "B", "-evaluate", "multiply", "0.8", "+channel", "-sampling-factor", "2x2", "-interlace", "JPEG"}},
		{"4:4:4", []string{"-quality", "95", "-type", "TrueColor", "-channel", "B", "-evaluate", "multiply", "0.8", "+channel", "-sampling-factor", "1x1"}},
		{"4:2:2", []string{"-quality", "95", "-type", "TrueColor", "-channel", "B", "-evaluate", "multiply", "0.8", "+channel", "-sampling-factor", "2x1"}},
		{"grey", []string{"-quality", "95", "-colorspace", "Gray"}},
		{"ICC profile", []string{"-quality", "95", "-type", "TrueColor", "-channel", "B", "-evaluate", "multiply", "0.8", "+channel", "-sampling-factor", "2x2", "-profile", icc}},
	}
	s := Settings{FallbackSensorMM: [2]float64{36, 24}}
	for i, v := range variants {
		t.Run(v.name, func(t *testing.T) {
			if strings.HasPrefix(v.name, "ICC") {
				if _, err := os.Stat(icc); err != nil {
					t.Skip("no ICC profile file at " + icc)
				}
			}
			file := filepath.Join(dir, fmt.Sprintf("v%d.jpg", i))
			if out, err := exec.Command(im, append(append([]string{src}, v.args...), file)...).CombinedOutput(); err != nil {
				t.Fatalf("ImageMagick: %v: %s", err, out)
			}
			data, err := os.ReadFile(file)
			if err != nil {
				t.Fatal(err)
			}
			if !decode.ForeignDecodable(data) {
				t.Fatal("ForeignDecodable refuses an 8-bit JPEG")
			}
			cfg, _, err := image.DecodeConfig(strings.NewReader(string(data)))
			if err != nil {
				t.Fatal(err)
			}
			raw, err := exec.Command(im, "-define", "jpeg:dct-method=islow", "-define", "jpeg:fancy-upsampling=on", file, "-depth", "8", "rgba:-").Output()
			if err != nil {
				t.Fatalf("ImageMagick decoding: %v", err)
			}
			if len(raw) != 4*cfg.Width*cfg.Height {
				t.Fatalf("ImageMagick gave %d bytes for %d x %d", len(raw), cfg.Width, cfg.Height)
			}
			pix := &image.NRGBA{Pix: raw, Stride: 4 * cfg.Width, Rect: image.Rect(0, 0, cfg.Width, cfg.Height)}
			goDec, err := decode.Decode(data, decode.Options{})
			if err != nil {
				t.Fatal(err)
			}
			outDec, err := decode.FromPixels(data, pix, decode.Options{})
			if err != nil {
				t.Fatal(err)
			}
			var maxDiff float64
			for k, a := range goDec.Lum.Pix {
				maxDiff = math.Max(maxDiff, math.Abs(float64(a-outDec.Lum.Pix[k])))
			}
			want, err := Run(context.Background(), "v.jpg", data, s, nil)
			if err != nil {
				t.Fatal(err)
			}
			f, err := Find(context.Background(), Photo{Name: "v.jpg", Data: data, Pixels: pix}, s, nil)
			if err != nil {
				t.Fatal(err)
			}
			parts, err := f.Measure(context.Background(), 0, f.Targets(), nil)
			if err != nil {
				t.Fatal(err)
			}
			got, err := f.Finish(context.Background(), parts, nil)
			if err != nil {
				t.Fatal(err)
			}
			var worst float64
			missing := 0
			used := make([]bool, len(got.Measurements))
			for _, w := range want.Measurements {
				j := counterpart(got.Measurements, used, w)
				if j < 0 {
					missing++
					continue
				}
				used[j] = true
				g := got.Measurements[j]
				for q := range w.MTF {
					if w.Freq[q] <= 0.5 {
						worst = math.Max(worst, math.Abs(g.MTF[q]-w.MTF[q]))
					}
				}
			}
			t.Logf("%s: largest luminance difference %.5f (linear, full scale 1), largest MTF difference up to Nyquist %.4f over %d records found by both (%d of the core's and %d of ImageMagick's records)",
				v.name, maxDiff, worst, len(want.Measurements)-missing, len(want.Measurements), len(got.Measurements))
			if maxDiff != 0 {
				t.Errorf("luminance differs by %.6f; README says the pixels are the same", maxDiff)
			}
			if worst != 0 {
				t.Errorf("MTF differs by %.5f; README says 0", worst)
			}
			if missing != 0 || len(got.Measurements) != len(want.Measurements) {
				t.Errorf("%d of %d records found by the core's decoding only (%d from ImageMagick's pixels)", missing, len(want.Measurements), len(got.Measurements))
			}
		})
	}
}

// counterpart returns the index of the unused record of rs of the same kind and
// curve length as w, within 0.5 px and 1 degree of it, or -1.
func counterpart(rs []Measurement, used []bool, w Measurement) int {
	for j, g := range rs {
		if !used[j] && g.Kind == w.Kind && len(g.MTF) == len(w.MTF) && math.Hypot(g.XPx-w.XPx, g.YPx-w.YPx) <= 0.5 && math.Abs(g.NormalDeg-w.NormalDeg) <= 1 {
			return j
		}
	}
	return -1
}
