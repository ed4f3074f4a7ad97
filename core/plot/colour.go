package plot

import (
	"image/color"
	"math"
	"sagitta/core/decode/srgb"

	"sagitta/core/field"
)

// The visual code (the project's own): field frequencies and orientations
// in panels of their own (a grid, one row per frequency, one column per
// orientation), orientation also by hue in a single photo's plots, photos
// by a categorical palette, target kind by marker shape, MTF50 maps by a
// sequential scale. Every data line is solid and of one weight; only
// reference curves are dashed. The colours were
// chosen for this project in OKLab (below); colour_test.go checks their
// contrast on white and their separation under simulated colour-vision
// deficiencies.

// Orientation hues: an amber for sagittal and a violet for tangential. They
// differ along the blue-yellow axis, which the common colour-vision
// deficiencies (red-green) keep, and in lightness, which every viewer keeps;
// neither is a red or a blue.
var (
	SagittalColour   = color.NRGBA{0xa3, 0x62, 0x00, 0xff} // OKLab L 0.56, amber
	TangentialColour = color.NRGBA{0x5e, 0x3a, 0x9a, 0xff} // OKLab L 0.44, violet
	MixedColour      = color.NRGBA{0x70, 0x70, 0x70, 0xff} // neutral grey
	InkColour        = color.NRGBA{0x22, 0x22, 0x22, 0xff} // text, axes, single-quantity lines
	GridColour       = color.NRGBA{0xdd, 0xdd, 0xdd, 0xff} // light grid lines
	MaskColour       = color.NRGBA{0xe4, 0xe4, 0xe4, 0xff} // map cells with no measurement nearby
	ReferenceColour  = color.NRGBA{0x55, 0x55, 0x55, 0xff} // reference curves (dashed) and zero lines
	NyquistColour    = color.NRGBA{0x1f, 0x6f, 0x8b, 0xff} // the Nyquist line: solid, teal
)

// OrientationColour returns the hue of an orientation.
func OrientationColour(o field.Orientation) color.NRGBA {
	switch o {
	case field.Sagittal:
		return SagittalColour
	case field.Tangential:
		return TangentialColour
	}
	return MixedColour
}

// PhotoColours is the categorical palette for comparing photos: one colour
// per photo, reused in order when there are more photos than colours. Each
// has at least 3:1 contrast on white and they stay apart under simulated
// protanopia, deuteranopia and tritanopia (colour_test.go).
var PhotoColours = []color.NRGBA{
	{0x21, 0x3f, 0x8f, 0xff}, // deep blue
	{0xc2, 0x5a, 0x00, 0xff}, // burnt orange
	{0x23, 0x80, 0x6e, 0xff}, // sea green
	{0x9c, 0x3c, 0x8c, 0xff}, // plum
	{0x3d, 0x3d, 0x3d, 0xff}, // charcoal
	{0x6a, 0x91, 0xd4, 0xff}, // light steel blue
}

// LineWidth is the weight of every data line, px: neither frequency nor
// orientation is coded by weight (they have panels of their own).
const LineWidth = 2.0

// Scale is a sequential colour scale: At(0) is the darkest colour, At(1)
// the lightest, with lightness rising monotonically in between.
type Scale struct {
	anchors [][3]float64 // OKLab
}

// SharpnessScale is the project's own sequential scale for MTF50 maps: dark
// (soft) to light (sharp) through indigo, teal, khaki and cream. Its four
// anchors were chosen in OKLab, as lightness L, chroma C and hue h (degrees),
// with lightness evenly rising:
//
//	(0.27, 0.070, 275), (0.50, 0.085, 200), (0.73, 0.110, 115), (0.95, 0.055, 95)
//
// and colours between them are interpolated linearly in OKLab (L, a, b),
// which keeps perceived lightness monotonic (CIELAB L* rises from about 15
// to 94; colour_test.go checks it). Every colour is inside the sRGB gamut.
var SharpnessScale = NewScale([][3]float64{{0.27, 0.070, 275}, {0.50, 0.085, 200}, {0.73, 0.110, 115}, {0.95, 0.055, 95}})

// NewScale returns a scale through anchors given as OKLab lightness,
// chroma and hue in degrees (L, C, h); it interpolates linearly in OKLab
// (L, a, b) between consecutive anchors. It panics with fewer than two
// anchors (a programmer error).
func NewScale(lch [][3]float64) *Scale {
	if len(lch) < 2 {
		panic("plot: a colour scale needs at least two anchors")
	}
	s := &Scale{}
	for _, c := range lch {
		sn, cs := math.Sincos(c[2] * math.Pi / 180)
		s.anchors = append(s.anchors, [3]float64{c[0], c[1] * cs, c[1] * sn})
	}
	return s
}

// At returns the colour at t in [0, 1] (clamped; NaN gives the MaskColour).
func (s *Scale) At(t float64) color.NRGBA {
	if math.IsNaN(t) {
		return MaskColour
	}
	t = math.Max(0, math.Min(1, t))
	n := len(s.anchors) - 1
	x := t * float64(n)
	i := min(int(x), n-1)
	u := x - float64(i)
	a, b := s.anchors[i], s.anchors[i+1]
	return OKLabToSRGB(a[0]+u*(b[0]-a[0]), a[1]+u*(b[1]-a[1]), a[2]+u*(b[2]-a[2]))
}

// OKLab (B. Ottosson, "A perceptual color space for image processing",
// 2020, https://bottosson.github.io/posts/oklab/): linear sRGB -> LMS by
// M1, cube roots, -> Lab by M2. Matrices as published there.

// SRGBToOKLab converts an 8-bit sRGB colour to OKLab (L, a, b); white is
// (1, 0, 0).
func SRGBToOKLab(c color.NRGBA) (L, a, b float64) {
	r, g, bl := srgb.ToLinear(float64(c.R)/255), srgb.ToLinear(float64(c.G)/255), srgb.ToLinear(float64(c.B)/255)
	l := math.Cbrt(0.4122214708*r + 0.5363325363*g + 0.0514459929*bl)
	m := math.Cbrt(0.2119034982*r + 0.6806995451*g + 0.1073969566*bl)
	s := math.Cbrt(0.0883024619*r + 0.2817188376*g + 0.6299787005*bl)
	return 0.2104542553*l + 0.7936177850*m - 0.0040720468*s,
		1.9779984951*l - 2.4285922050*m + 0.4505937099*s,
		0.0259040371*l + 0.7827717662*m - 0.8086757660*s
}

// OKLabToSRGB converts OKLab to an opaque 8-bit sRGB colour, clipping
// components outside the gamut.
func OKLabToSRGB(L, a, b float64) color.NRGBA {
	l := L + 0.3963377774*a + 0.2158037573*b
	m := L - 0.1055613458*a - 0.0638541728*b
	s := L - 0.0894841775*a - 1.2914855480*b
	l, m, s = l*l*l, m*m*m, s*s*s
	r := 4.0767416621*l - 3.3077115913*m + 0.2309699292*s
	g := -1.2684380046*l + 2.6097574011*m - 0.3413193965*s
	bl := -0.0041960863*l - 0.7034186147*m + 1.7076147010*s
	return color.NRGBA{to8(srgb.FromLinear(r)), to8(srgb.FromLinear(g)), to8(srgb.FromLinear(bl)), 0xff}
}

func to8(v float64) uint8 { return uint8(math.Round(255 * math.Max(0, math.Min(1, v)))) }
