// Units of spatial frequency and the words used for them. The core measures
// in cycles per pixel; the page shows lp/mm (needs the pixel pitch), cycles
// per pixel, or line widths per picture height (LW/PH = 2 x cycles/pixel x
// image height in px, common practice).

export const UNITS = Object.freeze({
  lpmm: { label: 'lp/mm', long: 'line pairs per millimetre on the sensor' },
  cypx: { label: 'cy/px', long: 'cycles per pixel' },
  lwph: { label: 'LW/PH', long: 'line widths per picture height' },
});

/** NYQUIST_CY_PX is the Nyquist frequency of the sampling grid. */
export const NYQUIST_CY_PX = 0.5;

/**
 * fromCyPx converts a frequency in cycles/pixel to the unit, for an image
 * of the given pitch (um) and height (px).
 */
export function fromCyPx(v, unit, img) {
  if (v == null || !Number.isFinite(v)) return NaN;
  switch (unit) {
    case 'lpmm':
      return v / (img.pitch_um / 1000);
    case 'lwph':
      return 2 * v * img.height;
    default:
      return v;
  }
}

/** digits gives a sensible number of decimals for a value in the unit. */
export function digits(unit) {
  return unit === 'cypx' ? 3 : unit === 'lpmm' ? 1 : 0;
}

/** fmtFreq formats a frequency given in cycles/pixel in the unit, with its label. */
export function fmtFreq(v, unit, img, withLabel = true) {
  const x = fromCyPx(v, unit, img);
  if (!Number.isFinite(x)) return 'n/a';
  const s = x.toFixed(digits(unit));
  return withLabel ? `${s} ${UNITS[unit].label}` : s;
}

/** fmt formats a plain number with d decimals, or "n/a". */
export function fmt(v, d = 2) {
  if (v == null || !Number.isFinite(v)) return 'n/a';
  return (Math.abs(v) < 0.5 * 10 ** -d ? 0 : v).toFixed(d); // no "-0.0"
}

/** fmtFNumber writes an f-number the usual way ("f/5.6"). */
export function fmtFNumber(n) {
  if (!(n > 0)) return '';
  const r = Math.round(n * 10) / 10;
  return 'f/' + (Number.isInteger(r) ? r.toFixed(0) : r.toFixed(1));
}

/** fmtExposure writes an exposure time ("1/250 s", "2 s"). */
export function fmtExposure(s) {
  if (!(s > 0)) return '';
  if (s >= 0.5) return `${+s.toFixed(1)} s`;
  return `1/${Math.round(1 / s)} s`;
}
