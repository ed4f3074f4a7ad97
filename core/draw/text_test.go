package draw

import (
	"math"
	"testing"

	"github.com/golang/freetype/truetype"
	"golang.org/x/image/font"
	"golang.org/x/image/font/gofont/gobold"
	"golang.org/x/image/font/gofont/goregular"
)

// TextWidth agrees with font.MeasureString of golang.org/x/image/font on a
// truetype face of the same Go font at 100 px per em (a general-purpose
// reference), unhinted; bold text uses Go Bold.
func TestTextWidthReference(t *testing.T) {
	tests := []struct {
		name string
		ttf  []byte
		bold bool
		text string
	}{
		{"regular", goregular.TTF, false, "MTF50 = 0.31 cycles/pixel"},
		{"bold", gobold.TTF, true, "Sagittal, tangential"},
		{"latin-1", goregular.TTF, false, "±5° µm Ünïcödé"},
	}
	for _, tc := range tests {
		f, err := truetype.Parse(tc.ttf)
		if err != nil {
			t.Fatal(err)
		}
		face := truetype.NewFace(f, &truetype.Options{Size: 100, DPI: 72, Hinting: font.HintingNone})
		want := float64(font.MeasureString(face, tc.text)) / 64
		got := TextWidth(tc.text, TextStyle{Size: 100, Bold: tc.bold})
		// The face rounds each advance to 1/64 px.
		if math.Abs(got-want) > float64(len(tc.text))/64 {
			t.Errorf("%s: TextWidth %.3f, font.MeasureString %.3f", tc.name, got, want)
		}
	}
	if TextWidth("abc", TextStyle{Size: -1}) != 0 || TextWidth("abc", TextStyle{Size: math.NaN()}) != 0 {
		t.Error("bad size gives a width")
	}
	// Width scales with size.
	if a, b := TextWidth("lp/mm", TextStyle{Size: 3}), TextWidth("lp/mm", TextStyle{Size: 6}); math.Abs(b-2*a) > 1e-12 {
		t.Errorf("width not proportional to size: %g, %g", a, b)
	}
}

// Text cleaning: invalid UTF-8 and non-characters become U+FFFD, control
// characters spaces (XML 1.0 §2.2 forbids them).
func TestCleanText(t *testing.T) {
	tests := []struct{ in, want string }{
		{"plain µm", "plain µm"},
		{"a\x00b\nc\u0085d\x7f", "a b c d "},
		{"bad\xffutf8", "bad\uFFFDutf8"},
		{"nonchar\uFFFE", "nonchar\uFFFD"},
	}
	for _, tc := range tests {
		if got := cleanText(tc.in); got != tc.want {
			t.Errorf("cleanText(%q) = %q, want %q", tc.in, got, tc.want)
		}
	}
}

// WinAnsiEncoding (ISO 32000-1 Annex D.2; code page 1252 as Python's cp1252
// codec decodes it): ASCII and Latin-1 map to themselves, the 0x80-0x9F
// block to its punctuation, others to '?'.
func TestWinAnsi(t *testing.T) {
	tests := []struct {
		in   string
		want string
	}{
		{"MTF 50%", "MTF 50%"},
		{"µm ±1° é", "\xb5m \xb11\xb0 \xe9"},
		{"€ – — • “q” ‘q’ … ™", "\x80 \x96 \x97 \x95 \x93q\x94 \x91q\x92 \x85 \x99"},
		{"Ž ž Ÿ Œ œ Š š ƒ", "\x8e \x9e \x9f \x8c \x9c \x8a \x9a \x83"},
		{"−3", "-3"},
		{"☺ 中 Ω", "? ? ?"},
	}
	for _, tc := range tests {
		if got := string(toWinAnsi(nil, tc.in)); got != tc.want {
			t.Errorf("toWinAnsi(%q) = %q, want %q", tc.in, got, tc.want)
		}
	}
}

// Glyph outlines: the outline of 'o' has two contours (outer and counter)
// traced in opposite directions, so non-zero filling leaves the hole; the
// outline of 'l' is a single contour whose area is its stem, positive.
func TestGlyphOutline(t *testing.T) {
	fc := faceFor(false)
	var ps polys
	textOutline(&ps, 0, 0, "o", TextStyle{Size: 100}, 1)
	if len(ps.ends) != 2 {
		t.Fatalf("'o' has %d contours, want 2", len(ps.ends))
	}
	a0, _ := ps.get(0)
	a1, _ := ps.get(1)
	if area(a0)*area(a1) >= 0 {
		t.Errorf("contours of 'o' have areas %.1f and %.1f, want opposite signs", area(a0), area(a1))
	}
	// Advance of 'o' in the font, scaled: the next glyph starts there.
	adv := fc.advance(fc.f.Index('o')) * 100 / fc.upem
	if w := TextWidth("o", TextStyle{Size: 100}); math.Abs(w-adv) > 1e-9 {
		t.Errorf("TextWidth('o') %.3f, advance %.3f", w, adv)
	}
	// Anchors move the outline by the width, or half of it.
	minX := func(anchor Anchor) float64 {
		ps.reset()
		textOutline(&ps, 50, 0, "o", TextStyle{Size: 100, Anchor: anchor}, 1)
		m := math.Inf(1)
		for _, p := range ps.pts {
			m = math.Min(m, p.x)
		}
		return m
	}
	if d := minX(AnchorStart) - minX(AnchorEnd); math.Abs(d-adv) > 1e-9 {
		t.Errorf("end anchor shifts by %.3f, want %.3f", d, adv)
	}
	if d := minX(AnchorStart) - minX(AnchorMiddle); math.Abs(d-adv/2) > 1e-9 {
		t.Errorf("middle anchor shifts by %.3f, want %.3f", d, adv/2)
	}
	// Rotation by -90 degrees: the baseline runs up the page, so the glyph
	// lies at x <= 50 (its top towards -x) and y <= 0 (advancing upwards);
	// 'H' sits on the baseline without overshoot.
	ps.reset()
	textOutline(&ps, 50, 0, "H", TextStyle{Size: 100, Angle: -90}, 1)
	for _, p := range ps.pts {
		if p.x > 50+1e-9 || p.y > 1e-9 {
			t.Fatalf("rotated glyph point %v outside x <= 50, y <= 0", p)
		}
	}
}
