// Package simcam is Sagitta's simulated camera: it renders photographs of
// test targets (polygons with straight edges, sinusoidal Siemens stars, sine
// gratings) through a lens whose point spread function (PSF) is known
// analytically, with exact integration over each pixel's area, so that a
// measured MTF can be compared with the true one.
//
// # Model
//
// A pixel's linear value is (scene conv PSF conv pixel box)(pixel centre):
// the PSF is the lens's PSF at the pixel's position (locally shift-invariant),
// the pixel box is the unit square (100 % fill factor). The system transfer
// function of an edge with unit normal n = (cos t, sin t) is therefore
//
//	MTF(f) = |OTF(f n)| * |sinc(f cos t) sinc(f sin t)|,  sinc(x) = sin(pi x)/(pi x),
//
// the product of the lens OTF and the pixel aperture's transfer function
// (J. W. Goodman, Introduction to Fourier Optics, 3rd ed. (2005), ch. 6;
// G. D. Boreman, Modulation Transfer Function in Optical and Electro-Optical
// Systems, SPIE Press (2001), ch. 2). TrueMTF returns it.
//
// Coordinates follow core/plane: x right, y down, pixel (i, j) covers
// [i, i+1) x [j, j+1); angles in degrees from +x towards +y; frequencies in
// cycles/pixel.
//
// Camera.Distortion bends the scene radially before it is rendered (its
// vertices mapped through the Brown model) and Camera.Falloff darkens the
// rendered image away from the optical centre (cosine-fourth law and an
// extra vignette); see lensgeom.go.
//
// # Rendering regimes
//
// Polygons are rendered pixel by pixel, each pixel in one of three regimes:
//
//   - Far from every polygon edge (farther than the lens's support radius
//     plus half a pixel diagonal): the exact constant level of the painted
//     stack.
//   - Near one straight edge: the blurred half-plane, a function of the
//     signed distance u of the pixel centre from the edge line only:
//     value(u) = integral ESF_n(u - s) p(s) ds with p the projection of the
//     pixel square onto the normal (a trapezoid). For Gaussian PSFs it has a
//     closed form through the second antiderivative of the normal CDF; for
//     other PSFs the frequency form
//     value(u) = 1/2 + (1/pi) integral_0^inf K(f) sin(2 pi f u) / f df,
//     K(f) = OTF(f n) sinc(f cos t) sinc(f sin t),
//     is tabulated per edge by one FFT and interpolated (error < 1e-6).
//   - Near two or more edges or a vertex: the single-edge value of the
//     nearest edge plus a 2D quadrature correction (a control variate): the
//     sum over PSF quadrature offsets o_k (Gauss-Hermite nodes for Gaussians,
//     a graded grid of cell-integrated weights for other PSFs) of
//     w_k * (A_true(o_k) - A_edge(o_k)), where A is the exact area integral of
//     the painted level over the pixel square shifted by o_k (convex polygon
//     clipping) and A_edge the same for the nearest edge's half-plane. The
//     correction vanishes continuously where the half-plane model is exact,
//     so the two regimes join without seams.
//
// Stars and gratings are rendered by FFT on a supersampled patch (see
// pattern.go) and added by linear superposition; they must not overlap
// polygons.
//
// # Accuracy and limits
//
// Measured by this package's tests (sources named there):
//
//   - Gaussian lenses, single edges: closed form within 1e-9 of brute-force
//     quadrature (rendered values are float32, so within 1e-7).
//   - Non-Gaussian PSFs (Airy, cascades), single edges: the FFT table is
//     within 1e-8 of direct evaluation of the frequency integral, and within
//     1e-9 of a direct spatial integration of the Airy pattern.
//   - Corners (Gaussian): within 2e-3 of the level difference (typically
//     1e-3) of the exact blurred square; the regimes join without seams
//     (difference below 1e-6); a square's flux is conserved to 1e-4.
//   - Gratings: interior pixels within 1e-5 of the analytic response.
//
// Limits:
//
//   - The Airy pattern's energy outside radius r falls only as
//     2 lambda N / (pi^2 r), so no finite support holds all but 1e-6 of it.
//     Airy.Support is the distance at which the edge-spread tail is
//     AiryTailTol (1e-3); edges farther away than that are ignored (a step
//     of at most 1e-3 of their contrast), and the corner rule stops at 48 px,
//     beyond which the nearest edge is treated as an infinite line: small
//     polygons seen through an Airy lens gain up to about 1 % of their flux
//     (12 px square, f/5.6, 4 um). Long straight edges are exact.
//   - Non-Gaussian field-varying lenses (FieldLens with Diffraction, or any
//     other Lens whose PSF is not Gaussian) use, per edge, the PSF at the
//     edge's midpoint for the single-edge table and, per 64 px cell, the PSF
//     at the cell's centre for the corner rule. Gaussian field lenses use the
//     PSF at every pixel's centre exactly.
//   - The corner rule for non-Gaussian PSFs costs a few hundred area
//     evaluations per pixel: big frames through an Airy lens with many
//     polygons are slow; use Gaussian lenses for them.
//   - Stars and gratings use the PSF at their centre and must not overlap
//     polygons (see Scene).
package simcam
