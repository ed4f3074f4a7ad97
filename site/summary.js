// "Across the frame" from the core's summary of a photo (the "summary"
// object of the image JSON, core/field): the core's figures (core/plot:
// field curves, astigmatism, the MTF50 map), MTF50 across the frame in the
// units shown, and the verdict cards (balance, astigmatism) with their
// cautions. Words first, numbers second.

import { plot, KIND_MARKER } from './plot.js';
import { coreFigure } from './corefig.js';
import { renderFringes } from './fringes.js';
import { renderGeometry } from './geometry.js';
import { explainBox, howComputed } from './explain.js';
import { ORIENTATION } from './colour.js';
import { fromCyPx, UNITS, NYQUIST_CY_PX } from './units.js';
import { el } from './dom.js';

const ORIENTS = ['sagittal', 'tangential'];

const lpmmTo = (v, units, r) => fromCyPx(v * (r.pitch_um / 1000), units, r);

/** renderSummary fills box from r.summary; units are those shown; pool draws the core's figures. */
export function renderSummary(box, r, units, pool, label) {
  const s = r.summary;
  const grid = el('div', { class: 'frame-grid' });
  box.append(grid);
  const ms = r.measurements;
  const xmax = Math.max(s.corner_mm, 1);
  const data = JSON.stringify(s);
  const base = (label || r.file).replace(/\.[^.]*$/, '').replace(/[^A-Za-z0-9.-]+/g, '-');

  // The core's figures: field curves, astigmatism, the MTF50 map.
  grid.append(coreFigure(pool, 'field', data, { label, band: true }, `${base}-field-curves`));
  if (s.astigmatism.length) grid.append(coreFigure(pool, 'astigmatism', data, { label, band: true }, `${base}-astigmatism`));
  if (s.map) grid.append(coreFigure(pool, 'map', data, { label }, `${base}-mtf50-map`));

  // MTF50 across the frame.
  const s50 = [];
  const rows50 = [];
  for (const o of ORIENTS) {
    const colour = ORIENTATION[o];
    for (const kind of ['edge', 'star', 'grating']) {
      const pts = ms.filter((m) => m.orientation === o && m.kind === kind).map((m) => [m.height_mm, fromCyPx(m.mtf50_cy_px, units, r)]);
      if (pts.length) s50.push({ name: `${o} ${kind}s`, points: pts, colour, line: false, marker: KIND_MARKER[kind], markerSize: kind === 'edge' ? 2.2 : 3.4, legend: false });
    }
    const c = s.mtf50_curves.find((c) => c.orientation === o);
    if (!c) continue;
    s50.push({ band: c.height_mm.map((h, i) => [h, lpmmTo(c.band_lo[i], units, r), lpmmTo(c.band_hi[i], units, r)]), colour });
    s50.push({ name: o, points: c.height_mm.map((h, i) => [h, lpmmTo(c.value[i], units, r)]), colour, width: 2.2 });
    c.height_mm.forEach((h, i) => rows50.push([o, h, lpmmTo(c.value[i], units, r)]));
  }
  grid.append(plot({
    title: 'MTF50 across the frame', xLabel: 'distance from the optical centre (mm)', yLabel: `MTF50 (${UNITS[units].label})`,
    xDomain: [0, xmax], yDomain: [0, fromCyPx(NYQUIST_CY_PX, units, r)], series: s50, width: 560, height: 340, fileName: 'field-mtf50',
    table: { columns: ['orientation', 'distance from the optical centre (mm)', `MTF50 (${UNITS[units].label})`], rows: rows50 },
  }));

  // Verdict cards.
  const cards = el('div', { class: 'cards' });
  box.append(cards);
  const b = s.balance;
  if (b && b.verdict) cards.append(card(`Balance: ${b.verdict}`, b.text, b.caution));
  for (const a of s.astigmatism) cards.append(card(`Astigmatism at ${a.freq_lp_mm} lp/mm${a.notable ? '' : ': slight or none'}`, a.text, ''));
  if (s.warnings && s.warnings.length) {
    const w = el('div', { class: 'notes' });
    for (const t of s.warnings) w.append(el('p', {}, t));
    box.append(w);
  }
  const fringes = renderFringes(r, pool, label, base); // colour fringes (fringes.js)
  if (fringes) box.append(fringes);
  renderGeometry(box, r, pool, label); // distortion and light fall-off (geometry.js)
  box.append(explainBox(['sagittal', 'tangential', 'MTF50', '± 2 standard errors', 'smoothing']));
  box.append(howComputed([`Field curves: ${s.smoother}.`, s.map ? `MTF50 map: ${s.map.method}; the mean of sagittal and tangential.` : '']));
}

function card(title, text, caution) {
  const c = el('article', { class: 'card' });
  c.append(el('h4', {}, title));
  if (text) c.append(el('p', {}, text));
  if (caution) c.append(el('p', { class: 'caution' }, caution));
  return c;
}
