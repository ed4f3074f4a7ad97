package analyze

import (
	"fmt"
	"sagitta/core/note"

	"sagitta/core/decode"
	"sagitta/core/edge"
	"sagitta/core/raw"
)

// Raw photos (DNG): each edge is measured on the colour planes of the
// sensor's mosaic, before any demosaicing, sharpening or tone curve. The
// record's own curve is green's (the two green sites of a 2x2 pattern
// together, a quincunx: the luminance-like result, as green carries most
// of the luminance); Channels adds red, green and blue each measured on its
// own sites. Frequencies are cycles per photo pixel (the photosite pitch)
// for every plane; each channel states its plane's Nyquist frequency along
// the edge normal (edge.PlaneNyquist), above which that plane aliases.
// A linear DNG (no mosaic) is measured on its luminance, and per channel on
// its three planes.

// Raw codes of RawInfo.Code.
const (
	RawMosaic = "raw-mosaic-planes" // a colour filter array measured per plane
	RawLinear = "raw-linear"        // a linear (already demosaiced) DNG
)

// RawInfo says how a raw photo was read and measured.
type RawInfo struct {
	Code string `json:"code"` // RawMosaic or RawLinear
	// Text says it in words: "raw: mosaic planes, no demosaicing".
	Text        string  `json:"text"`
	Pattern     string  `json:"pattern,omitempty"` // colour filter array from the crop's top-left, row by row, e.g. "RGGB"
	Main        string  `json:"main_channel"`      // the channel behind each record's own curve: "G" or "luminance"
	Camera      string  `json:"camera,omitempty"`  // the DNG's UniqueCameraModel
	Compression string  `json:"compression"`       // "uncompressed" or "lossless JPEG"
	BlackLevel  float64 `json:"black_level"`       // code values, mean over the repeat pattern
	WhiteLevel  float64 `json:"white_level"`       // code values
	Description string  `json:"description"`       // e.g. "DNG 6000 x 4000 RGGB mosaic, 14-bit, lossless JPEG, tiles"
}

// ChannelMTF is one colour plane's measurement of an edge.
type ChannelMTF struct {
	Channel string `json:"channel"` // "R", "G" or "B"
	// NyquistCyPx is the plane's Nyquist frequency along the edge normal
	// in cycles per photo pixel (0.5 for a dense plane).
	NyquistCyPx float64   `json:"plane_nyquist_cy_px"`
	MTF50       Number    `json:"mtf50_cy_px"`
	Freq        []float64 `json:"freq_cy_px,omitempty"`
	MTF         []float64 `json:"mtf,omitempty"`
	Flags       []string  `json:"flags,omitempty"`
	// Error says why the plane gave no measurement (empty when it did).
	Error string `json:"error,omitempty"`
}

// rawInfo describes a decoded DNG for the result, nil for other formats.
func rawInfo(dec *decode.Image) *RawInfo {
	ri := dec.Raw
	if ri == nil {
		return nil
	}
	info := &RawInfo{
		Camera: ri.UniqueCameraModel, Compression: ri.Compression,
		BlackLevel: ri.Black, WhiteLevel: ri.White, Description: ri.Describe(),
	}
	if ri.CFA {
		info.Code, info.Text, info.Main = RawMosaic, "raw: mosaic planes, no demosaicing", "G"
		info.Pattern = ri.Pattern.String()
	} else {
		info.Code, info.Text, info.Main = RawLinear, "raw: linear DNG (demosaiced by its writer), no tone curve", "luminance"
	}
	return info
}

// channelSites selects the sites of one colour of the pattern; green's
// sites of a 2x2 pattern form the quincunx.
func channelSites(p raw.Pattern, colour int) edge.Sites {
	return edge.Sites{Keep: func(x, y int) bool { return p.At(x, y) == colour }, Period: max(p.W, p.H)}
}

// quincunx reports whether colour occupies a checkerboard of a 2x2 pattern.
func quincunx(p raw.Pattern, colour int) bool {
	if p.W != 2 || p.H != 2 {
		return false
	}
	return p.At(0, 0) == colour && p.At(1, 1) == colour || p.At(1, 0) == colour && p.At(0, 1) == colour
}

// measureRaw measures region r of a DNG: the main measurement (green sites
// of a mosaic, or the luminance of a linear DNG) and each colour channel.
func measureRaw(dec *decode.Image, r edge.Region, method edge.Method) (*edge.Measurement, []ChannelMTF, error) {
	ri := dec.Raw
	opt := edge.Options{Method: method}
	chans := make([]ChannelMTF, 0, 3)
	var main *edge.Measurement
	var mainErr error
	for c, name := range []string{"R", "G", "B"} {
		var m *edge.Measurement
		var err error
		nyq := 0.5
		if ri.CFA {
			m, err = edge.MeasureSites(ri.Mosaic, channelSites(ri.Pattern, c), r, opt)
			if m != nil {
				nyq = edge.PlaneNyquist(quincunx(ri.Pattern, c), m.NormalDeg)
				if !quincunx(ri.Pattern, c) && (ri.Pattern.W != 2 || ri.Pattern.H != 2) {
					nyq = 0.5 / float64(max(ri.Pattern.W, ri.Pattern.H))
				}
			}
		} else if len(ri.RGB) == 3 {
			m, err = edge.Measure(ri.RGB[c], r, opt)
		} else {
			continue
		}
		ch := ChannelMTF{Channel: name}
		if err != nil {
			ch.Error = plainError(err)
		} else {
			ch.NyquistCyPx = nyq
			ch.Freq, ch.MTF = m.Curve.Freq, m.Curve.Value
			ch.MTF50 = Number(m.Curve.MTF50())
			for _, f := range m.Flags {
				ch.Flags = append(ch.Flags, string(f))
			}
		}
		chans = append(chans, ch)
		if ri.CFA && c == 1 {
			main, mainErr = m, err
		}
	}
	if !ri.CFA {
		main, mainErr = edge.Measure(dec.Lum, r, opt)
	}
	return main, chans, mainErr
}

// rawWarnings are the notes a raw photo's result carries.
func rawWarnings(dec *decode.Image, method edge.Method) []note.Note {
	ri := dec.Raw
	if ri == nil {
		return nil
	}
	var w []note.Note
	if ri.CFA && method == edge.ISO {
		w = append(w, note.New(note.RawISORefined, "mosaic planes are measured with the refined estimator: the ISO procedure bins on a dense pixel grid"))
	}
	if ri.CFA {
		w = append(w, note.New(note.RawMosaicPlanes, fmt.Sprintf("raw %s mosaic: each edge measured on the green sites (and per colour), frequencies in cycles per photo pixel; sine patterns measured on all sites after the camera's white balance", ri.Pattern)))
	}
	return w
}
