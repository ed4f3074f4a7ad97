package decode

import (
	"errors"
	"fmt"
	"sagitta/core/note"

	"sagitta/core/plane"
	"sagitta/core/raw"
)

// FormatDNG names DNG raw files (read by core/raw).
const FormatDNG = "dng"

// ToneSourceRaw is the ToneSource of a DNG: raw values are linear in the
// light by definition (DNG 1.4, chapter 5), after black subtraction and
// scaling to the white level.
const ToneSourceRaw = "file: DNG raw data (linear by definition)"

// configDNG returns the size of a DNG's default crop.
func configDNG(data []byte) (int, int, error) {
	w, h, err := raw.Config(data)
	if err != nil {
		return 0, 0, rawErr(err)
	}
	return w, h, nil
}

// decodeDNG reads a DNG with core/raw. Image.Raw keeps the mosaic (or the
// linear RGB planes) for measuring colour planes without demosaicing; Lum
// is for finding targets and drawing: the mosaic with each site divided by
// its colour's white balance (the camera's AsShotNeutral, else the ratio
// of the colours' means), which for a neutral chart is a full-resolution
// grey image, or, for a linear DNG, the Rec. 709 luminance of the balanced
// channels.
func decodeDNG(data []byte, opt Options) (*Image, error) {
	ri, err := raw.Decode(data, raw.Options{MaxPixels: opt.MaxPixels})
	if err != nil {
		return nil, rawErr(err)
	}
	out := &Image{
		Format: FormatDNG, Width: ri.Width, Height: ri.Height, BitDepth: ri.Bits,
		Colour: ri.CFA || len(ri.RGB) == 3, Tone: Linear, ToneSource: ToneSourceRaw,
		Exif: ri.Exif, Raw: ri,
	}
	for i, w := range ri.Warnings {
		out.warn(ri.WarningCodes[i], w)
	}
	if opt.Tone.Kind != ToneAuto && opt.Tone.Kind != Linear.Kind {
		out.warn(note.RawToneIgnored, "tone setting ignored: raw data are linear by definition")
	}
	gain := balance(ri)
	if ri.CFA {
		lum := plane.New(ri.Width, ri.Height)
		for y := 0; y < ri.Height; y++ {
			for x := 0; x < ri.Width; x++ {
				i := y*ri.Width + x
				lum.Pix[i] = ri.Mosaic.Pix[i] / float32(gain[ri.Pattern.At(x, y)])
			}
		}
		out.Lum = lum
	} else if len(ri.RGB) == 3 {
		lum := plane.New(ri.Width, ri.Height)
		w := [3]float32{0.2126 / float32(gain[0]), 0.7152 / float32(gain[1]), 0.0722 / float32(gain[2])}
		for i := range lum.Pix {
			lum.Pix[i] = w[0]*ri.RGB[0].Pix[i] + w[1]*ri.RGB[1].Pix[i] + w[2]*ri.RGB[2].Pix[i]
		}
		out.Lum = lum
	} else {
		out.Lum = ri.RGB[0]
	}
	if ri.Exif.Orientation > 1 {
		out.warn(note.OrientationNotApplied, fmt.Sprintf("Exif orientation %d not applied: pixels analysed as stored on the sensor", ri.Exif.Orientation))
	}
	return out, nil
}

// balance returns the white-balance divisor of each colour, green = 1:
// AsShotNeutral when the file has a usable one, else the ratio of the
// colour's mean to green's mean over the whole frame.
func balance(ri *raw.Image) [3]float64 {
	g := [3]float64{1, 1, 1}
	if n := ri.Neutral; len(n) == 3 && n[0] > 0 && n[1] > 0 && n[2] > 0 {
		return [3]float64{n[0] / n[1], 1, n[2] / n[1]}
	}
	var sum [3]float64
	var cnt [3]float64
	if ri.CFA {
		for y := 0; y < ri.Height; y++ {
			for x := 0; x < ri.Width; x++ {
				c := ri.Pattern.At(x, y)
				sum[c] += float64(ri.Mosaic.Pix[y*ri.Width+x])
				cnt[c]++
			}
		}
	} else if len(ri.RGB) == 3 {
		for c := range 3 {
			for _, v := range ri.RGB[c].Pix {
				sum[c] += float64(v)
			}
			cnt[c] = float64(len(ri.RGB[c].Pix))
		}
	}
	if cnt[1] == 0 || !(sum[1] > 0) {
		return g
	}
	for c := range 3 {
		if cnt[c] > 0 && sum[c] > 0 {
			g[c] = (sum[c] / cnt[c]) / (sum[1] / cnt[1])
		}
	}
	return g
}

// rawErr turns core/raw's errors into this package's, so callers see one
// set of error types: a too-large raw image is a *TooLargeError, an
// unsupported variant an *UnsupportedError, the rest *FormatError.
func rawErr(err error) error {
	var tl *raw.TooLargeError
	if errors.As(err, &tl) {
		return &TooLargeError{Width: tl.Width, Height: tl.Height, MaxPixels: tl.MaxPixels}
	}
	msg := trimPrefix(err.Error(), "raw: ")
	var ue raw.UnsupportedError
	if errors.As(err, &ue) {
		return unsupportedErr(msg, nil)
	}
	return formatErr(msg, nil)
}

func trimPrefix(s, p string) string {
	if len(s) >= len(p) && s[:len(p)] == p {
		return s[len(p):]
	}
	return s
}
