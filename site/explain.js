// Plain words for the terms of the trade, shown where they appear: a
// "What do these words mean?" disclosure beside the numbers, and a "How it
// is computed" disclosure for the methods and their sources, so that the
// main text stays free of citations.

/** EXPLAIN holds one short explanation per term, for a hobbyist without a textbook. */
const EXPLAIN = Object.freeze({
  MTF: 'How much of the contrast of fine detail the lens and camera keep: 1 is all of it, 0 none. Finer detail (more lines per mm) always keeps less.',
  MTF50: 'The fineness of detail at which half of the contrast is left. A higher MTF50 means a sharper picture; it is the single number most often quoted.',
  MTF50P: 'Like MTF50, but half of the highest point of the curve rather than half of full contrast. It reads less high on photos sharpened in the camera, whose curve rises above 1.',
  Nyquist: 'The finest detail the sensor can record: one cycle every two pixels (0.5 cy/px). Beyond it the pixels make false patterns (moiré) instead of detail.',
  'cy/px': 'Cycles per pixel: how fine a pattern is, counted on the pixels. 0.5 cy/px is the Nyquist frequency.',
  'lp/mm': 'Line pairs per millimetre on the sensor: one dark and one light line make a pair.',
  sagittal: 'Detail that runs along the line from the optical centre, like the spokes of a wheel; measured across that line.',
  tangential: 'Detail that runs around the optical centre, like the rim of a wheel; measured along the line from the optical centre.',
  'standard error': 'How far a value could move if you shot the same chart again: about two times out of three it stays within one standard error.',
  '± 2 standard errors': 'The shaded band: the curve would stay inside it about 19 times out of 20 if you shot the same chart again. Differences smaller than the band are not worth acting on.',
  smoothing: 'Each field curve is a smooth line through the measured points, so that one noisy target does not bend it; far from any target there is no curve.',
  'set aside': 'Edges found in the photo but not measured (too short, too faint, clipped …), each with its reason.',
  'perfect lens': 'The best a flawless lens could do at this f-number on this sensor: light spreading through the aperture (diffraction, at 550 nm) times the blur of the pixel area itself. Real photos lie below it.',
});

const el = (tag, attrs = {}, text) => {
  const e = document.createElement(tag);
  for (const [k, v] of Object.entries(attrs)) e.setAttribute(k, v);
  if (text != null) e.textContent = text;
  return e;
};

/** explainBox returns a small "What do these words mean?" disclosure for the terms. */
export function explainBox(terms) {
  const det = el('details', { class: 'explain' });
  det.append(el('summary', {}, 'What do these words mean?'));
  const dl = el('dl');
  for (const t of terms) if (EXPLAIN[t]) dl.append(el('dt', {}, t), el('dd', {}, EXPLAIN[t]));
  det.append(dl);
  return det;
}

/** howComputed returns a "How it is computed" disclosure with one paragraph per line. */
export function howComputed(lines) {
  const det = el('details', { class: 'explain how' });
  det.append(el('summary', {}, 'How it is computed'));
  for (const l of lines.filter(Boolean)) det.append(el('p', {}, l));
  return det;
}

/** titled sets the explanation of term as the title (tooltip) of e and returns e. */
export function titled(e, term) {
  if (EXPLAIN[term]) e.title = EXPLAIN[term];
  return e;
}
