package raw

import (
	"fmt"
	"math"
	"sagitta/core/note"

	"sagitta/core/exif"
	"sagitta/core/plane"
)

// Image is a DNG read for measuring: linear values of the default crop,
// black at 0 and the white level at exactly 1, with no demosaicing, white
// balance or colour conversion.
type Image struct {
	Width, Height int // the default crop, px
	// CFA reports a colour filter array mosaic: Mosaic holds one value per
	// photosite and Pattern says which colour each site has. Otherwise
	// (LinearRaw) RGB holds three planes (or one, for a monochrome file).
	CFA     bool
	Mosaic  *plane.Plane
	RGB     []*plane.Plane
	Pattern Pattern

	Bits        int    // BitsPerSample
	Compression string // "uncompressed" or "lossless JPEG"
	Tiled       bool
	// Black and White are the levels applied, in code values after the
	// LinearizationTable (Black: the mean over the repeat pattern).
	Black, White float64
	// Neutral is AsShotNeutral (the camera's white balance as the values
	// of a neutral surface per colour, 1 for the largest), nil if absent.
	Neutral []float64

	Make, Model, UniqueCameraModel string
	Exif                           exif.Tags
	Warnings                       []string
	WarningCodes                   []note.Code // aligned with Warnings
}

// Pattern is the colour filter array as seen from the crop's top-left
// photosite: site (x, y) has colour At(x, y) (Red, Green or Blue).
type Pattern struct {
	W, H   int
	Colour []uint8 // H rows of W colours
}

// At returns the colour of photosite (x, y) of the crop (x, y >= 0).
func (p Pattern) At(x, y int) int { return int(p.Colour[(y%p.H)*p.W+x%p.W]) }

// String names the pattern row by row, e.g. "RGGB".
func (p Pattern) String() string {
	b := make([]byte, len(p.Colour))
	for i, c := range p.Colour {
		b[i] = "RGB"[c]
	}
	return string(b)
}

// geom is the crop inside the raw image.
type geom struct {
	cx, cy, cw, ch int // crop origin (in the raw image) and size, px
}

// geometry resolves DefaultCropOrigin/Size against the active area (DNG
// 1.4 chapter 4: the crop is relative to the ActiveArea's top-left).
func (r *Raster) geometry() (geom, []string, error) {
	f, d := r.file, r.ifd
	a := r.Active
	aw, ah := a[3]-a[1], a[2]-a[0]
	g := geom{cx: a[1], cy: a[0], cw: aw, ch: ah}
	var warn []string
	o, ok1 := f.reals(d, tagDefaultCropOrigin)
	s, ok2 := f.reals(d, tagDefaultCropSize)
	if ok1 && ok2 && len(o) == 2 && len(s) == 2 {
		ox, oy := int(math.Round(o[0])), int(math.Round(o[1]))
		sw, sh := int(math.Round(s[0])), int(math.Round(s[1]))
		if ox >= 0 && oy >= 0 && sw >= 2 && sh >= 2 && ox+sw <= aw && oy+sh <= ah {
			g = geom{cx: a[1] + ox, cy: a[0] + oy, cw: sw, ch: sh}
		} else {
			warn = append(warn, "DNG default crop lies outside the active area: the whole active area is used")
		}
	}
	return g, warn, nil
}

// Decode reads a DNG file into linear planes of its default crop. Errors
// are FormatError, UnsupportedError or *TooLargeError, each one line; bad
// data never panics.
func Decode(data []byte, opt Options) (img *Image, err error) {
	defer guard(&err)
	r, err := ReadRaster(data, opt)
	if err != nil {
		return nil, err
	}
	f, d, d0 := r.file, r.ifd, r.ifd0
	g, warn, err := r.geometry()
	if err != nil {
		return nil, err
	}
	img = &Image{Width: g.cw, Height: g.ch, Bits: r.Bits, Tiled: r.Tiled}
	for _, w := range warn {
		img.warn(note.RawCropOutside, w)
	}
	img.Compression = "uncompressed"
	if r.Compression == compLosslessJPEG {
		img.Compression = "lossless JPEG"
	}

	// Linearisation, black and white levels (DNG 1.4 chapter 5).
	lin, err := r.linearisation()
	if err != nil {
		return nil, err
	}
	bl, err := r.blackLevels()
	if err != nil {
		return nil, err
	}
	white := make([]float64, r.Samples)
	for i := range white {
		white[i] = float64(int(1)<<r.Bits - 1)
	}
	if lin != nil {
		for i := range white {
			white[i] = float64(lin[len(lin)-1])
		}
	}
	if wl, ok := f.reals(d, tagWhiteLevel); ok && len(wl) > 0 {
		for i := range white {
			white[i] = wl[min(i, len(wl)-1)]
		}
	}
	img.White = white[0]
	img.Black = bl.mean()

	// Colour filter array.
	switch r.Photometric {
	case photoCFA:
		if r.Samples != 1 {
			return nil, formatf("a colour filter array DNG with %d samples per pixel", r.Samples)
		}
		pat, err := r.pattern(g)
		if err != nil {
			return nil, err
		}
		img.CFA, img.Pattern = true, pat
	case photoLinearRaw:
		if r.Samples != 1 && r.Samples != 3 {
			return nil, unsupportedf("linear DNG with %d samples per pixel is not read (1 or 3 are)", r.Samples)
		}
	}

	// Planes of the crop.
	planes := make([]*plane.Plane, r.Samples)
	for s := range planes {
		planes[s] = plane.New(g.cw, g.ch)
	}
	a := r.Active
	for y := 0; y < g.ch; y++ {
		ry := g.cy + y
		for x := 0; x < g.cw; x++ {
			rx := g.cx + x
			for s := 0; s < r.Samples; s++ {
				c := float64(r.Codes[(ry*r.W+rx)*r.Samples+s])
				if lin != nil {
					c = float64(lin[min(int(c), len(lin)-1)])
				}
				b := bl.at(rx-a[1], ry-a[0], s)
				den := white[s] - b
				if !(den > 0) {
					return nil, formatf("DNG white level %g is not above the black level %g", white[s], b)
				}
				planes[s].Pix[y*g.cw+x] = float32((c - b) / den)
			}
		}
	}
	r.Codes = nil
	if img.CFA {
		img.Mosaic = planes[0]
	} else {
		img.RGB = planes
	}

	img.Make, img.Model = f.ascii(d0, tagMake), f.ascii(d0, tagModel)
	img.UniqueCameraModel = f.ascii(d0, tagUniqueCameraModel)
	if n, ok := f.reals(d0, tagAsShotNeutral); ok && len(n) >= 1 && finite(n) {
		img.Neutral = n
	}
	if t, err := readExif(data); err == nil {
		img.Exif = t
	} else {
		img.warn(note.ExifUnreadable, "Exif data unreadable ("+err.Error()+")")
	}
	if img.Exif.Model == "" && img.UniqueCameraModel != "" {
		img.Exif.Model = img.UniqueCameraModel
	}
	for _, tag := range []uint16{51008, 51009, 51022} { // OpcodeList1..3 (DNG 1.3, from memory)
		if d.has(tag) || d0.has(tag) {
			img.warn(note.RawOpcodesNotApplied, "DNG opcode lists (the maker's corrections, e.g. for lens shading) are not applied")
			break
		}
	}
	return img, nil
}

// linearisation returns the LinearizationTable, nil if absent.
func (r *Raster) linearisation() ([]uint16, error) {
	if !r.ifd.has(tagLinearizationTable) {
		return nil, nil
	}
	v, ok := r.file.ints(r.ifd, tagLinearizationTable)
	if !ok || len(v) == 0 || len(v) > 65536 {
		return nil, FormatError("DNG LinearizationTable is unreadable")
	}
	out := make([]uint16, len(v))
	for i, x := range v {
		out[i] = uint16(min(max(x, 0), 65535))
	}
	return out, nil
}

// blacks is the black level: a repeat pattern per sample plus row and
// column deltas (DNG 1.4 chapter 4, BlackLevel, BlackLevelRepeatDim,
// BlackLevelDeltaH/V), all relative to the active area's top-left.
type blacks struct {
	rows, cols, spp int
	level           []float64 // rows x cols x spp
	dh, dv          []float64 // per active column and row
}

func (b blacks) at(x, y, s int) float64 {
	v := b.level[((y%b.rows)*b.cols+x%b.cols)*b.spp+s]
	if b.dh != nil {
		v += b.dh[x]
	}
	if b.dv != nil {
		v += b.dv[y]
	}
	return v
}

func (b blacks) mean() float64 {
	s := 0.0
	for _, v := range b.level {
		s += v
	}
	return s / float64(len(b.level))
}

func (r *Raster) blackLevels() (blacks, error) {
	f, d := r.file, r.ifd
	b := blacks{rows: 1, cols: 1, spp: r.Samples}
	if dim, ok := f.ints(d, tagBlackLevelRepeatDim); ok && len(dim) == 2 {
		if dim[0] < 1 || dim[1] < 1 || dim[0] > 64 || dim[1] > 64 {
			return b, formatf("DNG BlackLevelRepeatDim %v is invalid", dim)
		}
		b.rows, b.cols = int(dim[0]), int(dim[1])
	}
	n := b.rows * b.cols * b.spp
	b.level = make([]float64, n)
	if v, ok := f.reals(d, tagBlackLevel); ok {
		switch len(v) {
		case n:
			copy(b.level, v)
		case 1:
			for i := range b.level {
				b.level[i] = v[0]
			}
		default:
			return b, formatf("DNG BlackLevel has %d values, %d expected", len(v), n)
		}
	} else if d.has(tagBlackLevel) {
		return b, FormatError("DNG BlackLevel is unreadable")
	}
	aw, ah := r.Active[3]-r.Active[1], r.Active[2]-r.Active[0]
	if v, ok := f.reals(d, tagBlackLevelDeltaH); ok {
		if len(v) != aw {
			return b, formatf("DNG BlackLevelDeltaH has %d values for %d columns", len(v), aw)
		}
		b.dh = v
	}
	if v, ok := f.reals(d, tagBlackLevelDeltaV); ok {
		if len(v) != ah {
			return b, formatf("DNG BlackLevelDeltaV has %d values for %d rows", len(v), ah)
		}
		b.dv = v
	}
	return b, nil
}

// pattern reads CFARepeatPatternDim and CFAPattern and shifts the pattern
// to the crop's origin (the pattern starts at the active area's top-left).
func (r *Raster) pattern(g geom) (Pattern, error) {
	f, d := r.file, r.ifd
	if l, _ := f.int1(d, tagCFALayout, 1); l != 1 {
		return Pattern{}, unsupportedf("DNG with a non-rectangular colour filter layout (CFALayout %d) is not read", l)
	}
	dim, ok := f.ints(d, tagCFARepeatPatternDim)
	if !ok || len(dim) != 2 || dim[0] < 1 || dim[1] < 1 || dim[0] > 16 || dim[1] > 16 {
		return Pattern{}, FormatError("DNG colour filter array has no valid CFARepeatPatternDim")
	}
	rows, cols := int(dim[0]), int(dim[1])
	pat, ok := f.ints(d, tagCFAPattern)
	if !ok || len(pat) != rows*cols {
		return Pattern{}, formatf("DNG CFAPattern should have %d values", rows*cols)
	}
	planeColour := []int64{0, 1, 2}
	if pc, ok := f.ints(d, tagCFAPlaneColor); ok && len(pc) > 0 {
		planeColour = pc
	}
	seen := [3]bool{}
	out := Pattern{W: cols, H: rows, Colour: make([]uint8, rows*cols)}
	ox, oy := g.cx-r.Active[1], g.cy-r.Active[0]
	for y := range rows {
		for x := range cols {
			c := pat[((y+oy)%rows)*cols+(x+ox)%cols]
			if c < 0 || int(c) >= len(planeColour) || planeColour[c] > 2 {
				return Pattern{}, unsupportedf("DNG colour filter array with colours other than red, green and blue (code %d) is not read", c)
			}
			out.Colour[y*cols+x] = uint8(planeColour[c])
			seen[planeColour[c]] = true
		}
	}
	if !seen[Green] {
		return Pattern{}, UnsupportedError("DNG colour filter array without green sites is not read")
	}
	return out, nil
}

// Describe returns a short description, e.g. "DNG 4000 x 3000 RGGB mosaic,
// 14-bit, lossless JPEG, tiled".
func (img *Image) Describe() string {
	kind := "linear RGB"
	if img.CFA {
		kind = img.Pattern.String() + " mosaic"
	}
	lay := "strips"
	if img.Tiled {
		lay = "tiles"
	}
	return fmt.Sprintf("DNG %d x %d %s, %d-bit, %s, %s", img.Width, img.Height, kind, img.Bits, img.Compression, lay)
}

// warn adds a warning with its code.
func (img *Image) warn(c note.Code, text string) {
	img.Warnings = append(img.Warnings, text)
	img.WarningCodes = append(img.WarningCodes, c)
}
