// Sagitta's colours. They are defined once, in the core (core/plot,
// colour.go: orientation by hue, photos by a categorical palette, sharpness
// by a sequential scale designed in OKLab whose lightness rises steadily, so
// it reads in grey and with the common colour-vision deficiencies), and
// handed to the page at start by setPalette (the core's sagittaPalette), so
// that the page and the exported plots speak the same visual code. The
// values below only stand in until then.

// Stops of the sharpness scale, soft to sharp (sRGB hex), close together so
// that interpolating between them in sRGB stays on the core's scale.
let STOPS = ['#1d2b5a', '#25548a', '#1f8a99', '#4fb381', '#a7d36a', '#f4ec8c'];

/** SCALE_MAX_CY_PX is the top of the sharpness scale: the Nyquist frequency. */
export const SCALE_MAX_CY_PX = 0.5;

/** scaleColour maps t in [0, 1] to the sharpness scale (linear in sRGB between stops). */
function scaleColour(t) {
  if (!Number.isFinite(t)) return '#888888';
  t = Math.min(1, Math.max(0, t)) * (STOPS.length - 1);
  const i = Math.min(STOPS.length - 2, Math.floor(t));
  const f = t - i;
  const a = hex(STOPS[i]);
  const b = hex(STOPS[i + 1]);
  const c = a.map((v, k) => Math.round(v + (b[k] - v) * f));
  return '#' + c.map((v) => v.toString(16).padStart(2, '0')).join('');
}

/** mtf50Colour colours an MTF50 in cycles/pixel on the scale from 0 to Nyquist. */
export function mtf50Colour(cyPx) {
  return scaleColour(cyPx / SCALE_MAX_CY_PX);
}

/** scaleGradient is a CSS linear-gradient of the scale, left to right. */
export function scaleGradient() {
  return `linear-gradient(to right, ${STOPS.join(', ')})`;
}

/** ORIENTATION colours: sagittal and tangential (and mixed, in grey). */
export const ORIENTATION = {
  sagittal: '#a36200',
  tangential: '#5e3a9a',
  mixed: '#707070',
};

/** PHOTO colours for comparisons, in order of use. */
export const PHOTO = ['#213f8f', '#c25a00', '#23806e', '#9c3c8c', '#3d3d3d', '#6a91d4'];

/**
 * setPalette takes the core's colours: {sagittal, tangential, mixed,
 * photos: [...], scale: [soft ... sharp]} (sRGB hex).
 */
export function setPalette(p) {
  Object.assign(ORIENTATION, { sagittal: p.sagittal, tangential: p.tangential, mixed: p.mixed });
  PHOTO.splice(0, PHOTO.length, ...p.photos);
  if (p.scale && p.scale.length >= 2) STOPS = [...p.scale];
}

function hex(h) {
  return [1, 3, 5].map((i) => parseInt(h.slice(i, i + 2), 16));
}
