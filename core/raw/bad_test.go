package raw

import (
	"encoding/binary"
	"errors"
	"math"
	"strings"
	"testing"

	"sagitta/core/sim/simcam"
)

// dngOf writes a small DNG with the simulated camera.
func dngOf(t testing.TB, o simcam.DNG) []byte {
	t.Helper()
	c, s := testCamera()
	b, err := c.EncodeDNG(s, o)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// rawEntry returns the raw IFD's entry for tag in a copy of data.
func rawEntry(t testing.TB, data []byte, tag uint16) (entry, binary.ByteOrder) {
	t.Helper()
	f, d, _, err := locate(data)
	if err != nil {
		t.Fatal(err)
	}
	e, ok := d.entries[tag]
	if !ok {
		t.Fatalf("no tag %d", tag)
	}
	return e, f.bo
}

// patch returns a copy of data with the raw IFD's tag set to v (its first
// value; SHORT or LONG).
func patch(t testing.TB, data []byte, tag uint16, v uint32) []byte {
	b := append([]byte(nil), data...)
	e, bo := rawEntry(t, b, tag)
	if e.typ == typeShort {
		bo.PutUint16(b[e.off:], uint16(v))
	} else {
		bo.PutUint32(b[e.off:], v)
	}
	return b
}

// retag returns a copy of data with the raw IFD entry of tag renamed to
// newTag and its first SHORT value set to v.
func retag(t testing.TB, data []byte, tag, newTag uint16, v uint16) []byte {
	b := append([]byte(nil), data...)
	f, d, _, err := locate(b)
	if err != nil {
		t.Fatal(err)
	}
	cnt := uint64(f.u16(d.off))
	for i := uint64(0); i < cnt; i++ {
		p := d.off + 2 + 12*i
		if f.u16(p) == tag {
			f.bo.PutUint16(b[p:], newTag)
			f.bo.PutUint16(b[p+8:], v)
		}
	}
	return b
}

// TestBadDNG: each broken or unsupported file gives one line naming the
// problem, and never a panic.
func TestBadDNG(t *testing.T) {
	tiles := dngOf(t, simcam.DNG{TileW: 64, TileH: 32})
	ljTiles := dngOf(t, simcam.DNG{TileW: 64, TileH: 32, Lossless: true})
	strips := dngOf(t, simcam.DNG{})
	sub := dngOf(t, simcam.DNG{SubIFD: true})

	truncTile := func() []byte {
		e, bo := rawEntry(t, tiles, tagTileByteCounts)
		b := append([]byte(nil), tiles...)
		bo.PutUint32(b[e.off+4:], 100) // the second tile's byte count
		return b
	}()
	truncLJ := func() []byte {
		e, bo := rawEntry(t, ljTiles, tagTileByteCounts)
		b := append([]byte(nil), ljTiles...)
		n := bo.Uint32(b[e.off:])
		bo.PutUint32(b[e.off:], n/2)
		return b
	}()
	outside := func() []byte {
		e, bo := rawEntry(t, tiles, tagTileOffsets)
		b := append([]byte(nil), tiles...)
		bo.PutUint32(b[e.off+8:], uint32(len(b)+1000))
		return b
	}()
	loop := func() []byte {
		b := append([]byte(nil), strips...)
		f, first, _ := parseHeader(b)
		cnt := uint64(f.u16(first))
		f.bo.PutUint32(b[first+2+12*cnt:], uint32(first)) // IFD0's next IFD is IFD0
		return b
	}()
	subLoop := func() []byte {
		b := append([]byte(nil), sub...)
		f, first, _ := parseHeader(b)
		d, _, _ := f.readIFD(first, 0)
		f.bo.PutUint32(b[d.entries[tagSubIFDs].off:], uint32(first)) // the SubIFD is IFD0
		return b
	}()
	notDNG := func() []byte {
		b := append([]byte(nil), strips...)
		f, first, _ := parseHeader(b)
		cnt := uint64(f.u16(first))
		for i := uint64(0); i < cnt; i++ {
			if p := first + 2 + 12*i; f.u16(p) == tagDNGVersion {
				f.bo.PutUint16(b[p:], 50000) // an unknown private tag now
			}
		}
		return b
	}()

	cases := []struct {
		name string
		data []byte
		want string
	}{
		{"empty", nil, "too short"},
		{"not TIFF", []byte("GIF89a just some bytes"), "no TIFF byte-order mark"},
		{"TIFF without DNGVersion", notDNG, "without the DNGVersion tag"},
		{"truncated tile", truncTile, "tile 1 is truncated"},
		{"truncated lossless tile", truncLJ, "tile 0: lossless JPEG tile is truncated"},
		{"tile offset out of range", outside, "tile 2 lies outside the file"},
		{"file cut short", tiles[:len(tiles)/2], "outside the file"},
		{"huge declared size", patch(t, patch(t, strips, tagImageWidth, 60000), tagImageLength, 50000), "above the limit of 120.0 MP"},
		{"loop of IFDs", loop, "a loop of IFDs"},
		{"huge tiles", patch(t, patch(t, tiles, tagTileWidth, 8192), tagTileLength, 8192), "far larger than the 200 x 120 image"},
		{"SubIFD pointing back", subLoop, "a loop of IFDs"},
		{"lossy DNG", patch(t, strips, tagCompression, compLossyDNG), "lossy DNG (compression 34892) is not read"},
		{"JPEG XL", patch(t, strips, tagCompression, compJPEGXL), "JPEG XL"},
		{"deflate", patch(t, strips, tagCompression, compDeflate), "deflate"},
		{"floating point", retag(t, strips, tagCFALayout, tagSampleFormat, sampleFloat), "floating-point DNG data is not read"},
		{"32-bit", patch(t, strips, tagBitsPerSample, 32), "samples of 32 bits are not read"},
		{"white below black", patch(t, strips, tagWhiteLevel, 100), "white level 100 is not above the black level 512"},
		{"pattern without green", func() []byte {
			e, _ := rawEntry(t, strips, tagCFAPattern)
			b := append([]byte(nil), strips...)
			copy(b[e.off:], []byte{0, 2, 2, 0})
			return b
		}(), "without green sites"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Decode(c.data, Options{})
			if err == nil {
				t.Fatal("no error")
			}
			msg := err.Error()
			if !strings.Contains(msg, c.want) || strings.Contains(msg, "\n") || !strings.HasPrefix(msg, "raw: ") {
				t.Errorf("error %q, want one line starting \"raw: \" containing %q", msg, c.want)
			}
			if strings.Contains(msg, "internal error") {
				t.Errorf("a panic was recovered: %s", msg)
			}
		})
	}
	// The size is refused before allocation, with the numbers from the header.
	_, err := Decode(patch(t, patch(t, strips, tagImageWidth, 60000), tagImageLength, 50000), Options{})
	var tl *TooLargeError
	if !errors.As(err, &tl) || tl.Width != 60000 || tl.Height != 50000 {
		t.Errorf("huge: %v", err)
	}
	if _, _, err := Config(patch(t, strips, tagImageWidth, 1<<21)); err == nil {
		t.Error("Config accepted a 2 million px wide image")
	}
}

// TestLinearDNG reads a linear (LinearRaw) DNG as three planes, each the
// scene's level times its channel's gain.
func TestLinearDNG(t *testing.T) {
	for _, lossless := range []bool{false, true} {
		o := simcam.DNG{Linear: true, Lossless: lossless, Bits: 16, Black: 256, Gains: [3]float64{0.5, 1, 0.8}}
		data := dngOf(t, o)
		img, err := Decode(data, Options{})
		if err != nil {
			t.Fatal(err)
		}
		if img.CFA || len(img.RGB) != 3 || img.Width != 200 {
			t.Fatalf("linear DNG read as cfa=%v with %d planes", img.CFA, len(img.RGB))
		}
		var worst float64
		for i := range img.RGB[1].Pix {
			g := float64(img.RGB[1].Pix[i])
			worst = math.Max(worst, math.Abs(float64(img.RGB[0].Pix[i])-0.5*g))
			worst = math.Max(worst, math.Abs(float64(img.RGB[2].Pix[i])-0.8*g))
		}
		if worst > 2.0/65535 { // one code of rounding on each side
			t.Errorf("lossless=%v: channels off their gains by %g", lossless, worst)
		}
		if !strings.Contains(img.Describe(), "linear RGB") {
			t.Error(img.Describe())
		}
	}
}

// FuzzDecode: no input makes Decode panic, hang or allocate beyond the
// limit (the fuzzer's own memory limit catches the last).
func FuzzDecode(f *testing.F) {
	for _, o := range []simcam.DNG{{}, {TileW: 32, TileH: 32, Lossless: true}, {Bits: 12, SubIFD: true, BigEndian: true}} {
		c := &simcam.Camera{W: 40, H: 24}
		b, err := c.EncodeDNG(simcam.HalfPlaneScene(40, 24, 5, 0.1, 0.7), o)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	f.Fuzz(func(t *testing.T, b []byte) {
		img, err := Decode(b, Options{MaxPixels: 1 << 20})
		if err != nil {
			if strings.Contains(err.Error(), "internal error") {
				t.Fatalf("panic: %v", err)
			}
			return
		}
		if img.Width <= 0 || img.Height <= 0 {
			t.Fatalf("empty image without an error")
		}
	})
}
