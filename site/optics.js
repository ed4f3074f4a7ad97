// Reference curves of optics, drawn beside measured responses.

/** WAVELENGTH_UM is the light assumed for diffraction: 0.55 um, green, where the eye and most sensors are most sensitive (common practice). */
export const WAVELENGTH_UM = 0.55;

/**
 * diffractionMTF is the MTF of an aberration-free lens with a circular
 * aperture at f-number n in incoherent light of wavelength lambda (um), at
 * frequency f in cycles/pixel on a sensor of pitch p (um):
 *
 *   MTF(v) = (2/pi) (phi - cos(phi) sin(phi)),  phi = arccos(v / vc),  v < vc
 *   vc = 1 / (lambda n)  cycles per unit length  (here: p / (lambda n) cycles/pixel)
 *
 * (J. W. Goodman, Introduction to Fourier Optics, 3rd ed., 2005, section 6.3.)
 */
export function diffractionMTF(f, n, pitchUM, lambdaUM = WAVELENGTH_UM) {
  const vc = pitchUM / (lambdaUM * n);
  const v = Math.abs(f) / vc;
  if (v >= 1) return 0;
  const phi = Math.acos(v);
  return (2 / Math.PI) * (phi - Math.cos(phi) * Math.sin(phi));
}

/**
 * pixelMTF is the transfer function of a square pixel of 100 % fill factor
 * across an edge along a pixel axis: |sinc(f)| = |sin(pi f) / (pi f)|, f in
 * cycles/pixel (G. D. Boreman, Modulation Transfer Function in Optical and
 * Electro-Optical Systems, SPIE Press, 2001, chapter 2).
 */
export function pixelMTF(f) {
  if (f === 0) return 1;
  return Math.abs(Math.sin(Math.PI * f) / (Math.PI * f));
}

/**
 * bestPossible is the response of a perfect lens at f-number n on this
 * sensor: diffraction times the pixel's own area. A measured system MTF
 * above it points at sharpening in the file, not at the lens.
 */
export function bestPossible(f, n, pitchUM) {
  return diffractionMTF(f, n, pitchUM) * pixelMTF(f);
}
