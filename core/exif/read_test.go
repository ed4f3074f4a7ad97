package exif

import (
	"bytes"
	"errors"
	"image"
	"image/jpeg"
	"math"
	"strings"
	"testing"
)

// bigEndianBlock is a TIFF-structured block written byte by byte from the
// layout in TIFF 6.0 section 2 (header, IFD entries of 12 bytes: tag, type,
// count, value or offset; values of more than 4 bytes out of line, offsets
// from the start of the header) and CIPA DC-008 4.6 (Exif IFD pointer 0x8769
// in IFD0). Motorola ("MM") byte order. Types used: ASCII (out of line and
// inline), SHORT, LONG, RATIONAL, SRATIONAL. The names are this project's
// own invented simulated camera.
var bigEndianBlock = []byte{
	'M', 'M', 0x00, 0x2A, 0x00, 0x00, 0x00, 0x08, // byte order, 42, IFD0 at 8
	0x00, 0x04, // IFD0: 4 entries
	0x01, 0x0F, 0x00, 0x02, 0x00, 0x00, 0x00, 0x08, 0x00, 0x00, 0x00, 0x3E, // Make, ASCII, 8, at 62
	0x01, 0x10, 0x00, 0x02, 0x00, 0x00, 0x00, 0x03, 'S', '1', 0x00, 0x00, // Model, ASCII, 3, inline "S1"
	0x01, 0x12, 0x00, 0x03, 0x00, 0x00, 0x00, 0x01, 0x00, 0x06, 0x00, 0x00, // Orientation, SHORT, 6 (left-justified)
	0x87, 0x69, 0x00, 0x04, 0x00, 0x00, 0x00, 0x01, 0x00, 0x00, 0x00, 0x46, // Exif IFD pointer, LONG, 70
	0x00, 0x00, 0x00, 0x00, // no IFD1
	'S', 'a', 'g', 'i', 't', 't', 'a', 0x00, // 62: Make value
	0x00, 0x06, // 70: Exif IFD, 6 entries
	0x82, 0x9A, 0x00, 0x05, 0x00, 0x00, 0x00, 0x01, 0x00, 0x00, 0x00, 0x94, // ExposureTime, RATIONAL, at 148
	0x82, 0x9D, 0x00, 0x05, 0x00, 0x00, 0x00, 0x01, 0x00, 0x00, 0x00, 0x9C, // FNumber, RATIONAL, at 156
	0x88, 0x27, 0x00, 0x03, 0x00, 0x00, 0x00, 0x01, 0x01, 0x90, 0x00, 0x00, // ISO, SHORT, 400
	0x92, 0x04, 0x00, 0x0A, 0x00, 0x00, 0x00, 0x01, 0x00, 0x00, 0x00, 0xA4, // ExposureBias, SRATIONAL, at 164
	0x92, 0x0A, 0x00, 0x05, 0x00, 0x00, 0x00, 0x01, 0x00, 0x00, 0x00, 0xAC, // FocalLength, RATIONAL, at 172
	0xA4, 0x34, 0x00, 0x02, 0x00, 0x00, 0x00, 0x0F, 0x00, 0x00, 0x00, 0xB4, // LensModel, ASCII, 15, at 180
	0x00, 0x00, 0x00, 0x00, // next IFD: none
	0x00, 0x00, 0x00, 0x01, 0x00, 0x00, 0x00, 0x7D, // 148: 1/125 s
	0x00, 0x00, 0x00, 0x38, 0x00, 0x00, 0x00, 0x0A, // 156: 56/10
	0xFF, 0xFF, 0xFF, 0xFE, 0x00, 0x00, 0x00, 0x03, // 164: -2/3 EV
	0x00, 0x00, 0x00, 0x32, 0x00, 0x00, 0x00, 0x01, // 172: 50/1 mm
	'S', 'a', 'g', 'i', 't', 't', 'a', ' ', '5', '0', '/', '2', '.', '8', 0x00, // 180: LensModel
}

// littleEndianBlock: the same layout rules in Intel ("II") byte order, with
// ISO as a LONG and the focal-plane resolution tags.
var littleEndianBlock = []byte{
	'I', 'I', 0x2A, 0x00, 0x08, 0x00, 0x00, 0x00, // byte order, 42, IFD0 at 8
	0x02, 0x00, // IFD0: 2 entries
	0x10, 0x01, 0x02, 0x00, 0x0C, 0x00, 0x00, 0x00, 0x26, 0x00, 0x00, 0x00, // Model, ASCII, 12, at 38
	0x69, 0x87, 0x04, 0x00, 0x01, 0x00, 0x00, 0x00, 0x32, 0x00, 0x00, 0x00, // Exif IFD pointer, LONG, 50
	0x00, 0x00, 0x00, 0x00, // no IFD1
	'S', 'a', 'g', 'i', 't', 't', 'a', ' ', 'S', 'i', 'm', 0x00, // 38: Model value
	0x05, 0x00, // 50: Exif IFD, 5 entries
	0x27, 0x88, 0x04, 0x00, 0x01, 0x00, 0x00, 0x00, 0x20, 0x03, 0x00, 0x00, // ISO, LONG, 800
	0x0E, 0xA2, 0x05, 0x00, 0x01, 0x00, 0x00, 0x00, 0x74, 0x00, 0x00, 0x00, // FocalPlaneXRes, RATIONAL, at 116
	0x0F, 0xA2, 0x05, 0x00, 0x01, 0x00, 0x00, 0x00, 0x7C, 0x00, 0x00, 0x00, // FocalPlaneYRes, RATIONAL, at 124
	0x10, 0xA2, 0x03, 0x00, 0x01, 0x00, 0x00, 0x00, 0x03, 0x00, 0x00, 0x00, // FocalPlaneResUnit, SHORT, 3 = cm
	0x05, 0xA4, 0x03, 0x00, 0x01, 0x00, 0x00, 0x00, 0x4B, 0x00, 0x00, 0x00, // FocalLengthIn35mmFilm, SHORT, 75
	0x00, 0x00, 0x00, 0x00, // next IFD: none
	0x88, 0x13, 0x00, 0x00, 0x02, 0x00, 0x00, 0x00, // 116: 5000/2 px per cm
	0xC4, 0x09, 0x00, 0x00, 0x01, 0x00, 0x00, 0x00, // 124: 2500/1 px per cm
}

func TestParseHandBuilt(t *testing.T) {
	tests := []struct {
		name string
		in   []byte
		want Tags
	}{
		{"big-endian MM", bigEndianBlock, Tags{
			Make: "Sagitta", Model: "S1", Orientation: 6, ExposureTimeS: 1.0 / 125, FNumber: 5.6,
			ISO: 400, ExposureBiasEV: -2.0 / 3, FocalLengthMM: 50, LensModel: "Sagitta 50/2.8",
		}},
		{"little-endian II", littleEndianBlock, Tags{
			Model: "Sagitta Sim", ISO: 800, FocalPlaneXRes: 2500, FocalPlaneYRes: 2500,
			FocalPlaneResUnit: UnitCentimetre, FocalLength35MM: 75,
		}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := Parse(tc.in)
			if err != nil {
				t.Fatal(err)
			}
			if !tagsClose(got, tc.want, 1e-12) {
				t.Errorf("got  %+v\nwant %+v", got, tc.want)
			}
		})
	}
}

// TestPixelPitch checks pitch = unit length / resolution (definition of
// FocalPlaneXResolution, CIPA DC-008); 1 inch = 25.4 mm exactly.
func TestPixelPitch(t *testing.T) {
	tests := []struct {
		name   string
		in     Tags
		want   float64
		wantOK bool
	}{
		{"inch", Tags{FocalPlaneXRes: 5080, FocalPlaneResUnit: UnitInch}, 5, true},             // 25400 um / 5080
		{"absent unit means inch", Tags{FocalPlaneXRes: 6350}, 4, true},                        // CIPA DC-008 default
		{"centimetre", Tags{FocalPlaneXRes: 2500, FocalPlaneResUnit: UnitCentimetre}, 4, true}, // 10000 um / 2500
		{"millimetre", Tags{FocalPlaneXRes: 250, FocalPlaneResUnit: UnitMillimetre}, 4, true},
		{"micrometre", Tags{FocalPlaneXRes: 0.25, FocalPlaneResUnit: UnitMicrometre}, 4, true},
		{"no absolute unit", Tags{FocalPlaneXRes: 250, FocalPlaneResUnit: 1}, 0, false},
		{"no resolution", Tags{FocalPlaneResUnit: UnitInch}, 0, false},
		{"hand-built LE block", mustParse(t, littleEndianBlock), 4, true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, ok := tc.in.PixelPitchUM()
			if ok != tc.wantOK || math.Abs(got-tc.want) > 1e-12 {
				t.Errorf("PixelPitchUM = %v, %v; want %v, %v", got, ok, tc.want, tc.wantOK)
			}
		})
	}
}

func mustParse(t *testing.T, b []byte) Tags {
	t.Helper()
	tags, err := Parse(b)
	if err != nil {
		t.Fatal(err)
	}
	return tags
}

// patch returns a copy of b with the bytes at off replaced.
func patch(b []byte, off int, with ...byte) []byte {
	c := bytes.Clone(b)
	copy(c[off:], with)
	return c
}

func TestParseMalformed(t *testing.T) {
	many := patch(littleEndianBlock, 8, 0xE9, 0x03) // 1001 entries
	tests := []struct {
		name string
		in   []byte
		want string // substring of the error
	}{
		{"empty", nil, "header truncated"},
		{"short header", []byte("II*\x00"), "header truncated"},
		{"bad byte order", patch(littleEndianBlock, 0, 'X', 'X'), "byte order"},
		{"bad magic", patch(littleEndianBlock, 2, 43), "magic"},
		{"IFD0 outside", patch(littleEndianBlock, 4, 0xFF, 0xFF), "outside"},
		{"IFD0 inside header", patch(littleEndianBlock, 4, 2), "outside"},
		{"too many entries", many, "limit 1000"},
		{"IFD truncated", littleEndianBlock[:60], "truncated"},
		{"value overruns", patch(littleEndianBlock, 18, 0xF0, 0xFF, 0xFF, 0xFF), "overruns"},
		{"count overruns", patch(littleEndianBlock, 14, 0xFF, 0xFF, 0xFF, 0xFF), "overruns"},
		{"Exif IFD loops to IFD0", patch(littleEndianBlock, 30, 0x08), "loop"},
		{"Exif IFD outside", patch(bigEndianBlock, 54, 0x7F, 0xFF, 0xFF, 0xFF), "outside"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Parse(tc.in)
			var fe FormatError
			if !errors.As(err, &fe) {
				t.Fatalf("error %v (%T), want FormatError", err, err)
			}
			msg := err.Error()
			if !strings.HasPrefix(msg, "exif: ") || !strings.Contains(msg, tc.want) || strings.Contains(msg, "\n") {
				t.Errorf("error %q, want one line with prefix \"exif: \" containing %q", msg, tc.want)
			}
		})
	}
}

// TestParseLenient: values that a careless writer produces are skipped, not
// fatal, and the other tags survive.
func TestParseLenient(t *testing.T) {
	tests := []struct {
		name  string
		in    []byte
		check func(Tags) bool
	}{
		// FNumber 56/0: zero denominator -> no value.
		{"zero denominator", patch(bigEndianBlock, 160, 0, 0, 0, 0), func(g Tags) bool { return g.FNumber == 0 }},
		// Orientation 9 is outside 1..8 (TIFF 6.0 section 8).
		{"orientation 9", patch(bigEndianBlock, 42, 0x00, 0x09), func(g Tags) bool { return g.Orientation == 0 }},
		// ISO entry with field type 99, which TIFF 6.0 section 2 tells readers to skip.
		{"unknown type 99", patch(bigEndianBlock, 98, 0x00, 0x63), func(g Tags) bool { return g.ISO == 0 }},
		// ISO entry with type ASCII: wrong kind of value.
		{"ISO as ASCII", patch(bigEndianBlock, 98, 0x00, 0x02), func(g Tags) bool { return g.ISO == 0 }},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := Parse(tc.in)
			if err != nil {
				t.Fatal(err)
			}
			if !tc.check(got) || got.Make != "Sagitta" || got.LensModel != "Sagitta 50/2.8" {
				t.Errorf("got %+v", got)
			}
		})
	}
}

func TestStringCleaning(t *testing.T) {
	long := strings.Repeat("L", 300)
	tests := []struct{ name, in, want string }{
		{"trailing spaces", "Sagitta   ", "Sagitta"},
		{"control chars", "Sag\titta\x01", "Sagitta"},
		{"invalid UTF-8", "Sag\xffitta", "Sagitta"},
		{"cut at MaxString", long, long[:MaxString]},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			var got string
			setString(&got, entry{typ: typeASCII, count: uint64(len(tc.in)), val: []byte(tc.in)})
			if got != tc.want {
				t.Errorf("got %q, want %q", got, tc.want)
			}
		})
	}
}

func TestReadJPEG(t *testing.T) {
	var buf bytes.Buffer
	if err := jpeg.Encode(&buf, image.NewGray(image.Rect(0, 0, 8, 8)), nil); err != nil {
		t.Fatal(err)
	}
	plain := buf.Bytes()
	want := Tags{Make: "Sagitta", Model: "Sagitta Simulated Camera", Orientation: 1, FNumber: 8}
	tagged, err := InsertJPEG(plain, want)
	if err != nil {
		t.Fatal(err)
	}
	// An XMP APP1 segment before the Exif one must be skipped (CIPA DC-008
	// 4.7: APP1 segments are told apart by their identifier string).
	xmp := []byte("http://ns.adobe.com/xap/1.0/\x00<x/>")
	withXMP := append([]byte{0xFF, 0xD8, 0xFF, 0xE1, 0, byte(2 + len(xmp))}, xmp...)
	withXMP = append(withXMP, tagged[2:]...)

	t.Run("tagged", func(t *testing.T) {
		got, err := ReadJPEG(tagged)
		if err != nil || !tagsClose(got, want, 1e-9) {
			t.Errorf("got %+v, %v; want %+v", got, err, want)
		}
	})
	t.Run("XMP first", func(t *testing.T) {
		got, err := ReadJPEG(withXMP)
		if err != nil || !tagsClose(got, want, 1e-9) {
			t.Errorf("got %+v, %v; want %+v", got, err, want)
		}
	})
	t.Run("no Exif is not an error", func(t *testing.T) {
		got, err := ReadJPEG(plain)
		if err != nil || !got.IsZero() {
			t.Errorf("got %+v, %v; want empty, nil", got, err)
		}
	})
	bad := []struct {
		name string
		in   []byte
	}{
		{"not JPEG", []byte("GIF89a")},
		{"segment overruns", tagged[:40]},
		{"junk between segments", []byte{0xFF, 0xD8, 0x00, 0x00}},
	}
	for _, tc := range bad {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ReadJPEG(tc.in)
			var fe FormatError
			if !errors.As(err, &fe) {
				t.Errorf("error %v, want FormatError", err)
			}
		})
	}
}

func TestReadTIFF(t *testing.T) {
	got, err := ReadTIFF(bigEndianBlock)
	if err != nil || got.Make != "Sagitta" || got.ISO != 400 {
		t.Errorf("got %+v, %v", got, err)
	}
}

// tagsClose compares Tags, with a relative tolerance on the reals.
func tagsClose(a, b Tags, tol float64) bool {
	near := func(x, y float64) bool { return math.Abs(x-y) <= tol*math.Max(1, math.Abs(y)) }
	return a.Make == b.Make && a.Model == b.Model && a.LensModel == b.LensModel &&
		a.Orientation == b.Orientation && a.ISO == b.ISO && a.FocalLength35MM == b.FocalLength35MM &&
		a.FocalPlaneResUnit == b.FocalPlaneResUnit &&
		near(a.ExposureTimeS, b.ExposureTimeS) && near(a.FNumber, b.FNumber) &&
		near(a.ExposureBiasEV, b.ExposureBiasEV) && near(a.FocalLengthMM, b.FocalLengthMM) &&
		near(a.FocalPlaneXRes, b.FocalPlaneXRes) && near(a.FocalPlaneYRes, b.FocalPlaneYRes)
}
