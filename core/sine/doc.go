// Package sine measures the system MTF from sine patterns in a photo:
// sinusoidal Siemens stars and sine gratings, printed by Sagitta or by
// anyone else.
//
// # Stars (s-SFR)
//
// A sinusoidal Siemens star of N cycles has, in polar coordinates (r, phi)
// about its centre, the level
//
//	L(r, phi) = a + b cos(N phi) + c sin(N phi),
//
// so at radius r px the pattern is locally a sine grating of frequency
// N / (2 pi r) cycles/pixel whose contrast varies along the circle, that is
// perpendicular to the spokes. Measuring the N-th angular harmonic on
// circles of decreasing radius gives the modulation transfer at increasing
// frequency, in every direction at once. This is the method of the
// sine-star SFR (s-SFR) of ISO 12233:2014 and later editions (Photography -
// Electronic still picture imaging - Resolution and spatial frequency
// responses, https://www.iso.org/standard/71696.html).
//
// What this package does, step by step (star.go, centre.go, detect.go):
//
//  1. Detection (Find): a reduced copy of the photo is searched for
//     textured areas (dense zero crossings of the band-passed image with
//     real contrast). In each textured blob the isophotes (lines of constant
//     level, perpendicular to the local gradient) are tested for a common
//     point: a star's spokes all meet at its centre, a grating's lines are
//     parallel, an edge or a letter is neither.
//  2. Centre: the point c that minimises sum |g_i|^2 (u_i . (p_i - c))^2 over
//     the pixels p_i of an annulus, u_i the unit gradient: the least-squares
//     meeting point of the isophotes. For any point-symmetric PSF the
//     pixels at p and 2c - p contribute opposite residuals, so the estimate
//     is unbiased even when blur bends the isophotes. Its uncertainty is a
//     delete-one-group jackknife over 8 pairs of opposite sectors (each
//     leave-one-out set stays point-symmetric).
//  3. N is the strongest angular harmonic on circles about the centre
//     (FFT of the samples), confirmed on two radii.
//  4. Modulation: the pixels (never interpolated, so no resampling filter
//     enters the result) are binned into rings 1 px wide and angular
//     segments; in each cell a + b cos(N phi) + c sin(N phi) is fitted by
//     linear least squares. The modulation is sqrt(b^2 + c^2 - s_b^2 - s_c^2)
//     / a, with the noise variances s_b^2, s_c^2 of the fit removed (the
//     amplitude of a noisy sinusoid is biased upward by them). The frequency
//     of a ring is N / (2 pi r) at its radius; the direction of measurement
//     of a segment is perpendicular to the radius through its middle.
//  5. Normalisation: the star's modulation at zero frequency, M0, is the
//     value at f = 0 of log M(f) = c0 + c1 f + c2 f^2 fitted to the outer
//     rings (f from the largest usable radius up to 0.1 cy/px beyond). The
//     quadratic term is the leading one for blur with finite second moments
//     (Gaussian, pixel aperture), the linear one for diffraction, whose MTF
//     falls linearly from 1 (Goodman ch. 6). Plain normalisation by the
//     largest radius would leave the loss there in every value: for a
//     Gaussian PSF of sigma 2 px and a largest radius at 0.054 cy/px the
//     outer ring carries only 79 % of the modulation. Star.OuterMod keeps
//     the largest radius' value for comparison; a correction beyond 25 % is
//     flagged. When the modulation rises with frequency at the largest
//     radius (in-camera sharpening; no lens does that) the trend below it is
//     unknown: the star is then normalised by the largest radius, as in the
//     standard's method, and flagged "sharpened".
//  6. Curves: each segment's ring values divided by M0 are resampled onto a
//     0.01 cy/px grid by local linear regression. Frequencies below the
//     largest radius' (Star.RefFreq) are not measured: the curve joins 1 at
//     0 to the first measured value along a parabola in f, the shape the
//     normalisation assumes. Frequencies above the smallest usable radius'
//     are not measured either and are left out (see Star.MaxFreq): nothing
//     is extrapolated upward.
//
// Sagittal and tangential curves for a star come from the segments whose
// direction of measurement lies across or along the field radius through
// the star's centre (Star.Along, which also undoes the averaging of the MTF
// over each segment's angular width; segments are kept as wedge averages
// for polar plots).
//
// # Gratings
//
// A sine grating of frequency f along direction theta is fitted as
// a + b cos(2 pi f (x cos theta + y sin theta)) + c sin(...) by linear least
// squares over the pixels of its rectangle (shrunk clear of the blurred
// border); f and theta are estimated from the spectrum of the area and then
// refined by maximising the fitted amplitude. The modulation is
// sqrt(b^2 + c^2) / a; the MTF is its ratio to the modulation of a
// low-frequency reference on the same sheet (grating.go).
//
// # Conventions
//
// Coordinates follow core/plane: x right, y down, pixel (i, j) covers
// [i, i+1) x [j, j+1) with its centre at (i + 0.5, j + 0.5). Angles are in
// degrees from +x towards +y. Frequencies are in cycles/pixel. Input planes
// are linear light (modulation is only meaningful in linear light).
package sine
