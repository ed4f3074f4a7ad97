package analyze

import (
	"fmt"
	"image"
	"math"

	"sagitta/core/decode"
	"sagitta/core/edge"
	"sagitta/core/field"
	"sagitta/core/fringe"
	"sagitta/core/note"
	"sagitta/core/plane"
	"sagitta/core/raw"
)

// Colour per edge and lateral chromatic aberration (colour fringes).
//
// Every edge of a colour photo is located in its red, green and blue
// channels from the luminance fit's geometry (edge.Measurement.
// ChannelOffset): only the pixels of the edge's own region are converted
// to linear colour (decode.Image.LinearRGB), so no full-frame colour plane
// is ever made. A raw mosaic's planes are read where they are (the record's
// own fit is then green's). The offsets are stored in the record
// (ChannelEdge, independent of the pixel pitch and the optical centre);
// summarise turns them into the image's LateralCA (core/fringe) for the
// current centre and pitch, so Resummarise gives what Run gives. The MTF of
// each channel is measured only on request (Settings.Channels; always for
// raw photos, raw.go).

// ChannelEdge is where an edge lies in the red and blue channels relative
// to green: offsets along the record's normal_deg (px, positive towards
// the light side), with standard errors from each channel's fit.
type ChannelEdge struct {
	RMinusGPx float64 `json:"r_minus_g_px"`
	BMinusGPx float64 `json:"b_minus_g_px"`
	RMinusGSE float64 `json:"r_minus_g_se_px"`
	BMinusGSE float64 `json:"b_minus_g_se_px"`
}

// LateralCA is the photo's lateral chromatic aberration (fringe.Result,
// where each key is explained): the displacement of red and blue from green
// along the radius against image height, from the edges whose normal lies
// within max_angle_deg of the radius.
type LateralCA struct {
	Code        string    `json:"code"` // note.CABarely, CAVisible, CAStrong or CAFewEdges
	Text        string    `json:"text"`
	Selection   string    `json:"selection"`
	Caution     string    `json:"caution"`
	MaxAngleDeg float64   `json:"max_angle_deg"`
	Thresholds  []float64 `json:"thresholds_px"` // barely visible below the first, strong above the second
	Used        int       `json:"used"`
	Across      int       `json:"across"`
	Central     int       `json:"central"`
	MaxPx       float64   `json:"max_px"` // signed: positive, the channel lies farther out than green
	MaxUM       float64   `json:"max_um"`
	MaxAtMM     float64   `json:"max_at_mm"`
	Pair        string    `json:"pair"` // "R-G" or "B-G", the pair of MaxPx
	HMaxMM      float64   `json:"h_max_mm"`
	Points      []CAPoint `json:"points"`
	Curves      []CACurve `json:"curves"`
}

// CAPoint is one edge used: its record id, image height, angle between
// normal and radius, and the red and blue displacements from green along
// the radius (px, positive outwards) with standard errors; outlier_* marks
// a point left out of that pair's curve.
type CAPoint struct {
	ID        int     `json:"id"`
	HeightMM  float64 `json:"height_mm"`
	AngleDeg  float64 `json:"angle_deg"`
	RMinusGPx float64 `json:"r_minus_g_px"`
	BMinusGPx float64 `json:"b_minus_g_px"`
	RMinusGSE float64 `json:"r_minus_g_se_px"`
	BMinusGSE float64 `json:"b_minus_g_se_px"`
	OutlierRG bool    `json:"outlier_r_minus_g,omitempty"`
	OutlierBG bool    `json:"outlier_b_minus_g,omitempty"`
}

// CACurve is one pair's smooth curve (fringe.Curve): height_mm from 0 to
// the largest measured height, px the displacement, se_px its standard
// error (the page and the plots draw a band of ±2 se_px).
type CACurve struct {
	Pair       string    `json:"pair"`
	Coef       []float64 `json:"coef_px"` // of u and u^3, u = height / corner height
	HeightMM   []float64 `json:"height_mm"`
	Px         []float64 `json:"px"`
	SEPx       []float64 `json:"se_px"`
	MaxPx      float64   `json:"max_px"`
	MaxAtMM    float64   `json:"max_at_mm"`
	MaxSEPx    float64   `json:"max_se_px"`
	ResidualPx float64   `json:"residual_px"`
	Used       int       `json:"used"`
	Outliers   int       `json:"outliers"`
}

// colourOf measures where the edge of m lies in each colour channel of a
// non-raw photo and, with perChannel, each channel's MTF. It returns nil
// when the photo holds no colour. toneMap, if not nil, applies the tone
// curve fitted to the chart's grey steps, as it was applied to Lum.
//
// The positions are found in linear light, except in a JPEG whose colour
// is subsampled: there they are found in the stored code values, where the
// encoder's averaging and the decoder's interpolation of colour keep each
// colour's area rule (decode.Image.StoredRGB), which linear light keeps
// less well (a gamma-encoded difference is smoothed). A nonlinear code
// shifts all three colours of a neutral edge alike, so their differences
// stay. The JPEG's quantisation of colour is another matter: it moves the
// offsets by up to a tenth of a pixel at quality 92 (see
// TestLateralCAChartJPEG).
func colourOf(dec *decode.Image, m *edge.Measurement, r edge.Region, perChannel bool, toneMap func(*plane.Plane)) (*ChannelEdge, []ChannelMTF) {
	rect := regionRect(r)
	get := dec.LinearRGB
	if dec.ChromaSubsampling != "" {
		get, toneMap = dec.StoredRGB, nil
	}
	R, G, B, ok := get(rect)
	if !ok {
		return nil, nil
	}
	rect = rect.Intersect(image.Rect(0, 0, dec.Width, dec.Height))
	planes := [3]*plane.Plane{R, G, B}
	var off, se [3]float64
	good := true
	// The three planes cover the same pixels: which of them count, and in
	// what order, is worked out once.
	win := m.ChannelWindow(R.W, R.H, rect.Min.X, rect.Min.Y, nil)
	for c, p := range planes {
		if toneMap != nil {
			toneMap(p)
		}
		o, e, err := win.Offset(p)
		if err != nil {
			good = false
			break
		}
		off[c], se[c] = o, e
	}
	var ce *ChannelEdge
	if good {
		ce = &ChannelEdge{
			RMinusGPx: off[0] - off[1], BMinusGPx: off[2] - off[1],
			RMinusGSE: math.Hypot(se[0], se[1]), BMinusGSE: math.Hypot(se[2], se[1]),
		}
	}
	if !perChannel {
		return ce, nil
	}
	if dec.ChromaSubsampling != "" {
		R, G, B, _ = dec.LinearRGB(rect)
		planes = [3]*plane.Plane{R, G, B}
	}
	shifted := r
	shifted.X -= float64(rect.Min.X)
	shifted.Y -= float64(rect.Min.Y)
	chans := make([]ChannelMTF, 0, 3)
	for c, p := range planes {
		cm, err := edge.Measure(p, shifted, edge.Options{Method: methodOf(m)})
		chans = append(chans, channelMTF("RGB"[c:c+1], cm, err, 0.5))
	}
	return ce, chans
}

// methodOf returns the estimator m was measured with.
func methodOf(m *edge.Measurement) edge.Method {
	if m.Method == edge.ISO.String() {
		return edge.ISO
	}
	return edge.Refined
}

// channelMTF is one channel's measurement in the contract's shape.
func channelMTF(name string, m *edge.Measurement, err error, nyq float64) ChannelMTF {
	ch := ChannelMTF{Channel: name}
	if err != nil {
		ch.Error = plainError(err)
		return ch
	}
	ch.NyquistCyPx = nyq
	ch.Freq, ch.MTF = m.Curve.Freq, m.Curve.Value
	ch.MTF50 = Number(m.Curve.MTF50())
	for _, f := range m.Flags {
		ch.Flags = append(ch.Flags, string(f))
	}
	return ch
}

// rawColourOf locates the red, green and blue sites' edges of a mosaic
// along green's fit g (the record's own measurement), each by the same
// area rule, so that what biases the rule alike in every colour (the
// shading of fall-off across the edge's window) cancels in the differences.
func rawColourOf(ri *raw.Image, g *edge.Measurement) *ChannelEdge {
	var off, se [3]float64
	for c := range 3 {
		sites := channelSites(ri.Pattern, c)
		o, e, err := g.ChannelOffset(ri.Mosaic, 0, 0, sites.Keep)
		if err != nil {
			return nil
		}
		off[c], se[c] = o, e
	}
	return &ChannelEdge{
		RMinusGPx: off[0] - off[1], BMinusGPx: off[2] - off[1],
		RMinusGSE: math.Hypot(se[0], se[1]), BMinusGSE: math.Hypot(se[2], se[1]),
	}
}

// regionRect is the pixel rectangle holding region r, with a margin of
// 2 px.
func regionRect(r edge.Region) image.Rectangle {
	x0, y0, x1, y1 := math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
	for _, c := range r.Corners() {
		x0, y0 = math.Min(x0, c[0]), math.Min(y0, c[1])
		x1, y1 = math.Max(x1, c[0]), math.Max(y1, c[1])
	}
	return image.Rect(int(math.Floor(x0))-2, int(math.Floor(y0))-2, int(math.Ceil(x1))+2, int(math.Ceil(y1))+2)
}

// lateralCA analyses the records' channel offsets for the frame of geo;
// nil when no record has them (a grey photo).
func lateralCA(img *Image, geo field.Geometry) *LateralCA {
	var edges []fringe.Edge
	for _, m := range img.Measurements {
		if c := m.ChannelEdge; c != nil && m.Kind == "edge" {
			edges = append(edges, fringe.Edge{ID: m.ID, XPx: m.XPx, YPx: m.YPx, NormalDeg: m.NormalDeg,
				RG: c.RMinusGPx, BG: c.BMinusGPx, RGSE: c.RMinusGSE, BGSE: c.BMinusGSE})
		}
	}
	if len(edges) == 0 {
		return nil
	}
	r := fringe.Analyse(edges, fringe.Frame{CentreX: geo.CentreX, CentreY: geo.CentreY, PitchUM: geo.PitchUM, CornerMM: geo.CornerMM()})
	out := &LateralCA{
		Code: string(r.Code), Text: r.Text, Selection: r.Selection, Caution: r.Caution,
		MaxAngleDeg: fringe.MaxAngleDeg, Thresholds: []float64{fringe.BarelyPx, fringe.StrongPx},
		Used: r.Used, Across: r.Across, Central: r.Central,
		MaxPx: r.MaxPx, MaxUM: r.MaxUM, MaxAtMM: r.MaxAtMM, Pair: r.Pair, HMaxMM: r.HMaxMM,
		Points: make([]CAPoint, len(r.Points)), Curves: make([]CACurve, len(r.Curves)),
	}
	for i, p := range r.Points {
		out.Points[i] = CAPoint{ID: p.ID, HeightMM: p.HeightMM, AngleDeg: p.AngleDeg,
			RMinusGPx: p.RG, BMinusGPx: p.BG, RMinusGSE: p.RGSE, BMinusGSE: p.BGSE,
			OutlierRG: p.OutlierRG, OutlierBG: p.OutlierBG}
	}
	for i, c := range r.Curves {
		out.Curves[i] = CACurve(c)
	}
	return out
}

// chromaNote is the photo's warning when its colour was stored at a lower
// resolution than its luminance and colour offsets were measured.
func chromaNote(dec *decode.Image) (note.Note, bool) {
	if dec.ChromaSubsampling == "" {
		return note.Note{}, false
	}
	return note.New(note.ChromaSubsampled, fmt.Sprintf("the JPEG stores colour at a lower resolution than brightness (%s): colour fringes are measured less precisely, and the red-green and blue-green offsets carry the decoder's smoothing of colour", dec.ChromaSubsampling)), true
}
