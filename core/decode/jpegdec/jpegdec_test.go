package jpegdec

import (
	"bytes"
	"errors"
	"fmt"
	"image"
	"image/color"
	"image/jpeg"
	"image/png"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"sagitta/core/internal/imagemagick"
	"sagitta/core/sim/demo"
)

// Reference: libjpeg-turbo 2.1 via ImageMagick 6.9, Debian 12 (convert
// decodes with libjpeg-turbo; its accurate integer DCT and fancy upsampling
// are pinned with -define jpeg:dct-method=islow and
// jpeg:fancy-upsampling=on, which are also libjpeg-turbo's defaults).

// noisy draws a photo-like test picture: smooth colour gradients, sharp
// slanted edges and per-pixel noise, so every coefficient and every chroma
// neighbour matters.
func noisy(w, h int, seed uint64) *image.NRGBA {
	rng := rand.New(rand.NewPCG(seed, 7))
	m := image.NewNRGBA(image.Rect(0, 0, w, h))
	for y := 0; y < h; y++ {
		for x := 0; x < w; x++ {
			fx, fy := float64(x)/float64(w), float64(y)/float64(h)
			edge := 0.0
			if float64(x)-0.1*float64(y) > float64(w)/2 {
				edge = 90
			}
			v := func(a, b float64) uint8 {
				s := a + b + edge + rng.NormFloat64()*12
				return uint8(math.Max(0, math.Min(255, s)))
			}
			m.Pix[m.PixOffset(x, y)+0] = v(40+150*fx, 20*math.Sin(fy*9))
			m.Pix[m.PixOffset(x, y)+1] = v(200-120*fy, 30*math.Cos(fx*13))
			m.Pix[m.PixOffset(x, y)+2] = v(60+100*fx*fy, 0)
			m.Pix[m.PixOffset(x, y)+3] = 255
		}
	}
	return m
}

func writePNG(t *testing.T, dir string, img image.Image) string {
	t.Helper()
	var b bytes.Buffer
	if err := png.Encode(&b, img); err != nil {
		t.Fatal(err)
	}
	p := filepath.Join(dir, "src.png")
	if err := os.WriteFile(p, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func run(t *testing.T, name string, args ...string) []byte {
	t.Helper()
	out, err := exec.Command(name, args...).Output()
	if err != nil {
		t.Fatalf("%s %v: %v", name, args, err)
	}
	return out
}

// reference decodes file with ImageMagick to 8-bit RGB or grey samples.
func reference(t *testing.T, convert, file string, grey bool) []byte {
	kind := "rgb:-"
	if grey {
		kind = "gray:-"
	}
	return run(t, convert, "-define", "jpeg:dct-method=islow", "-define", "jpeg:fancy-upsampling=on",
		file, "-depth", "8", kind)
}

// ours gives the decoder's samples in the same layout.
func ours(t *testing.T, data []byte) (out []byte, grey bool) {
	t.Helper()
	img, err := Decode(data, 0)
	if err != nil {
		t.Fatal(err)
	}
	switch m := img.(type) {
	case *image.Gray:
		w, h := m.Rect.Dx(), m.Rect.Dy()
		for y := 0; y < h; y++ {
			out = append(out, m.Pix[y*m.Stride:y*m.Stride+w]...)
		}
		return out, true
	case *image.RGBA:
		for i := 0; i < len(m.Pix); i += 4 {
			out = append(out, m.Pix[i:i+3]...)
		}
		return out, false
	case *YCbCr:
		w, h := m.Rect.Dx(), m.Rect.Dy()
		r, g, b := make([]uint8, w), make([]uint8, w), make([]uint8, w)
		var s Scratch
		for y := 0; y < h; y++ {
			m.Row(y, 0, w, r, g, b, &s)
			for x := 0; x < w; x++ {
				out = append(out, r[x], g[x], b[x])
			}
		}
		// a rectangle inside must give the same samples (margins of chroma)
		if w > 6 {
			x0, x1 := w/2-3, w/2+2
			for y := 0; y < h; y += 1 + h/7 {
				m.Row(y, x0, x1, r, g, b, &s)
				for x := x0; x < x1; x++ {
					o := 3 * (y*w + x)
					if [3]uint8{r[x-x0], g[x-x0], b[x-x0]} != [3]uint8(out[o:o+3]) {
						t.Fatalf("Row(%d, %d, %d) differs from the full row at x=%d", y, x0, x1, x)
					}
				}
			}
		}
		return out, false
	}
	t.Fatalf("decoded type %T", img)
	return nil, false
}

// compare fails unless the decoder gives ImageMagick's samples exactly.
func compare(t *testing.T, convert, file string) {
	t.Helper()
	data, err := os.ReadFile(file)
	if err != nil {
		t.Fatal(err)
	}
	got, grey := ours(t, data)
	want := reference(t, convert, file, grey)
	if len(got) != len(want) {
		t.Fatalf("%d samples, ImageMagick %d", len(got), len(want))
	}
	bad, first := 0, -1
	for i := range got {
		if got[i] != want[i] {
			if first < 0 {
				first = i
			}
			bad++
		}
	}
	if bad > 0 {
		cfg, _ := jpeg.DecodeConfig(bytes.NewReader(data))
		ch := 3
		if grey {
			ch = 1
		}
		px := first / ch
		t.Fatalf("%d of %d samples differ from libjpeg-turbo; first at x=%d y=%d channel %d: %d, want %d",
			bad, len(got), px%cfg.Width, px/cfg.Width, first%ch, got[first], want[first])
	}
}

// TestExactAgainstLibjpeg decodes files encoded by ImageMagick (libjpeg-
// turbo) in every supported layout and compares every sample with
// ImageMagick's decoding.
func TestExactAgainstLibjpeg(t *testing.T) {
	convert := imagemagick.Convert()
	if convert == "" {
		t.Skip("ImageMagick's convert is not installed (Debian package imagemagick)")
	}
	sizes := [][2]int{{1001, 667}, {17, 9}, {64, 48}, {3, 5}}
	if testing.Short() {
		sizes = [][2]int{{301, 203}, {17, 9}, {3, 5}}
	}
	for _, sz := range sizes {
		dir := t.TempDir()
		src := writePNG(t, dir, noisy(sz[0], sz[1], uint64(sz[0])))
		for _, enc := range []struct {
			name string
			args []string
		}{
			{"grey", []string{"-colorspace", "Gray"}},
			{"444", []string{"-sampling-factor", "1x1"}},
			{"422", []string{"-sampling-factor", "2x1"}},
			{"420", []string{"-sampling-factor", "2x2"}},
			{"440", []string{"-sampling-factor", "1x2"}},
			{"420-progressive", []string{"-sampling-factor", "2x2", "-interlace", "JPEG"}},
			{"444-progressive", []string{"-sampling-factor", "1x1", "-interlace", "JPEG"}},
			{"grey-progressive", []string{"-colorspace", "Gray", "-interlace", "JPEG"}},
			{"420-q60", []string{"-sampling-factor", "2x2", "-quality", "60"}},
		} {
			t.Run(fmt.Sprintf("%dx%d-%s", sz[0], sz[1], enc.name), func(t *testing.T) {
				file := filepath.Join(dir, enc.name+".jpg")
				args := append([]string{src, "-quality", "95"}, enc.args...)
				run(t, convert, append(args, file)...)
				compare(t, convert, file)
			})
		}
		t.Run(fmt.Sprintf("%dx%d-go-encoder", sz[0], sz[1]), func(t *testing.T) {
			var b bytes.Buffer
			if err := jpeg.Encode(&b, noisy(sz[0], sz[1], 3), &jpeg.Options{Quality: 90}); err != nil {
				t.Fatal(err)
			}
			file := filepath.Join(dir, "go.jpg")
			if err := os.WriteFile(file, b.Bytes(), 0o644); err != nil {
				t.Fatal(err)
			}
			compare(t, convert, file)
		})
	}
}

// TestRestartIntervals decodes files with restart markers, and RGB files,
// written by libjpeg-turbo's cjpeg (Debian package libjpeg-turbo-progs).
func TestRestartIntervals(t *testing.T) {
	convert := imagemagick.Convert()
	cjpeg, err := exec.LookPath("cjpeg")
	if convert == "" || err != nil {
		t.Skip("needs ImageMagick's convert and cjpeg (Debian packages imagemagick, libjpeg-turbo-progs)")
	}
	dir := t.TempDir()
	var b bytes.Buffer
	src := noisy(203, 101, 5)
	if err := png.Encode(&b, src); err != nil {
		t.Fatal(err)
	}
	ppm := filepath.Join(dir, "src.ppm")
	run(t, convert, writePNG(t, dir, src), ppm)
	for _, c := range []struct {
		name string
		args []string
	}{
		{"420-r3", []string{"-sample", "2x2", "-restart", "3B"}},
		{"444-r1", []string{"-sample", "1x1", "-restart", "1B"}},
		{"420-r2-progressive", []string{"-sample", "2x2", "-restart", "2B", "-progressive"}},
		{"grey-r5", []string{"-grayscale", "-restart", "5B"}},
		{"422-r1row", []string{"-sample", "2x1", "-restart", "1"}},
		{"rgb", []string{"-rgb"}},
		{"rgb-progressive-r4", []string{"-rgb", "-progressive", "-restart", "4B"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			file := filepath.Join(dir, c.name+".jpg")
			run(t, cjpeg, append(append([]string{"-quality", "92"}, c.args...), "-outfile", file, ppm)...)
			data, _ := os.ReadFile(file)
			if strings.Contains(c.name, "-r") && !bytes.Contains(data, []byte{0xff, 0xdd}) {
				t.Fatal("cjpeg wrote no restart interval")
			}
			if !Supported(data) {
				t.Fatal("Supported refuses it")
			}
			compare(t, convert, file)
		})
	}
}

// TestAtMatchesRow checks the image.Image view against Row.
func TestAtMatchesRow(t *testing.T) {
	var b bytes.Buffer
	if err := jpeg.Encode(&b, noisy(19, 11, 9), &jpeg.Options{Quality: 80}); err != nil {
		t.Fatal(err)
	}
	img, err := Decode(b.Bytes(), 0)
	if err != nil {
		t.Fatal(err)
	}
	m := img.(*YCbCr)
	r, g, bb := make([]uint8, 19), make([]uint8, 19), make([]uint8, 19)
	m.Row(4, 0, 19, r, g, bb, nil)
	for x := 0; x < 19; x++ {
		if got, want := m.At(x, 4), (color.RGBA{r[x], g[x], bb[x], 255}); got != want {
			t.Fatalf("At(%d, 4) = %v, want %v", x, got, want)
		}
	}
}

// TestDemoPhotoExact decodes the demo photo (the simulator's chart photo
// through its invented lens and camera, 1500 x 1000, with noise, colour
// fringes and fall-off) as its own JPEG and re-encoded by ImageMagick at
// q95 with each chroma sampling, and compares with libjpeg-turbo.
func TestDemoPhotoExact(t *testing.T) {
	convert := imagemagick.Convert()
	if convert == "" {
		t.Skip("ImageMagick's convert is not installed (Debian package imagemagick)")
	}
	if testing.Short() {
		t.Skip("the demo photo takes a few seconds to simulate; run without -short")
	}
	data, err := demo.PortraitSmall(4).Photo()
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	src := filepath.Join(dir, "demo.jpg")
	if err := os.WriteFile(src, data, 0o644); err != nil {
		t.Fatal(err)
	}
	t.Run("as simulated", func(t *testing.T) { compare(t, convert, src) })
	for _, s := range []string{"1x1", "2x1", "2x2", "1x2"} {
		for _, prog := range []bool{false, true} {
			name := s
			args := []string{src, "-quality", "95", "-sampling-factor", s}
			if prog {
				name += "-progressive"
				args = append(args, "-interlace", "JPEG")
			}
			t.Run(name, func(t *testing.T) {
				file := filepath.Join(dir, name+".jpg")
				run(t, convert, append(args, file)...)
				compare(t, convert, file)
			})
		}
	}
}

// TestFilesExact compares the JPEG files named in $SAGITTA_JPEG_FILES
// (separated by the path list separator) with libjpeg-turbo, for checking
// real photos by hand; it skips when the variable is empty.
func TestFilesExact(t *testing.T) {
	list := os.Getenv("SAGITTA_JPEG_FILES")
	convert := imagemagick.Convert()
	if list == "" || convert == "" {
		t.Skip("set SAGITTA_JPEG_FILES (and install ImageMagick) to compare files by hand")
	}
	for _, f := range filepath.SplitList(list) {
		t.Run(filepath.Base(f), func(t *testing.T) { compare(t, convert, f) })
	}
}

// TestSupported: what Supported accepts from the header is what Decode
// decodes; a CMYK file (Adobe, four components) and a 12-bit frame are
// refused.
func TestSupported(t *testing.T) {
	var b bytes.Buffer
	if err := jpeg.Encode(&b, noisy(21, 13, 4), nil); err != nil {
		t.Fatal(err)
	}
	if !Supported(b.Bytes()) {
		t.Error("a 4:2:0 file refused")
	}
	if _, err := Decode(b.Bytes(), 0); err != nil {
		t.Error(err)
	}
	data := bytes.Clone(b.Bytes())
	sof := bytes.Index(data, []byte{0xff, 0xc0})
	data[sof+4] = 12 // sample precision
	if Supported(data) {
		t.Error("a 12-bit frame accepted")
	}
	if _, err := Decode(data, 0); !errors.Is(err, ErrUnsupported) {
		t.Errorf("12-bit: %v, want ErrUnsupported", err)
	}
	if Supported(b.Bytes()[:sof]) {
		t.Error("a file cut before its frame accepted")
	}
}
