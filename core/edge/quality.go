package edge

import (
	"math"

	"sagitta/core/plane"
)

// Thresholds of the quality flags. They follow common practice for the
// slanted-edge method (ISO 12233 advice: an edge of at least ~60 px, a slant
// away from the pixel axes and from ratios of small integers, no clipping,
// moderate contrast) and are deliberately cautious: a flag asks the user to
// look, it does not discard the measurement.
const (
	minLengthPx     = 40   // shorter edges get FlagShortEdge
	maxBowPx        = 0.5  // more bow gets FlagCurved
	maxPhasePx      = 0.2  // coarser phase sampling gets FlagCritical
	minSNR          = 20   // lower step/noise gets FlagNoisy
	minRatio        = 1.5  // lower light/dark gets FlagLowContrast
	clipFraction    = 0.02 // share of plateau pixels at a limit that counts as clipping
	darkClipLevel   = 1e-6 // linear value at or below which a pixel sits at the bottom code
	phaseReachPx    = 3.0  // the phase spacing is judged within this distance of the edge
	plateauMarginPx = 2.0  // plateau pixels start this far beyond the edge profile's core
)

// coreWidth is the half-width (px) of the steep part of the edge profile:
// pixels farther out count as plateau for levels, noise and clipping.
func coreWidth(f lineFit) float64 { return 4*f.Width + plateauMarginPx }

// assess fills the plateau statistics that the estimator did not and sets
// the quality flags.
func assess(m *Measurement, s samples, f lineFit, sdD, sdL float64) {
	core := coreWidth(f)
	d := make([]float64, len(s.v))
	for i := range d {
		d[i] = f.dist(s.u[i], s.w[i])
	}
	if m.NoiseRMS == 0 {
		dark, light, _, _ := plateaus(d, s.v, core)
		if !math.IsNaN(dark) && !math.IsNaN(light) {
			m.Dark, m.Light = dark, light
		}
		m.NoiseRMS = math.Sqrt(0.5 * (sdD*sdD + sdL*sdL))
	}
	step := m.Light - m.Dark
	if m.NoiseRMS > 0 {
		m.SNR = step / m.NoiseRMS
	} else {
		m.SNR = math.Inf(1)
	}
	var nDark, nLight, cDark, cLight float64
	var near, nearV []float64
	for i, x := range d {
		switch {
		case x < -core:
			nDark++
			if s.v[i] <= darkClipLevel {
				cDark++
			}
		case x > core:
			nLight++
			if s.v[i] >= plane.ClipLevel {
				cLight++
			}
		case math.Abs(x) <= phaseReachPx:
			near = append(near, x)
			nearV = append(nearV, s.v[i])
		}
	}
	if m.PhasePx == 0 && len(near) > 1 {
		pts := merge(near, nearV)
		var g1, g2 float64
		for i := 1; i < len(pts); i++ {
			g := pts[i].d - pts[i-1].d
			g1 += g
			g2 += g * g
		}
		if g1 > 0 {
			m.PhasePx = g2 / g1
		}
	}
	for _, v := range m.ESF.V {
		m.Overshoot = math.Max(m.Overshoot, math.Max(v-1, -v))
	}
	add := func(c bool, fl Flag) {
		if c {
			m.Flags = append(m.Flags, fl)
		}
	}
	add(nDark > 0 && cDark/nDark > clipFraction, FlagClippedDark)
	add(nLight > 0 && cLight/nLight > clipFraction, FlagClippedLight)
	add(m.Dark > 0 && m.Light/m.Dark < minRatio || step <= 0, FlagLowContrast)
	add(m.LengthPx < minLengthPx, FlagShortEdge)
	add(m.BowPx > maxBowPx, FlagCurved)
	add(m.PhasePx > maxPhasePx, FlagCritical)
	add(m.SNR < minSNR, FlagNoisy)
	if m.Flags == nil {
		m.Flags = []Flag{}
	}
}
