package raw

import (
	"bufio"
	"bytes"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

// The independent reader: libraw (https://www.libraw.org), through the
// sample programs of Debian's libraw-bin package. unprocessed_raw writes
// the raw image's code values as stored (no black subtraction, no
// scaling) as a 16-bit PGM (Netpbm PGM format: "P5", width, height,
// maxval, then big-endian samples); raw-identify -v prints the sizes, the
// filter pattern, black and white levels and the Exif data it read. Every
// simulated variant must agree with our reader exactly.

func needLibraw(t *testing.T) {
	t.Helper()
	for _, tool := range []string{"unprocessed_raw", "raw-identify"} {
		if _, err := exec.LookPath(tool); err != nil {
			t.Skipf("libraw's %s is not installed (Debian package libraw-bin; `make tools` installs it): %v", tool, err)
		}
	}
}

// readPGM reads a binary 16-bit PGM.
func readPGM(b []byte) (w, h int, pix []uint16, err error) {
	r := bufio.NewReader(bytes.NewReader(b))
	var magic string
	var maxv int
	if _, err = fmt.Fscan(r, &magic, &w, &h, &maxv); err != nil {
		return
	}
	if magic != "P5" || maxv < 256 {
		return 0, 0, nil, fmt.Errorf("not a 16-bit PGM (%s, maxval %d)", magic, maxv)
	}
	if _, err = r.ReadByte(); err != nil { // the single whitespace after maxval
		return
	}
	pix = make([]uint16, w*h)
	buf := make([]byte, 2*w*h)
	if _, err = io.ReadFull(r, buf); err != nil {
		return
	}
	for i := range pix {
		pix[i] = uint16(buf[2*i])<<8 | uint16(buf[2*i+1])
	}
	return
}

func TestAgainstLibraw(t *testing.T) {
	needLibraw(t)
	c, s := testCamera()
	dir := t.TempDir()
	for _, v := range variants {
		t.Run(v.name, func(t *testing.T) {
			if !v.libraw {
				t.Skip("a layout libraw 0.20 does not read (see variants)")
			}
			data, err := c.EncodeDNG(s, v.o)
			if err != nil {
				t.Fatal(err)
			}
			file := filepath.Join(dir, strings.ReplaceAll(v.name, " ", "_")+".dng")
			if err := os.WriteFile(file, data, 0o644); err != nil {
				t.Fatal(err)
			}
			ours, err := ReadRaster(data, Options{})
			if err != nil {
				t.Fatal(err)
			}
			img, err := Decode(data, Options{})
			if err != nil {
				t.Fatal(err)
			}

			out, err := exec.Command("unprocessed_raw", "-q", file).CombinedOutput()
			if err != nil {
				t.Fatalf("unprocessed_raw: %v: %s", err, out)
			}
			pgm, err := os.ReadFile(file + ".pgm")
			if err != nil {
				t.Fatal(err)
			}
			w, h, pix, err := readPGM(pgm)
			if err != nil {
				t.Fatal(err)
			}
			if w != ours.W || h != ours.H {
				t.Fatalf("libraw %dx%d, ours %dx%d", w, h, ours.W, ours.H)
			}
			// libraw applies the LinearizationTable while unpacking (its
			// output is table[code]); our Raster holds the stored codes.
			diff := 0
			for i := range pix {
				want := ours.Codes[i]
				if v.o.Table != nil {
					want = v.o.Table[want]
				}
				if pix[i] != want {
					diff++
				}
			}
			if diff > 0 {
				t.Errorf("%d of %d codes differ from libraw's", diff, len(pix))
			}

			id, err := exec.Command("raw-identify", "-v", file).CombinedOutput()
			if err != nil {
				t.Fatalf("raw-identify: %v: %s", err, id)
			}
			text := string(id)
			want := map[string]string{
				`Filter pattern: (\w{4})`:  img.Pattern.String(),
				`Full size:\s+(\d+ x \d+)`: fmt.Sprintf("%d x %d", ours.W, ours.H),
			}
			if len(v.o.SiteBlack) == 4 {
				want[`cblack\[6 \.\. 9\]: ([\d ]+)`] = fmt.Sprintf("%d %d %d %d", v.o.SiteBlack[0], v.o.SiteBlack[1], v.o.SiteBlack[2], v.o.SiteBlack[3])
			} else {
				want[`black: (\d+)`] = fmt.Sprint(img.Black)
			}
			if img.Exif.FNumber > 0 {
				want[`Aperture: f/([\d.]+)`] = fmt.Sprintf("%.1f", img.Exif.FNumber)
				want[`Focal length: ([\d.]+) mm`] = fmt.Sprintf("%.1f", img.Exif.FocalLengthMM)
			}
			for re, w := range want {
				m := regexp.MustCompile(re).FindStringSubmatch(text)
				if m == nil || m[1] != w {
					t.Errorf("raw-identify %q: %v, ours %q", re, m, w)
				}
			}
			t.Logf("%s: %d codes equal to libraw's; pattern %s, black %v", v.name, len(pix), img.Pattern, img.Black)
		})
	}
}
