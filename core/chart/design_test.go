package chart

import (
	"errors"
	"math"
	"math/bits"
	"math/rand/v2"
	"strings"
	"testing"
)

// TestCodebook rebuilds the ring code by the rule in its doc comment (the
// greedy lexicographic construction of Conway and Sloane, 1986, applied to
// words read around a ring) and checks the table and its distances.
func TestCodebook(t *testing.T) {
	dist := func(a, b uint16) int { return bits.OnesCount16(a ^ b) }
	var built []uint16
	for w := 0; w < 1<<Sectors && len(built) < len(codebook); w++ {
		word := uint16(w)
		if c := bits.OnesCount16(word); c < 6 || c > 10 {
			continue
		}
		ok := true
		for k := 1; k < Sectors && ok; k++ {
			ok = dist(word, rotWord(word, k)) >= 4
		}
		for _, b := range built {
			for k := 0; k < Sectors && ok; k++ {
				ok = dist(word, rotWord(b, k)) >= 4
			}
		}
		if ok {
			built = append(built, word)
		}
	}
	if len(built) != len(codebook) {
		t.Fatalf("the rule gives %d words, want %d", len(built), len(codebook))
	}
	for i := range built {
		if built[i] != codebook[i] {
			t.Errorf("word %d: table %#04x, rule %#04x", i, codebook[i], built[i])
		}
	}
	// Every rotation of every word is at least 4 sectors from every other
	// word's rotations and from its own other rotations.
	for i, a := range codebook {
		for j, b := range codebook {
			for k := range Sectors {
				if (i != j || k != 0) && dist(a, rotWord(b, k)) < 4 {
					t.Fatalf("words %d and %d (rotated %d) differ in fewer than 4 sectors", i, j, k)
				}
			}
		}
	}
}

// TestDecodeWord reads every word at every rotation, with no error and with
// each single wrong sector: always the right value. With two wrong sectors
// (a sample), never a wrong value.
func TestDecodeWord(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for v, w := range codebook {
		for k := range Sectors {
			r := rotWord(w, k)
			if got, shift, d, ok := decodeWord(r); !ok || got != v || shift != k || d != 0 {
				t.Fatalf("word %d rotated %d: got %d shift %d dist %d ok %v", v, k, got, shift, d, ok)
			}
			for b := range Sectors {
				if got, _, d, ok := decodeWord(r ^ 1<<b); !ok || got != v || d != 1 {
					t.Fatalf("word %d rotated %d, sector %d wrong: got %d dist %d ok %v", v, k, b, got, d, ok)
				}
			}
			b1 := rng.IntN(Sectors)
			b2 := (b1 + 1 + rng.IntN(Sectors-1)) % Sectors
			if got, _, _, ok := decodeWord(r ^ 1<<b1 ^ 1<<b2); ok && got != v {
				t.Fatalf("word %d with two wrong sectors decoded as %d", v, got)
			}
		}
	}
}

// TestDarkRuns checks that the runs cover exactly the dark sectors.
func TestDarkRuns(t *testing.T) {
	for _, w := range codebook {
		m := Mark{Word: w}
		var got uint16
		for _, r := range m.DarkRuns() {
			for a := r[0]; a < r[1]-1e-9; a += 360.0 / Sectors {
				got |= 1 << (int(math.Round(a/(360.0/Sectors))) % Sectors)
			}
		}
		if got != w {
			t.Errorf("runs of %#04x cover %#04x", w, got)
		}
	}
}

// TestSlants: every square is slanted from the pixel axes by at least 5
// degrees (common practice: about 5 degrees) and at least 1.5 degrees from
// every angle whose tangent is p/q with q <= 5 (the critical angles of the
// slanted-edge method, ISO 12233:2017 annex; common practice), and its edges
// run along and across the radius to within 5 degrees.
func TestSlants(t *testing.T) {
	critical := []float64{0, 11.3099, 14.0362, 18.4349, 21.8014, 26.5651, 30.9638, 33.6901, 36.8699, 38.6598, 45} // atan(p/q), degrees
	for _, code := range allCodes() {
		d, err := NewDesign(code)
		if err != nil {
			t.Fatal(err)
		}
		for _, q := range d.Squares {
			s := math.Mod(q.RotDeg, 90)
			s = math.Min(s, 90-s)
			if s < 5-1e-9 {
				t.Errorf("%v %s: slant %.2f below 5 degrees", code, q.ID, s)
			}
			for _, c := range critical {
				if math.Abs(s-c) < 1.5-1e-9 {
					t.Errorf("%v %s: slant %.2f within 1.5 degrees of critical %.2f", code, q.ID, s, c)
				}
			}
			rad := math.Atan2(q.Y, q.X) * 180 / math.Pi
			dev := math.Mod(math.Abs(q.RotDeg-rad), 90)
			dev = math.Min(dev, 90-dev)
			if dev > 5+1e-9 {
				t.Errorf("%v %s: edges %.2f degrees off the radius", code, q.ID, dev)
			}
		}
	}
}

func allCodes() []Code {
	var out []Code
	for _, a := range aspects {
		out = append(out, Code{Aspect: a.name}, Code{Aspect: a.name, Portrait: true})
		for _, n := range []int{2, 3} {
			if n == 3 && a.name == "1:1" {
				continue // refused (tiling_test.go)
			}
			out = append(out, Code{Aspect: a.name, Sheets: n}, Code{Aspect: a.name, Portrait: true, Sheets: n})
		}
	}
	return out
}

// footprint returns a target's outline in chart units (circles as 72-gons).
func circle(x, y, r float64) [][2]float64 {
	out := make([][2]float64, 72)
	for i := range out {
		s, c := math.Sincos(float64(i) * math.Pi / 36)
		out[i] = [2]float64{x + r*c, y + r*s}
	}
	return out
}

func rect(x, y, w, h float64) [][2]float64 {
	return [][2]float64{{x - w/2, y - h/2}, {x + w/2, y - h/2}, {x + w/2, y + h/2}, {x - w/2, y + h/2}}
}

// gap returns the distance between two polygons' outlines (0 if one holds
// a vertex of the other); pairs whose bounding circles are more than 0.1
// apart return that lower bound.
func gap(a, b [][2]float64) float64 {
	ca, ra := bound(a)
	cb, rb := bound(b)
	if d := math.Hypot(ca[0]-cb[0], ca[1]-cb[1]) - ra - rb; d > 0.1 {
		return d
	}
	if inside(a[0], b) || inside(b[0], a) {
		return 0
	}
	best := math.Inf(1)
	for i := range a {
		for j := range b {
			best = math.Min(best, segDist(a[i], a[(i+1)%len(a)], b[j], b[(j+1)%len(b)]))
		}
	}
	return best
}

// bound returns a circle holding the polygon: its vertices' mean and the
// largest distance from it.
func bound(p [][2]float64) ([2]float64, float64) {
	var c [2]float64
	for _, q := range p {
		c[0] += q[0] / float64(len(p))
		c[1] += q[1] / float64(len(p))
	}
	var r float64
	for _, q := range p {
		r = math.Max(r, math.Hypot(q[0]-c[0], q[1]-c[1]))
	}
	return c, r
}

func inside(p [2]float64, poly [][2]float64) bool {
	in := false
	for i := range poly {
		a, b := poly[i], poly[(i+1)%len(poly)]
		if (a[1] > p[1]) != (b[1] > p[1]) && p[0] < a[0]+(p[1]-a[1])*(b[0]-a[0])/(b[1]-a[1]) {
			in = !in
		}
	}
	return in
}

func segDist(a, b, c, d [2]float64) float64 {
	pd := func(p, a, b [2]float64) float64 {
		dx, dy := b[0]-a[0], b[1]-a[1]
		t := math.Max(0, math.Min(1, ((p[0]-a[0])*dx+(p[1]-a[1])*dy)/(dx*dx+dy*dy)))
		return math.Hypot(p[0]-a[0]-t*dx, p[1]-a[1]-t*dy)
	}
	cr := func(o, p, q [2]float64) float64 { return (p[0]-o[0])*(q[1]-o[1]) - (p[1]-o[1])*(q[0]-o[0]) }
	if cr(a, b, c)*cr(a, b, d) < 0 && cr(c, d, a)*cr(c, d, b) < 0 {
		return 0
	}
	return math.Min(math.Min(pd(a, c, d), pd(b, c, d)), math.Min(pd(c, a, b), pd(d, a, b)))
}

// TestClearance checks the space around targets. core/edgefind's regions reach
// up to 32 px on each side of an edge, and keep a further 6 px plus the
// reduction factor (2 at 3000 px) clear of other detail (core/edgefind,
// find.go): 40 px. Between any two squares the design leaves 0.021 chart
// units, which is 42 px when the chart's short side spans 2000 px (a 6 MP
// photo filled by the chart) and twice that at 24 MP. core/analyze drops
// edge regions (up to 32 px wide on each side) that come within 8 px of a
// sine pattern (sine.go): between a square and a star or grating the design
// leaves 0.0364 chart units, 40 px when the chart's short side spans 1100 px
// (a 1.8 MP photo). A mark's light quiet
// zone (QuietOfR) holds nothing else, and its ring is at least 0.0105 chart
// units (42 px at 4000 px, a 24 MP photo) from any other target. Every
// target lies inside the frame, clear of its border by at least 0.01.
func TestClearance(t *testing.T) {
	for _, code := range allCodes() {
		d, err := NewDesign(code)
		if err != nil {
			t.Fatal(err)
		}
		type fp struct {
			id   string
			poly [][2]float64
		}
		var fps []fp
		for _, q := range d.Squares {
			cs := q.Corners()
			fps = append(fps, fp{q.ID, cs[:]})
		}
		for _, s := range d.Stars {
			fps = append(fps, fp{s.ID, circle(s.X, s.Y, s.Radius)})
		}
		for _, g := range d.Gratings {
			fps = append(fps, fp{g.ID, rect(g.X, g.Y, g.W, g.H)})
		}
		sine := func(id string) bool { return strings.HasPrefix(id, "star") || strings.HasPrefix(id, "grating") }
		frame := rect(0, 0, d.W-0.02, d.H-0.02)
		minGap, minSine := math.Inf(1), math.Inf(1)
		for i, a := range fps {
			for _, p := range a.poly {
				if !inside(p, frame) {
					t.Errorf("%v: %s reaches within 0.01 of the frame's border", code, a.id)
					break
				}
			}
			for _, b := range fps[i+1:] {
				g := gap(a.poly, b.poly)
				want := 0.021
				switch {
				case sine(a.id) && sine(b.id):
					want = gratingGap // patches of one grating block
				case sine(a.id) || sine(b.id):
					want = 0.0364
					minSine = math.Min(minSine, g)
				default:
					minGap = math.Min(minGap, g)
				}
				if g < want-1e-12 {
					t.Errorf("%v: %s and %s are %.4f apart, want >= %g", code, a.id, b.id, g, want)
				}
			}
		}
		minMark := math.Inf(1)
		for _, m := range d.Marks {
			if !inside([2]float64{m.X + QuietOfR*m.R, m.Y}, frame) || !inside([2]float64{m.X - QuietOfR*m.R, m.Y}, frame) ||
				!inside([2]float64{m.X, m.Y + QuietOfR*m.R}, frame) || !inside([2]float64{m.X, m.Y - QuietOfR*m.R}, frame) {
				t.Errorf("%v: mark %d's quiet zone leaves the frame", code, m.Index)
			}
			ring := circle(m.X, m.Y, RingOutOfR*m.R)
			quiet := circle(m.X, m.Y, QuietOfR*m.R)
			for _, f := range fps {
				if gap(quiet, f.poly) == 0 {
					t.Errorf("%v: %s enters mark %d's quiet zone", code, f.id, m.Index)
				}
				g := gap(ring, f.poly)
				minMark = math.Min(minMark, g)
				if g < 0.0105 {
					t.Errorf("%v: %s is %.4f from mark %d's ring, want >= 0.0105", code, f.id, g, m.Index)
				}
			}
		}
		t.Logf("%v: %d squares, smallest gap between squares %.4f, between a square and a sine pattern %.4f, between a mark's ring and a target %.4f",
			code, len(d.Squares), minGap, minSine, minMark)
	}
}

// TestFieldCoverage: the squares' edges reach from near the centre (an edge
// 3, facing the centre, under 20 % of the way to the corner) to near the
// corners (an edge 1 over 90 %).
func TestFieldCoverage(t *testing.T) {
	for _, code := range allCodes() {
		d, _ := NewDesign(code)
		lo, hi := 1.0, 0.0
		for _, q := range d.Squares {
			s, c := math.Sincos(q.RotDeg * math.Pi / 180)
			lo = math.Min(lo, d.Field(q.X-c*q.Side/2, q.Y-s*q.Side/2))
			hi = math.Max(hi, d.Field(q.X+c*q.Side/2, q.Y+s*q.Side/2))
		}
		if lo > 0.2 || hi < 0.9 {
			t.Errorf("%v: squares span field %.2f to %.2f, want from below 0.2 to above 0.9", code, lo, hi)
		}
	}
}

// TestParseCode reads chart codes in the form printed on the sheet (the
// examples of Code.String's doc) and refuses other text; every code of the
// mark codebook reads back as itself.
func TestParseCode(t *testing.T) {
	cases := []struct {
		in   string
		want Code
		ok   bool
	}{
		{"S1-3:2-L", Code{Aspect: "3:2"}, true},
		{"S1-16:9-P", Code{Aspect: "16:9", Portrait: true}, true},
		{"S1-1:1-L", Code{Aspect: "1:1"}, true},
		{"S2-3:2-L", Code{}, false},
		{"S1-5:4-L", Code{}, false},
		{"S1-3:2-X", Code{}, false},
		{"S1-3:2", Code{}, false},
		{"S1-", Code{}, false},
		{"", Code{}, false},
	}
	for _, c := range cases {
		got, err := ParseCode(c.in)
		if c.ok != (err == nil) || got != c.want {
			t.Errorf("ParseCode(%q) = %+v, %v; want %+v, ok %v", c.in, got, err, c.want, c.ok)
		}
		var oe OptionError
		if err != nil && !errors.As(err, &oe) {
			t.Errorf("ParseCode(%q): error %T, want OptionError", c.in, err)
		}
	}
	for v := range 2 * len(aspects) {
		c := codeOf(v)
		if got, err := ParseCode(c.String()); err != nil || got != c {
			t.Errorf("ParseCode(%q) = %+v, %v", c.String(), got, err)
		}
	}
}
