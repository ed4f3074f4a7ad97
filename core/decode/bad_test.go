package decode

import (
	"encoding/binary"
	"errors"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"

	"golang.org/x/image/tiff"
)

// badDir holds the broken files shared with the command-line tests.
const badDir = "../../testdata/bad"

// badFiles builds the shared broken files. UPDATE_BAD=1 rewrites them.
func badFiles(t *testing.T) map[string][]byte {
	png := encodePNG(t, randGray(16, 16))
	jpg := encodeJPEG(t, smoothRGBA(16, 16), 90)
	return map[string][]byte{
		"not-an-image.txt": []byte("This is a text file, not a photograph.\n"),
		"truncated.png":    png[:len(png)/2],
		"truncated.jpg":    jpg[:len(jpg)/2],
	}
}

func TestBadFiles(t *testing.T) {
	want := map[string]struct {
		kind string // "format" or "unsupported"
		msg  string
	}{
		"not-an-image.txt": {"format", "decode: not a PNG, JPEG or TIFF image"},
		"truncated.png":    {"format", "decode: truncated PNG"},
		"truncated.jpg":    {"format", "decode: truncated JPEG"},
	}
	for name, data := range badFiles(t) {
		path := filepath.Join(badDir, name)
		if os.Getenv("UPDATE_BAD") == "1" {
			if err := os.WriteFile(path, data, 0o644); err != nil {
				t.Fatal(err)
			}
		}
		t.Run(name, func(t *testing.T) {
			data, err := os.ReadFile(path)
			if err != nil {
				t.Fatalf("%v (run with UPDATE_BAD=1 to create)", err)
			}
			_, err = Decode(data, Options{})
			checkErr(t, err, want[name].kind, want[name].msg)
		})
	}
}

func asErr[T error](err error, target *T) bool { return errors.As(err, target) }

// checkErr asserts the error type, a one-line message with the given
// prefix.
func checkErr(t *testing.T, err error, kind, prefix string) {
	t.Helper()
	var (
		fe *FormatError
		ue *UnsupportedError
		te *TooLargeError
	)
	ok := false
	switch kind {
	case "format":
		ok = errors.As(err, &fe)
	case "unsupported":
		ok = errors.As(err, &ue)
	case "toolarge":
		ok = errors.As(err, &te)
	}
	if !ok {
		t.Fatalf("error %v (%T), want %s error", err, err, kind)
	}
	if msg := err.Error(); !strings.HasPrefix(msg, prefix) || strings.Contains(msg, "\n") {
		t.Errorf("message %q, want one line starting %q", msg, prefix)
	}
}

func TestBadInput(t *testing.T) {
	png := encodePNG(t, randGray(16, 16))
	badCRC := append([]byte(nil), png...)
	badCRC[len(badCRC)-12-1] ^= 0xFF // last byte of the IDAT CRC
	tiffFile := encodeTIFF(t, randGray(16, 16), tiff.Uncompressed)
	tests := []struct {
		name   string
		in     []byte
		kind   string
		prefix string
	}{
		{"empty", nil, "format", "decode: empty input"},
		{"one byte", []byte{0x89}, "format", "decode: not a PNG, JPEG or TIFF"},
		{"PNG signature only", png[:8], "format", "decode: truncated PNG"},
		{"PNG IHDR cut", png[:20], "format", "decode: truncated PNG"},
		{"PNG IDAT CRC", badCRC, "format", "decode: corrupt PNG"},
		{"JPEG SOI only", []byte{0xFF, 0xD8, 0xFF}, "format", "decode: truncated JPEG"},
		{"TIFF header only", tiffFile[:8], "format", "decode: truncated TIFF"},
		{"TIFF cut", tiffFile[:len(tiffFile)-40], "format", "decode: truncated TIFF"},
		{"TIFF not a TIFF after magic", []byte("II*\x00\x08\x00\x00\x00\x01\x00\x00\x01\x00\x00"), "format", "decode: "},
		{"GIF", []byte("GIF89a\x01\x00\x01\x00"), "unsupported", "decode: GIF is not supported"},
		{"WebP", []byte("RIFF\x00\x00\x00\x00WEBPVP8 "), "unsupported", "decode: WebP"},
		{"BigTIFF", []byte("II+\x00\x08\x00\x00\x00"), "unsupported", "decode: BigTIFF"},
		{"raw camera file", withTIFFTag(t, tiffFile, 0x00FE, 1), "unsupported", "decode: raw camera"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Decode(tc.in, Options{})
			checkErr(t, err, tc.kind, tc.prefix)
			_, _, _, cerr := Config(tc.in)
			if cerr == nil && tc.kind != "format" {
				t.Errorf("Config accepted it")
			}
		})
	}
	if _, err := Decode(png, Options{Tone: Gamma(9)}); err == nil || !strings.HasPrefix(err.Error(), "decode: gamma 9") {
		t.Errorf("bad gamma option: %v", err)
	}
}

// withTIFFTag overwrites the first entry of IFD0 with a LONG entry for tag,
// which must sort below that entry's tag (TIFF 6.0: entries ascend). Used
// for NewSubfileType 0x00FE, below every tag x/image/tiff writes; the lost
// entry does not matter because decoding stops at the check.
func withTIFFTag(t *testing.T, file []byte, tag uint16, v uint32) []byte {
	t.Helper()
	out := append([]byte(nil), file...)
	bo := binary.ByteOrder(binary.LittleEndian)
	if out[0] == 'M' {
		bo = binary.BigEndian
	}
	ifd := bo.Uint32(out[4:])
	e := out[ifd+2:]
	if bo.Uint16(e) > tag {
		bo.PutUint16(e, tag)
		bo.PutUint16(e[2:], 4)
		bo.PutUint32(e[4:], 1)
		bo.PutUint32(e[8:], v)
		return out
	}
	t.Fatalf("first tag 0x%04X not above 0x%04X", bo.Uint16(e), tag)
	return nil
}

// TestTooLarge: headers declaring huge images are refused before any pixel
// allocation (measured with runtime.MemStats.TotalAlloc).
func TestTooLarge(t *testing.T) {
	// PNG IHDR 100000 x 100000, 8-bit grey, one empty row of data.
	hugePNG := buildPNG(t, 100000, 100000, 8, 0, [][]byte{{}})
	// JPEG: patch the SOF0 height and width of a small file to 60000 x 60000.
	jpg := encodeJPEG(t, randGray(16, 16), 90)
	hugeJPEG := append([]byte(nil), jpg...)
	for i := 2; i+9 < len(hugeJPEG); i++ {
		if hugeJPEG[i] == 0xFF && hugeJPEG[i+1] == 0xC0 {
			binary.BigEndian.PutUint16(hugeJPEG[i+5:], 60000)
			binary.BigEndian.PutUint16(hugeJPEG[i+7:], 60000)
			break
		}
	}
	// TIFF: a hand-built header with ImageWidth/ImageLength 50000 x 50000.
	hugeTIFF := greyTIFF(4, 4, make([]byte, 16), "Sagitta", 1, 28, 1000)
	hugeTIFF = setTIFFSize(t, hugeTIFF, 50000, 50000)
	tests := []struct {
		name string
		in   []byte
		opt  Options
		w, h int
	}{
		{"PNG 100000 x 100000", hugePNG, Options{}, 100000, 100000},
		{"JPEG 60000 x 60000", hugeJPEG, Options{}, 60000, 60000},
		{"TIFF 50000 x 50000", hugeTIFF, Options{}, 50000, 50000},
		{"small image, small limit", png16(t), Options{MaxPixels: 100}, 16, 16},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			var before, after runtime.MemStats
			runtime.ReadMemStats(&before)
			_, err := Decode(tc.in, Options{MaxPixels: tc.opt.MaxPixels})
			runtime.ReadMemStats(&after)
			checkErr(t, err, "toolarge", "decode: image is")
			var te *TooLargeError
			errors.As(err, &te)
			if te.Width != tc.w || te.Height != tc.h || !strings.Contains(err.Error(), "limit") {
				t.Errorf("error %q", err)
			}
			if a := after.TotalAlloc - before.TotalAlloc; a > 2<<20 {
				t.Errorf("allocated %d bytes before refusing", a)
			}
		})
	}
	if !strings.Contains((&TooLargeError{100000, 100000, DefaultMaxPixels}).Error(), "100000 x 100000 px (10000.0 MP), above the limit of 120.0 MP") {
		t.Error((&TooLargeError{100000, 100000, DefaultMaxPixels}).Error())
	}
}

func png16(t *testing.T) []byte { return encodePNG(t, randGray(16, 16)) }

// setTIFFSize rewrites the SHORT ImageWidth (0x0100) and ImageLength
// (0x0101) values of a big-endian greyTIFF file as LONGs.
func setTIFFSize(t *testing.T, file []byte, w, h uint32) []byte {
	t.Helper()
	out := append([]byte(nil), file...)
	ifd := binary.BigEndian.Uint32(out[4:])
	n := int(binary.BigEndian.Uint16(out[ifd:]))
	for i := range n {
		e := out[int(ifd)+2+12*i:]
		switch binary.BigEndian.Uint16(e) {
		case 0x0100:
			binary.BigEndian.PutUint16(e[2:], 4)
			binary.BigEndian.PutUint32(e[8:], w)
		case 0x0101:
			binary.BigEndian.PutUint16(e[2:], 4)
			binary.BigEndian.PutUint32(e[8:], h)
		}
	}
	return out
}

func TestConfig(t *testing.T) {
	f, w, h, err := Config(encodeJPEG(t, smoothRGBA(33, 17), 80))
	if err != nil || f != FormatJPEG || w != 33 || h != 17 {
		t.Errorf("Config = %q %d %d %v", f, w, h, err)
	}
}
