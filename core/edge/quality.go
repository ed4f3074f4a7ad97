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
	d := s.dists(f)
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
		pts := merge(near, nearV, nil)
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
	// A plateau with pixels at a limit is clipped only if signal was lost
	// (judgeClip); otherwise the edge is kept with a caution.
	if nDark > 0 && cDark/nDark > clipFraction {
		if judgeClip(m, s, f, -1, cDark/nDark, sdL) {
			add(true, FlagClippedDark)
		} else {
			add(true, FlagAtLimit)
		}
	}
	if nLight > 0 && cLight/nLight > clipFraction {
		if judgeClip(m, s, f, 1, cLight/nLight, sdD) {
			add(true, FlagClippedLight)
		} else if !hasFlagIn(m.Flags, FlagAtLimit) {
			add(true, FlagAtLimit)
		}
	}
	add(m.Dark > 0 && m.Light/m.Dark < minRatio || step <= 0, FlagLowContrast)
	add(m.LengthPx < minLengthPx, FlagShortEdge)
	add(m.BowPx > maxBowPx, FlagCurved)
	add(m.PhasePx > maxPhasePx, FlagCritical)
	add(m.SNR < minSNR, FlagNoisy)
	if m.Flags == nil {
		m.Flags = []Flag{}
	}
}

func hasFlagIn(fl []Flag, f Flag) bool {
	for _, g := range fl {
		if g == f {
			return true
		}
	}
	return false
}

// Thresholds of the clipping judgement.
const (
	transitionLevel = 0.9 // the transition ends where the profile reaches this share of the step
	oneSidedShare   = 0.9 // a plateau with more of its pixels at the limit has its noise cut away
	kinkRatio       = 0.6 // a plateau side reached this much faster than the other side is cut off
)

// judgeClip decides whether the plateau on side (+1 light, -1 dark), of
// which a share frac of pixels sits at the file's limit, has lost signal
// (true: clipped) or merely sits at the limit (false). Signal is lost when
//
//   - pixels in the transition, where the profile is still below
//     transitionLevel of the step from the other plateau, reach the limit
//     (the level they would have had is above it);
//   - the noise is one-sided: the other plateau is noisy (sdOther > 0) but
//     more than oneSidedShare of this plateau's pixels are exactly at the
//     limit, so its true level lies beyond it by more than the noise;
//   - the profile meets the plateau with a kink: it runs from 90 % to 98 %
//     of the step on this side in less than kinkRatio of the distance it
//     takes from 10 % to 2 % on the other side (an edge's blur fades into
//     both plateaus alike; a cut plateau ends the rise abruptly).
//
// A plateau exactly at the limit (an ideal render with paper at full
// scale) loses nothing: the profile below the limit is intact.
func judgeClip(m *Measurement, s samples, f lineFit, side float64, frac, sdOther float64) bool {
	if sdOther > 0 && frac > oneSidedShare {
		return true
	}
	e := m.ESF
	if len(e.X) < 4 {
		return true
	}
	// Profile oriented so that it rises towards the judged side.
	x := make([]float64, len(e.X))
	v := make([]float64, len(e.V))
	for i := range e.X {
		j := i
		if side < 0 {
			j = len(e.X) - 1 - i
		}
		x[i], v[i] = side*e.X[j], e.V[j]
		if side < 0 {
			v[i] = 1 - v[i]
		}
	}
	cross := func(level float64) float64 {
		for i := 1; i < len(v); i++ {
			if v[i-1] < level && v[i] >= level {
				return x[i-1] + (level-v[i-1])/(v[i]-v[i-1])*(x[i]-x[i-1])
			}
		}
		return math.NaN()
	}
	x02, x10, x50, x90, x98 := cross(0.02), cross(0.1), cross(0.5), cross(transitionLevel), cross(0.98)
	if math.IsNaN(x50) || math.IsNaN(x90) {
		return true
	}
	if !math.IsNaN(x02) && !math.IsNaN(x10) && !math.IsNaN(x98) && x98-x90 < kinkRatio*(x10-x02) {
		return true
	}
	// Pixels in the transition at the limit (the profile's x axis is
	// centred on the line spread function's centroid, within a small
	// fraction of a pixel of the fitted edge the distances are taken from).
	var n, at float64
	for i := range s.v {
		if d := side * f.dist(s.u[i], s.w[i]); d < x90 && d > x50-(x90-x50) {
			n++
			limit := (side > 0 && s.v[i] >= plane.ClipLevel) || (side < 0 && s.v[i] <= darkClipLevel)
			if limit {
				at++
			}
		}
	}
	return n > 0 && at/n > 0.01
}
