package draw

import (
	"bytes"
	"encoding/binary"
	"errors"
	"hash/crc32"
	"image"
	"image/color"
	"image/png"
	"math"
	"testing"
)

// chunk is one PNG chunk read back from a file.
type chunk struct {
	typ  string
	data []byte
	crc  uint32
}

// chunks splits a PNG file into its chunks (ISO/IEC 15948 §5.3: length,
// type, data, CRC over type and data).
func chunks(t *testing.T, b []byte) []chunk {
	t.Helper()
	if !bytes.HasPrefix(b, []byte("\x89PNG\r\n\x1a\n")) {
		t.Fatal("no PNG signature")
	}
	var out []chunk
	for b = b[8:]; len(b) >= 12; {
		n := int(binary.BigEndian.Uint32(b))
		if 12+n > len(b) {
			t.Fatal("truncated chunk")
		}
		out = append(out, chunk{string(b[4:8]), b[8 : 8+n], binary.BigEndian.Uint32(b[8+n:])})
		b = b[12+n:]
	}
	return out
}

// The pHYs chunk (PNG specification, ISO/IEC 15948 §11.3.5.3): pixels per
// unit in x and y, unit 1 = metre. 300 dpi = 300/0.0254 = 11811.02 px/m ->
// 11811; 600 dpi -> 23622.05 -> 23622; 72 dpi -> 2834.65 -> 2835.
func TestEncodePNGPhys(t *testing.T) {
	img := image.NewGray(image.Rect(0, 0, 7, 5))
	img.Pix[3] = 100
	tests := []struct {
		dpi  float64
		want uint32
	}{{300, 11811}, {600, 23622}, {72, 2835}, {2880, 113386}}
	for _, tc := range tests {
		var buf bytes.Buffer
		if err := EncodePNG(&buf, img, tc.dpi); err != nil {
			t.Fatal(err)
		}
		cs := chunks(t, buf.Bytes())
		if cs[0].typ != "IHDR" || cs[1].typ != "pHYs" {
			t.Fatalf("chunk order %s, %s; want IHDR, pHYs", cs[0].typ, cs[1].typ)
		}
		p := cs[1]
		if len(p.data) != 9 {
			t.Fatalf("pHYs length %d, want 9", len(p.data))
		}
		x, y, unit := binary.BigEndian.Uint32(p.data), binary.BigEndian.Uint32(p.data[4:]), p.data[8]
		if x != tc.want || y != tc.want || unit != 1 {
			t.Errorf("%v dpi: pHYs %d x %d unit %d, want %d x %d unit 1", tc.dpi, x, y, unit, tc.want, tc.want)
		}
		// CRC-32 of type and data (ISO 3309, as hash/crc32.IEEE).
		if want := crc32.ChecksumIEEE(append([]byte("pHYs"), p.data...)); p.crc != want {
			t.Errorf("pHYs CRC %08x, want %08x", p.crc, want)
		}
		// image/png checks every chunk's CRC while decoding.
		got, err := png.Decode(bytes.NewReader(buf.Bytes()))
		if err != nil {
			t.Fatalf("image/png rejects the file: %v", err)
		}
		if got.(*image.Gray).Pix[3] != 100 {
			t.Error("pixels changed")
		}
	}
}

func TestEncodePNGErrors(t *testing.T) {
	img := image.NewGray(image.Rect(0, 0, 1, 1))
	for _, dpi := range []float64{0, -300, math.NaN(), math.Inf(1), 1e9} {
		var ae ArgumentError
		if err := EncodePNG(new(bytes.Buffer), img, dpi); !errors.As(err, &ae) {
			t.Errorf("dpi %v: error %v, want ArgumentError", dpi, err)
		}
	}
	// A writer error is passed back.
	if err := EncodePNG(failWriter{}, img, 300); err == nil {
		t.Error("writer error lost")
	}
	// image/png's own errors too (an image too large for PNG).
	if err := EncodePNG(new(bytes.Buffer), fakeBounds{}, 300); err == nil {
		t.Error("oversized image accepted")
	}
}

type failWriter struct{}

func (failWriter) Write([]byte) (int, error) { return 0, errors.New("disk full") }

// fakeBounds reports bounds too large for PNG's 31-bit width field.
type fakeBounds struct{}

func (fakeBounds) ColorModel() color.Model { return color.GrayModel }
func (fakeBounds) Bounds() image.Rectangle { return image.Rect(0, 0, 1<<32, 1) }
func (fakeBounds) At(x, y int) color.Color { return color.Gray{} }
