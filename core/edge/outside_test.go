package edge

import (
	"bufio"
	"bytes"
	"encoding/binary"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"sagitta/core/internal/imagemagick"
	"testing"

	"sagitta/core/plane"
)

// References from outside Sagitta's simulator.

// stepCoverage is the fraction of a square pixel (side 1) on the positive
// side of a straight edge whose unit normal is (nx, ny), for the pixel's
// centre at signed distance d from the edge: the distribution function of
// the pixel's projection on the normal, the sum of two uniform variables of
// widths |nx| and |ny| (a trapezoidal density; elementary probability).
func stepCoverage(d, nx, ny float64) float64 {
	p, q := math.Abs(nx), math.Abs(ny)
	if p < q {
		p, q = q, p
	}
	if d < 0 {
		return 1 - stepCoverage(-d, nx, ny)
	}
	switch {
	case d >= (p+q)/2:
		return 1
	case q == 0 || d <= (p-q)/2:
		return (d + p/2) / p
	}
	e := (p+q)/2 - d
	return 1 - e*e/(2*p*q)
}

// TestImageMagickEdge measures an edge that a general-purpose image library
// made: ImageMagick (Debian package imagemagick) blurs a slanted step with
// its Gaussian (-blur 0xS, the separable form) and reduces it with a box filter (-filter
// box -resize, each output pixel the mean of a K x K block: the pixel
// aperture). The step is written at K = 4 times the final resolution, each
// fine pixel holding the exact fraction of its area on the light side.
//
// Truth, with s the Gaussian's width in final pixels and t the normal's
// angle: exp(-2 pi^2 s^2 f^2) (Goodman, Introduction to Fourier Optics, 3rd
// ed., ch. 2) x sinc(f cos t) sinc(f sin t) (the final pixel; Boreman, MTF in
// Optical and Electro-Optical Systems, ch. 2) x sinc(f cos t / K) sinc(f
// sin t / K) (the fine pixel's area coverage, same formula). ImageMagick's
// kernel is a sampled Gaussian of 4 s fine pixels, whose transform differs
// from the continuous one by far less than 1e-4 at these widths.
func TestImageMagickEdge(t *testing.T) {
	if runtime.GOOS == "js" || runtime.GOOS == "wasip1" {
		t.Skip("no external programs under WebAssembly")
	}
	convert := imagemagick.Convert()
	if convert == "" {
		t.Skip("ImageMagick is not installed (apt-get install imagemagick; make tools installs it): the outside reference is skipped")
	}
	const size, k = 160, 4
	dir := t.TempDir()
	// Limits: about twice the largest error measured (refined 0.0002, 0.0006
	// at s = 0.5 px where the kernel is 2 fine pixels wide; iso
	// 0.005 at s = 0.5 and 1.5 px, its known bias, see TestISOAgainstAnalytic).
	cases := []struct{ sigma, angle, limRef, limISO float64 }{
		{1, 20, 0.0005, 0.0025}, {0.5, 5, 0.0012, 0.011}, {1.5, 8, 0.0004, 0.01},
	}
	if testing.Short() {
		cases = cases[:1]
	}
	for _, c := range cases {
		name := fmt.Sprintf("s%.1f-a%.0f", c.sigma, c.angle)
		// The fine step, 16-bit PGM (Netpbm; maxval 65535, big-endian).
		n := size * k
		s, co := math.Sincos(c.angle * math.Pi / 180)
		var buf bytes.Buffer
		fmt.Fprintf(&buf, "P5\n%d %d\n65535\n", n, n)
		row := make([]byte, 2*n)
		for y := 0; y < n; y++ {
			for x := 0; x < n; x++ {
				// distance in fine pixels of the fine pixel's centre from
				// the edge through the image centre
				d := (float64(x)+0.5-float64(n)/2)*co + (float64(y)+0.5-float64(n)/2)*s
				v := 0.2 + 0.6*stepCoverage(d, co, s)
				binary.BigEndian.PutUint16(row[2*x:], uint16(math.Round(v*65535)))
			}
			buf.Write(row)
		}
		in, out := filepath.Join(dir, name+"-in.pgm"), filepath.Join(dir, name+"-out.pgm")
		if err := os.WriteFile(in, buf.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
		cmd := exec.Command(convert, in, "-depth", "16", "-blur", fmt.Sprintf("0x%g", c.sigma*k),
			"-filter", "box", "-resize", fmt.Sprintf("%dx%d!", size, size), "-depth", "16", out)
		if msg, err := cmd.CombinedOutput(); err != nil {
			t.Fatalf("%s: %v: %s", convert, err, msg)
		}
		p := readPGM16(t, out)
		if p.W != size || p.H != size {
			t.Fatalf("ImageMagick made %dx%d", p.W, p.H)
		}
		truth := func(f float64) float64 {
			return math.Exp(-2*math.Pi*math.Pi*c.sigma*c.sigma*f*f) * pixelMTF(f, c.angle) * pixelMTF(f/k, c.angle)
		}
		for _, meth := range []Method{Refined, ISO} {
			m, err := Measure(p, centred(size, c.angle, 60, 28), Options{Method: meth})
			if err != nil {
				t.Fatalf("%s %v: %v", name, meth, err)
			}
			e := worstError(m.Curve.Value, m.Curve.Freq, truth)
			lim := c.limRef
			if meth == ISO {
				lim = c.limISO
			}
			t.Logf("ImageMagick edge, s %.1f px, %2.0f deg, %-7s: largest error 0..0.5 cy/px %.5f (limit %.4f); at Nyquist %.4f for %.4f",
				c.sigma, c.angle, meth, e, lim, m.Curve.AtNyquist(), truth(0.5))
			if e > lim {
				t.Errorf("%s %v: largest error %.5f against the closed form > %.4f", name, meth, e, lim)
			}
		}
	}
}

// readPGM16 reads a binary 16-bit PGM (Netpbm P5, maxval 65535) into a
// plane scaled to 0..1. The values are used as they are: ImageMagick's
// blur and resize work on the numbers in the file.
func readPGM16(t *testing.T, path string) *plane.Plane {
	t.Helper()
	raw, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	r := bufio.NewReader(bytes.NewReader(raw))
	var w, h, maxv int
	var magic string
	if _, err := fmt.Fscan(r, &magic, &w, &h, &maxv); err != nil || magic != "P5" || maxv != 65535 {
		t.Fatalf("%s: not a 16-bit P5 PGM (%q %d %d %d, %v)", path, magic, w, h, maxv, err)
	}
	if _, err := r.ReadByte(); err != nil { // the single whitespace after maxval
		t.Fatal(err)
	}
	p := plane.New(w, h)
	b := make([]byte, 2)
	for i := range p.Pix {
		if _, err := r.Read(b[:1]); err != nil {
			t.Fatal(err)
		}
		if _, err := r.Read(b[1:]); err != nil {
			t.Fatal(err)
		}
		p.Pix[i] = float32(binary.BigEndian.Uint16(b)) / 65535
	}
	return p
}
