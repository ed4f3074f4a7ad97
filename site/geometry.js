// Distortion and light fall-off, from the core (the "distortion" and
// "falloff" objects of the image JSON, core/distortion and core/falloff):
// one photo's figures, numbers, verdict and cautions in "Across the frame"
// (and so in the printable report), and the curves of several photos in
// Compare. The page computes nothing here: it lays out the core's numbers
// and sentences, and branches on codes only.

import { coreFigure } from './corefig.js';
import { el } from './dom.js';

const fix = (v, d) => (Number.isFinite(v) ? v.toFixed(d) : '–');
const signed = (v, d) => (Number.isFinite(v) && v > 0 ? '+' : '') + fix(v, d);

// What the core needs to draw one photo's figures.
const slim = (r) => JSON.stringify({ image: {
  width: r.width, height: r.height, pitch_um: r.pitch_um, center_px: r.center_px, corner_mm: r.corner_mm,
  distortion: r.distortion, falloff: r.falloff,
} });

/** renderGeometry appends one photo's distortion and light fall-off to box; pool draws the core's figures. */
export function renderGeometry(box, r, pool, label) {
  const d = r.distortion;
  const f = r.falloff;
  if (!d && !f) return;
  const sec = el('section', { class: 'geometry', 'aria-labelledby': 'geometry-title' });
  sec.append(el('h4', { id: 'geometry-title' }, 'Distortion and light fall-off'));
  const base = (label || r.file).replace(/\.[^.]*$/, '').replace(/[^A-Za-z0-9.-]+/g, '-');
  const data = slim(r);
  const grid = el('div', { class: 'frame-grid' });
  const cards = el('div', { class: 'cards' });
  sec.append(grid, cards);

  if (d && d.measured) {
    grid.append(coreFigure(pool, 'distortion', data, { label }, `${base}-distortion`));
    const c = card(`Distortion: ${d.kind}`, d.text);
    c.append(numbers([
      ['At the corner', `${signed(d.corner_pct, 2)} %`],
      ['At the end of the long side', `${signed(d.long_edge_pct, 2)} %`],
      ['Chart targets used', `${d.points}, ${fix(d.residual_px, 2)} px rms about the curve`],
    ]));
    for (const t of d.cautions || []) c.append(el('p', { class: 'caution' }, t));
    c.append(el('p', { class: 'hint' }, 'Measured on the chart: it must be flat and square to the camera (see the set-up checks). Negative values bend straight lines outwards (barrel), positive inwards (pincushion).'));
    cards.append(c);
  } else if (d) {
    cards.append(card('Distortion', d.reason));
  }

  if (f && f.measured) {
    grid.append(coreFigure(pool, 'falloff', data, { label }, `${base}-light-fall-off`));
    const c = card(`Light fall-off: ${signed(f.corner_ev, 2)} EV at the corner`, '');
    c.append(numbers([
      ['At the corner', `${signed(f.corner_ev, 2)} EV (${fix(100 * 2 ** f.corner_ev, 0)} % of the centre's light)`],
      ['At the end of the long side', `${signed(f.long_edge_ev, 2)} EV`],
      ['Patches of paper', `${f.points}, ${fix(f.residual_ev, 3)} EV rms about the curve`],
    ]));
    for (let i = 0; i < (f.cautions || []).length; i++) {
      // The lighting caution always applies; the others flag this photo.
      const strong = f.caution_codes[i] !== 'falloff-lighting';
      c.append(el('p', { class: strong ? 'caution' : 'hint' }, f.cautions[i]));
    }
    cards.append(c);
  } else if (f) {
    cards.append(card('Light fall-off', f.reason));
  }
  box.append(sec);
}

/** compareGeometry appends the distortion and light fall-off curves of the ticked photos to main. */
export function compareGeometry(main, photos, pool, labelOf) {
  const has = (p, k) => p.result[k] && p.result[k].measured;
  const data = JSON.stringify({ photos: photos.map((p) => ({ label: labelOf(p), distortion: p.result.distortion || null, falloff: p.result.falloff || null })) });
  for (const [k, name, file] of [['distortion', 'distortion', 'distortion-compared'], ['falloff', 'light fall-off', 'light-fall-off-compared']]) {
    const got = photos.filter((p) => has(p, k));
    if (!got.length) continue;
    main.append(coreFigure(pool, k, data, {}, file));
    const missing = photos.filter((p) => !has(p, k)).map(labelOf);
    if (missing.length) main.append(el('p', { class: 'notes' }, `No ${name} for ${missing.join(', ')}: it is measured only on Sagitta's chart.`));
  }
}

function card(title, text) {
  const c = el('article', { class: 'card' });
  c.append(el('h4', {}, title));
  if (text) c.append(el('p', {}, text));
  return c;
}

function numbers(rows) {
  const dl = el('dl', { class: 'geometry-numbers' });
  for (const [k, v] of rows) dl.append(el('dt', {}, k), el('dd', {}, v));
  return dl;
}
