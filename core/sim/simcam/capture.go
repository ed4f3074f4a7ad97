package simcam

import (
	"bytes"
	"image"
	"image/jpeg"
	"image/png"
	"math"
	"math/rand/v2"
	"sagitta/core/decode/srgb"

	"sagitta/core/internal/parallel"
	"sagitta/core/plane"
)

// Capture renders scene s and turns it into a photograph: photon noise
// (Poisson, exact below 100 electrons and by its Gaussian approximation
// above), read noise (Gaussian), encoding (sRGB transfer function of
// IEC 61966-2-1 or linear), optional sharpening of the encoded values, and
// quantisation to the nearest code with clipping. The result is an
// *image.Gray, *image.Gray16, *image.RGBA or *image.RGBA64 (equal channels,
// opaque) by Encoding and Colour. Noise is drawn row by row from PCG
// streams seeded by (Seed, row), so the same seed gives the same photo on
// any number of goroutines. It panics if the camera or scene is invalid
// (a programmer error, as for RenderLinear).
func (c *Camera) Capture(s Scene) image.Image {
	if c.colourCA() {
		img, err := c.channelPlanes(s)
		if err != nil {
			panic(err)
		}
		return img
	}
	p := c.RenderLinear(s)
	c.addNoise(p)
	return c.encodeImage(p)
}

// Encode captures scene s and returns the file bytes: PNG (16-bit for a
// 16-bit encoding) when JPEGQuality is 0, else baseline JPEG at that quality
// with ExifAPP1, if set, as an APP1 segment right after SOI. ExifAPP1 is
// ignored for PNG output.
func (c *Camera) Encode(s Scene) ([]byte, error) {
	var img image.Image
	if c.colourCA() {
		var err error
		if img, err = c.channelPlanes(s); err != nil {
			return nil, err
		}
	} else {
		p, err := c.Render(s)
		if err != nil {
			return nil, err
		}
		c.addNoise(p)
		img = c.encodeImage(p)
	}
	var buf bytes.Buffer
	if c.JPEGQuality == 0 {
		if err := png.Encode(&buf, img); err != nil {
			return nil, err
		}
		return buf.Bytes(), nil
	}
	if err := jpeg.Encode(&buf, img, &jpeg.Options{Quality: c.JPEGQuality}); err != nil {
		return nil, err
	}
	b := buf.Bytes()
	if len(c.ExifAPP1) == 0 {
		return b, nil
	}
	n := len(c.ExifAPP1) + 2
	out := make([]byte, 0, len(b)+n+2)
	out = append(out, b[:2]...) // SOI
	out = append(out, 0xFF, 0xE1, byte(n>>8), byte(n))
	out = append(out, c.ExifAPP1...)
	return append(out, b[2:]...), nil
}

// noiseStream is the PCG stream selector mixed with the row number.
const noiseStream = 0x5347_5454_4120_4e5a

// poissonExactBelow is the mean (electrons) below which photon counts are
// drawn from the Poisson distribution itself.
const poissonExactBelow = 100

// addNoise adds photon and read noise to the linear plane p in place.
func (c *Camera) addNoise(p *plane.Plane) {
	if c.FullWellE == 0 {
		return
	}
	fw := c.FullWellE
	parallel.Ranges(p.H, 0, func(lo, hi int) {
		for j := lo; j < hi; j++ {
			rng := rand.New(rand.NewPCG(c.Seed, noiseStream^uint64(j)))
			row := p.Pix[j*p.W : (j+1)*p.W]
			for i, v := range row {
				e := math.Max(float64(v), 0) * fw
				var n float64
				if e < poissonExactBelow {
					n = poisson(rng, e)
				} else {
					n = e + math.Sqrt(e)*rng.NormFloat64()
				}
				if c.ReadNoiseE > 0 {
					n += c.ReadNoiseE * rng.NormFloat64()
				}
				row[i] = float32(n / fw)
			}
		}
	})
}

// poisson draws a Poisson variate of mean m < 745 by sequential inversion
// (L. Devroye, Non-Uniform Random Variate Generation, Springer 1986, X.3).
func poisson(rng *rand.Rand, m float64) float64 {
	if m <= 0 {
		return 0
	}
	u := rng.Float64()
	p := math.Exp(-m)
	f := p
	k := 0.0
	for u > f && k < 10*m+50 {
		k++
		p *= m / k
		f += p
	}
	return k
}

// encodeImage applies the transfer function, sharpening and quantisation.
func (c *Camera) encodeImage(p *plane.Plane) image.Image {
	v := c.encodeValues(p)
	r := image.Rect(0, 0, p.W, p.H)
	if c.Encoding.sixteen() {
		q := func(x float64) uint16 { return uint16(math.Round(x * 65535)) }
		if c.Colour {
			img := image.NewRGBA64(r)
			for i, x := range v {
				k := q(x)
				o := i * 8
				for ch := range 4 {
					kk := k
					if ch == 3 {
						kk = 0xFFFF
					}
					img.Pix[o+2*ch], img.Pix[o+2*ch+1] = byte(kk>>8), byte(kk)
				}
			}
			return img
		}
		img := image.NewGray16(r)
		for i, x := range v {
			k := q(x)
			img.Pix[2*i], img.Pix[2*i+1] = byte(k>>8), byte(k)
		}
		return img
	}
	q := func(x float64) uint8 { return uint8(math.Round(x * 255)) }
	if c.Colour {
		img := image.NewRGBA(r)
		for i, x := range v {
			k := q(x)
			img.Pix[4*i], img.Pix[4*i+1], img.Pix[4*i+2], img.Pix[4*i+3] = k, k, k, 0xFF
		}
		return img
	}
	img := image.NewGray(r)
	for i, x := range v {
		img.Pix[i] = q(x)
	}
	return img
}

// encodeValues applies the transfer function, the camera's curve and
// sharpening: code values in [0, 1] before quantisation.
func (c *Camera) encodeValues(p *plane.Plane) []float64 {
	v := make([]float64, len(p.Pix))
	encode := c.Encoding == SRGB8 || c.Encoding == SRGB16
	for i, l := range p.Pix {
		x := math.Min(math.Max(float64(l), 0), 1)
		if encode {
			x = srgb.FromLinear(x)
		}
		if c.Curve != nil {
			x = math.Min(math.Max(c.Curve(x), 0), 1)
		}
		v[i] = x
	}
	if s := c.Sharpen; s != nil && s.Amount > 0 {
		b := gaussBlur(v, p.W, p.H, s.RadiusPx)
		for i := range v {
			v[i] = math.Min(math.Max(v[i]+s.Amount*(v[i]-b[i]), 0), 1)
		}
	}
	return v
}

// gaussBlur returns v blurred by a Gaussian of standard deviation sigma px
// (separable, kernel cut at 4 sigma, borders clamped).
func gaussBlur(v []float64, w, h int, sigma float64) []float64 {
	rad := int(math.Ceil(4 * sigma))
	k := make([]float64, 2*rad+1)
	sum := 0.0
	for i := range k {
		x := float64(i - rad)
		k[i] = math.Exp(-x * x / (2 * sigma * sigma))
		sum += k[i]
	}
	for i := range k {
		k[i] /= sum
	}
	tmp := make([]float64, len(v))
	out := make([]float64, len(v))
	parallel.Ranges(h, 0, func(lo, hi int) {
		for y := lo; y < hi; y++ {
			for x := range w {
				s := 0.0
				for i, kv := range k {
					xx := min(max(x+i-rad, 0), w-1)
					s += kv * v[y*w+xx]
				}
				tmp[y*w+x] = s
			}
		}
	})
	parallel.Ranges(h, 0, func(lo, hi int) {
		for y := lo; y < hi; y++ {
			for x := range w {
				s := 0.0
				for i, kv := range k {
					yy := min(max(y+i-rad, 0), h-1)
					s += kv * tmp[yy*w+x]
				}
				out[y*w+x] = s
			}
		}
	})
	return out
}
