// Sagitta's own colours. The sharpness scale runs from a deep blue (soft)
// to a pale yellow (sharp) through teal and green: its lightness rises
// steadily, so it reads in grey and to people with red-green colour
// blindness, whose vision keeps the blue-yellow axis. The two orientations
// are told apart by an orange and a violet, far apart for every common kind
// of colour blindness; photos in a comparison get distinct hues that also
// differ in lightness.

// Stops of the sharpness scale, soft to sharp (sRGB hex).
const STOPS = ['#1d2b5a', '#25548a', '#1f8a99', '#4fb381', '#a7d36a', '#f4ec8c'];

/** SCALE_MAX_CY_PX is the top of the sharpness scale: the Nyquist frequency. */
export const SCALE_MAX_CY_PX = 0.5;

/** scaleColour maps t in [0, 1] to the sharpness scale (linear in sRGB between stops). */
export function scaleColour(t) {
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
export const ORIENTATION = Object.freeze({
  sagittal: '#c25e00',
  tangential: '#6a45b5',
  mixed: '#6f6f6f',
});

/** PHOTO colours for comparisons, in order of use. */
export const PHOTO = Object.freeze(['#1f5fa6', '#d08a00', '#8e3b8f', '#2e8b57', '#b03a48', '#4d4d4d', '#0f8b8d', '#8a6d3b']);

function hex(h) {
  return [1, 3, 5].map((i) => parseInt(h.slice(i, i + 2), 16));
}
