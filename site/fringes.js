// Colour fringes (lateral chromatic aberration) from the core's lateral_ca
// of a photo (core/fringe, analyze.LateralCA): the verdict in words first,
// then the core's figure (red and blue against green along the radius,
// with its data table), which edges were used and why, and the caution.
// The page branches on the codes only; every sentence and number is the
// core's. Shown in "Across the frame", so it prints with the report.

import { coreFigure } from './corefig.js';
import { howComputed } from './explain.js';
import { el } from './dom.js';

/** TITLE words each verdict code (core/note: ca-*) as a card title. */
const TITLE = Object.freeze({
  'ca-barely-visible': 'Colour fringes: barely visible',
  'ca-visible': 'Colour fringes: visible at 100 %',
  'ca-strong': 'Colour fringes: strong',
  'ca-few-edges': 'Colour fringes: not measured',
});

/** renderFringes returns the colour fringes section of photo result r, or null without lateral_ca. */
export function renderFringes(r, pool, label, base) {
  const ca = r.lateral_ca;
  if (!ca) return null;
  const sec = el('section', { class: 'fringes', 'aria-labelledby': 'fringes-title' });
  sec.append(el('h4', { id: 'fringes-title' }, 'Colour fringes'));
  const card = el('article', { class: 'card', 'data-code': ca.code });
  card.append(el('h4', {}, TITLE[ca.code] || 'Colour fringes'));
  card.append(el('p', {}, ca.text));
  const i = (r.warning_codes || []).indexOf('chroma-subsampled');
  if (i >= 0) card.append(el('p', { class: 'caution' }, r.warnings[i]));
  card.append(el('p', { class: 'caution' }, ca.caution));
  // The figure beside its card, at the size of the other figures of "Across the frame".
  const grid = el('div', { class: 'frame-grid' });
  if (ca.curves.length || ca.points.length) {
    const data = JSON.stringify({ lateral_ca: ca, corner_mm: r.corner_mm });
    grid.append(coreFigure(pool, 'ca', data, { label, band: true }, `${base}-colour-fringes`));
  }
  const cards = el('div', { class: 'cards' });
  cards.append(card);
  grid.append(cards);
  sec.append(grid);
  sec.append(el('p', { class: 'hint' }, ca.selection));
  sec.append(howComputed([
    'Each edge is located in red, green and blue from the one fit of its position and angle: the area under each colour\'s edge profile gives where that colour\'s edge lies along the edge\'s normal. Only edges whose normal lies close to the radius from the optical centre are used, since colour fringes move edges along the radius.',
    `A smooth curve per pair (red − green, blue − green) through the origin: a low-order odd polynomial in the distance from the optical centre, with a band of two standard errors. Thresholds: ${ca.thresholds_px[0]} and ${ca.thresholds_px[1]} px of displacement.`,
  ]));
  return sec;
}

/** compareFringes returns the colour fringes of the ticked photos overlaid (one colour per photo), or null when none has them. */
export function compareFringes(pool, photos) {
  if (!photos.some((p) => p.result.lateral_ca)) return null;
  const sec = el('section', { class: 'fringes' });
  sec.append(el('h3', {}, 'Colour fringes'));
  const data = JSON.stringify(photos.map((p) => ({ label: p.label, lateral_ca: p.result.lateral_ca || null, corner_mm: p.result.corner_mm })));
  sec.append(coreFigure(pool, 'ca-compare', data, { band: true }, 'colour-fringes-compared'));
  const rows = photos.filter((p) => p.result.lateral_ca).map((p) => `${p.label}: ${p.result.lateral_ca.text}`);
  for (const t of rows) sec.append(el('p', {}, t));
  return sec;
}
