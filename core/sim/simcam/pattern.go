package simcam

import (
	"math"

	"gonum.org/v1/gonum/dsp/fourier"
	"sagitta/core/internal/parallel"
	"sagitta/core/plane"
)

// Stars and gratings are rendered by FFT convolution on a supersampled patch:
//
//  1. the pattern minus the background, (level - Background) inside its disc
//     or rectangle and 0 outside, is sampled at k x k points per pixel on a
//     grid aligned with the pixel centres (k = 4, or 2 for very large
//     patches); the outline is anti-aliased by the area fraction of each
//     sub-cell inside it (exact per side for the rectangle, a linear ramp
//     over one sub-cell for the disc);
//  2. its 2D DFT (rows by a real FFT, then columns) is multiplied by the
//     lens OTF at the pattern's centre times the pixel aperture
//     sinc(fx) sinc(fy);
//  3. only the samples at pixel centres are needed, so the inverse transform
//     folds the spectrum (sum of its k aliases) and inverts a k times
//     shorter FFT in each direction;
//  4. the result is added to the polygon rendering (linear superposition),
//     which is why patterns must not overlap polygons.
//
// The patch is padded by the PSF support plus one pixel on each side, more
// than the kernel's reach, so the circular convolution does not wrap onto
// the output. Where a pattern is band-limited below k/2 cycles/pixel (a
// grating below 2 cycles/pixel; a star away from its centre) the interior is
// exact up to the PSF's truncation; the star's centre, whose frequency
// is unbounded, aliases within a radius of about Cycles / (pi k) px.

// pattern is a star or grating prepared for sampling.
type pattern struct {
	box    bbox
	cx, cy float64
	// sample returns (level - bg) times the area fraction inside the
	// pattern of the sub-cell of size cell centred at (x, y).
	sample func(x, y, cell, bg float64) float64
}

func starPattern(s Star) pattern {
	ph := s.PhaseDeg * math.Pi / 180
	n := float64(s.Cycles)
	return pattern{
		box: bbox{s.X - s.Radius, s.Y - s.Radius, s.X + s.Radius, s.Y + s.Radius},
		cx:  s.X, cy: s.Y,
		sample: func(x, y, cell, bg float64) float64 {
			dx, dy := x-s.X, y-s.Y
			r := math.Hypot(dx, dy)
			cov := math.Min(1, math.Max(0, 0.5+(s.Radius-r)/cell))
			if cov == 0 {
				return 0
			}
			lv := s.Mean
			if r > 0 {
				a := s.Amplitude
				if s.FadePx > 0 {
					a *= math.Min(math.Max((r-s.FadePx)/(0.25*s.FadePx), 0), 1)
				}
				lv += a * math.Cos(n*math.Atan2(dy, dx)+ph)
			}
			return (lv - bg) * cov
		},
	}
}

func gratingPattern(g Grating) pattern {
	pts := positive(g.Corners[:])
	type side struct{ ax, ay, nx, ny, pw, pb float64 }
	var sides [4]side
	for i := range 4 {
		a, b := pts[i], pts[(i+1)%4]
		l := math.Hypot(b[0]-a[0], b[1]-a[1])
		// inward normal of a positively oriented polygon: (-dy, dx)
		nx, ny := -(b[1]-a[1])/l, (b[0]-a[0])/l
		c, s := math.Abs(nx), math.Abs(ny)
		sides[i] = side{a[0], a[1], nx, ny, math.Max(c, s), math.Min(c, s)}
	}
	sa, ca := math.Sincos(g.DirectionDeg * math.Pi / 180)
	w := 2 * math.Pi * g.FreqCyPx
	ph := g.PhaseDeg * math.Pi / 180
	box := boxOf(pts)
	return pattern{
		box: box,
		cx:  (box.X0 + box.X1) / 2, cy: (box.Y0 + box.Y1) / 2,
		sample: func(x, y, cell, bg float64) float64 {
			cov := 1.0
			for _, s := range sides {
				d := ((x-s.ax)*s.nx + (y-s.ay)*s.ny) / cell
				cov *= trapCDF(d, s.pw, s.pb)
				if cov == 0 {
					return 0
				}
			}
			lv := g.Mean + g.Amplitude*math.Cos(w*(x*ca+y*sa)+ph)
			return (lv - bg) * cov
		},
	}
}

// maxPatchCoeffs bounds the complex spectrum of one patch (16 bytes each).
const maxPatchCoeffs = 1 << 22

// addPattern renders pattern pt through lens l and adds it to p.
func addPattern(p *plane.Plane, l Lens, bg float64, pt pattern) {
	psf := l.PSFAt(pt.cx, pt.cy)
	r := psf.Support() + 1
	ix0 := int(math.Floor(pt.box.X0 - r))
	iy0 := int(math.Floor(pt.box.Y0 - r))
	ix1 := int(math.Ceil(pt.box.X1 + r))
	iy1 := int(math.Ceil(pt.box.Y1 + r))
	if ix1 < 0 || iy1 < 0 || ix0 >= p.W || iy0 >= p.H {
		return
	}
	wp := nextFast(ix1 - ix0 + 2)
	hp := nextFast(iy1 - iy0 + 2)
	k := 4
	if k*wp*k*hp/2 > maxPatchCoeffs {
		k = 2
	}
	nx, ny := k*wp, k*hp
	nh := nx/2 + 1
	spec := make([]complex128, ny*nh)
	cell := 1 / float64(k)

	parallel.Ranges(ny, 0, func(lo, hi int) {
		row := make([]float64, nx)
		fft := fourier.NewFFT(nx)
		for j := lo; j < hi; j++ {
			y := float64(iy0) + 0.5 + float64(j)*cell
			any := false
			for i := range nx {
				row[i] = pt.sample(float64(ix0)+0.5+float64(i)*cell, y, cell, bg)
				any = any || row[i] != 0
			}
			if any {
				fft.Coefficients(spec[j*nh:(j+1)*nh], row)
			}
		}
	})

	dec := make([]complex128, hp*nh) // decimated rows, x spectrum
	parallel.Ranges(nh, 0, func(lo, hi int) {
		col := make([]complex128, ny)
		fold := make([]complex128, hp)
		fwd := fourier.NewCmplxFFT(ny)
		inv := fourier.NewCmplxFFT(hp)
		for m := lo; m < hi; m++ {
			for q := range ny {
				col[q] = spec[q*nh+m]
			}
			fwd.Coefficients(col, col)
			fx := float64(m) * float64(k) / float64(nx)
			hx := sinc(fx)
			for q := range ny {
				fy := float64(freqIndex(q, ny)) * float64(k) / float64(ny)
				col[q] *= complex(psf.OTF(fx, fy)*hx*sinc(fy), 0)
			}
			for t := range hp {
				var s complex128
				for a := t; a < ny; a += hp {
					s += col[a]
				}
				fold[t] = s
			}
			inv.Sequence(fold, fold)
			for t := range hp {
				dec[t*nh+m] = fold[t]
			}
		}
	})

	norm := 1 / float64(nx*ny)
	parallel.Ranges(hp, 0, func(lo, hi int) {
		z := make([]complex128, wp)
		inv := fourier.NewCmplxFFT(wp)
		for t := lo; t < hi; t++ {
			y := iy0 + t
			if y < 0 || y >= p.H || y > iy1 {
				continue
			}
			clear(z)
			for m := range nx {
				var c complex128
				if m < nh {
					c = dec[t*nh+m]
				} else {
					v := dec[t*nh+nx-m]
					c = complex(real(v), -imag(v))
				}
				z[m%wp] += c
			}
			inv.Sequence(z, z)
			for q := range wp {
				x := ix0 + q
				if x < 0 || x >= p.W || x > ix1 {
					continue
				}
				p.Pix[y*p.W+x] += float32(real(z[q]) * norm)
			}
		}
	})
}
