// "Across the frame" from the core's summary of a photo (the "summary"
// object of the image JSON, core/field): smooth field curves with their
// bands over the measured points, MTF50 across the frame, astigmatism
// against image height, the MTF50 map, and the verdict cards (balance,
// astigmatism) with their cautions. Words first, numbers second.

import { plot, svgEl, saveBlob, svgBlob } from './plot.js';
import { ORIENTATION, mtf50Colour } from './colour.js';
import { fromCyPx, UNITS, NYQUIST_CY_PX } from './units.js';

const el = (tag, attrs = {}, text) => {
  const e = document.createElement(tag);
  for (const [k, v] of Object.entries(attrs)) e.setAttribute(k, v);
  if (text != null) e.textContent = text;
  return e;
};

// Frequency by line weight: the coarser frequency thick, the finer thin.
const WIDTHS = [2.8, 1.5, 1.1];
const ORIENTS = ['sagittal', 'tangential'];

const lpmmTo = (v, units, r) => fromCyPx(v * (r.pitch_um / 1000), units, r);

/** renderSummary fills box from r.summary; units are those shown. */
export function renderSummary(box, r, units) {
  const s = r.summary;
  const freqs = s.freqs_lp_mm;
  const grid = el('div', { class: 'frame-grid' });
  box.append(grid);
  const ms = r.measurements;
  const xmax = Math.max(s.corner_mm, 1);

  // Field curves.
  const series = [];
  const rows = [];
  freqs.forEach((f, fi) => {
    for (const o of ORIENTS) {
      const c = s.curves.find((c) => c.quantity === 'mtf' && c.orientation === o && c.freq_lp_mm === f);
      const colour = ORIENTATION[o];
      const sel = ms.filter((m) => m.orientation === o);
      for (const kind of ['edge', 'star', 'grating']) {
        const pts = sel.filter((m) => m.kind === kind).map((m) => [m.height_mm, m.mtf_at_freqs[fi]]);
        if (pts.length) series.push({ name: `${o} ${kind}s, ${f} lp/mm`, points: pts, colour, line: false, marker: kind === 'edge' ? 'circle' : 'diamond', markerSize: kind === 'edge' ? (fi === 0 ? 2.6 : 2) : 4, legend: false });
      }
      if (!c) continue;
      series.push({ band: c.height_mm.map((h, i) => [h, c.band_lo[i], c.band_hi[i]]), colour });
      series.push({ name: `${o}, ${f} lp/mm`, points: c.height_mm.map((h, i) => [h, c.value[i]]), colour, width: WIDTHS[fi] || 1 });
      c.height_mm.forEach((h, i) => rows.push([`${o}, ${f} lp/mm`, h, c.value[i], c.band_lo[i], c.band_hi[i]]));
    }
  });
  grid.append(plot({
    title: 'Field curves: MTF across the frame', xLabel: 'distance from the optical centre (mm)', yLabel: 'MTF',
    xDomain: [0, xmax], yDomain: [0, 1], series, width: 560, height: 340, fileName: 'field-curves',
    table: { columns: ['curve', 'height (mm)', 'MTF', 'band low', 'band high'], rows },
  }));

  // MTF50 across the frame.
  const s50 = [];
  const rows50 = [];
  for (const o of ORIENTS) {
    const colour = ORIENTATION[o];
    const pts = ms.filter((m) => m.orientation === o).map((m) => [m.height_mm, fromCyPx(m.mtf50_cy_px, units, r)]);
    if (pts.length) s50.push({ name: `${o} targets`, points: pts, colour, line: false, marker: 'circle', markerSize: 2.2, legend: false });
    const c = s.mtf50_curves.find((c) => c.orientation === o);
    if (!c) continue;
    s50.push({ band: c.height_mm.map((h, i) => [h, lpmmTo(c.band_lo[i], units, r), lpmmTo(c.band_hi[i], units, r)]), colour });
    s50.push({ name: o, points: c.height_mm.map((h, i) => [h, lpmmTo(c.value[i], units, r)]), colour, width: 2.2 });
    c.height_mm.forEach((h, i) => rows50.push([o, h, lpmmTo(c.value[i], units, r)]));
  }
  grid.append(plot({
    title: 'MTF50 across the frame', xLabel: 'distance from the optical centre (mm)', yLabel: `MTF50 (${UNITS[units].label})`,
    xDomain: [0, xmax], yDomain: [0, fromCyPx(NYQUIST_CY_PX, units, r)], series: s50, width: 560, height: 340, fileName: 'field-mtf50',
    table: { columns: ['orientation', 'height (mm)', `MTF50 (${UNITS[units].label})`], rows: rows50 },
  }));

  // Astigmatism: sagittal minus tangential.
  if (s.astigmatism.length) {
    const sa = [];
    const rowsA = [];
    let lo = -0.1;
    let hi = 0.1;
    s.astigmatism.forEach((a) => {
      const fi = freqs.indexOf(a.freq_lp_mm);
      sa.push({ band: a.height_mm.map((h, i) => [h, a.band_lo[i], a.band_hi[i]]), colour: '#444b53', opacity: 0.12 });
      sa.push({ name: `${a.freq_lp_mm} lp/mm`, points: a.height_mm.map((h, i) => [h, a.gap[i]]), colour: '#2b3138', width: WIDTHS[fi] || 1 });
      for (const v of [...a.band_lo, ...a.band_hi]) if (Number.isFinite(v)) (lo = Math.min(lo, v)), (hi = Math.max(hi, v));
      a.height_mm.forEach((h, i) => rowsA.push([`${a.freq_lp_mm} lp/mm`, h, a.gap[i], a.band_lo[i], a.band_hi[i]]));
    });
    sa.push({ name: 'no difference', points: [[0, 0], [xmax, 0]], colour: '#8a939d', width: 1, dash: '2 3' });
    grid.append(plot({
      title: 'Astigmatism: sagittal minus tangential MTF', xLabel: 'distance from the optical centre (mm)', yLabel: 'MTF difference',
      xDomain: [0, xmax], yDomain: [lo * 1.1, hi * 1.1], series: sa, width: 560, height: 300, fileName: 'astigmatism',
      table: { columns: ['frequency', 'height (mm)', 'sagittal − tangential', 'band low', 'band high'], rows: rowsA },
    }));
  }

  if (s.map) grid.append(mapPlot(s.map, r, units));

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
  box.append(el('p', { class: 'hint' }, `Curves: ${s.smoother}.`));
}

function card(title, text, caution) {
  const c = el('article', { class: 'card' });
  c.append(el('h4', {}, title));
  if (text) c.append(el('p', {}, text));
  if (caution) c.append(el('p', { class: 'caution' }, caution));
  return c;
}

// mapPlot draws the MTF50 map as cells over the frame, on the same colour
// scale as the targets, with the optical centre marked.
function mapPlot(m, r, units) {
  const fig = el('figure', { class: 'plot-figure' });
  const W = 560;
  const H = Math.round((W * r.height) / r.width);
  const svg = svgEl('svg', {
    xmlns: 'http://www.w3.org/2000/svg', viewBox: `0 0 ${r.width} ${r.height}`, width: W, height: H, class: 'plot',
    role: 'img', 'aria-label': 'MTF50 map of the frame; the data table follows.',
  });
  svgEl('rect', { width: r.width, height: r.height, fill: '#e9ebee' }, svg);
  const rows = [];
  for (let j = 0; j < m.rows; j++) {
    for (let i = 0; i < m.cols; i++) {
      const v = m.mtf50_lp_mm[j * m.cols + i];
      const x = i * m.cell_w_px;
      const y = j * m.cell_h_px;
      if (Number.isFinite(v)) svgEl('rect', { x, y, width: m.cell_w_px + 0.5, height: m.cell_h_px + 0.5, fill: mtf50Colour(v * (r.pitch_um / 1000)) }, svg);
      rows.push([i, j, Math.round(x + m.cell_w_px / 2), Math.round(y + m.cell_h_px / 2), Number.isFinite(v) ? lpmmTo(v, units, r) : NaN]);
    }
  }
  const [cx, cy] = r.center_px;
  const k = r.width / W;
  svgEl('path', { d: `M${cx - 12 * k},${cy}H${cx + 12 * k}M${cx},${cy - 12 * k}V${cy + 12 * k}`, stroke: '#1b1f24', 'stroke-width': 2 * k }, svg);
  svgEl('rect', { width: r.width, height: r.height, fill: 'none', stroke: '#8a939d', 'stroke-width': 2 * k }, svg);
  const title = el('p', { class: 'plot-title' }, 'MTF50 map (both orientations averaged); grey where nothing was measured; + marks the optical centre');
  fig.append(title, svg);
  const det = el('details', { class: 'data-table' });
  det.append(el('summary', {}, 'Data table'));
  const t = el('table');
  t.append(el('caption', {}, 'MTF50 map cells'));
  const hr = t.createTHead().insertRow();
  for (const c of ['column', 'row', 'x (px)', 'y (px)', `MTF50 (${UNITS[units].label})`]) hr.append(el('th', { scope: 'col' }, c));
  const tb = t.createTBody();
  for (const row of rows) {
    const tr = tb.insertRow();
    for (const v of row) tr.insertCell().textContent = Number.isFinite(v) ? String(+v.toPrecision(4)) : '—';
  }
  det.append(t);
  fig.append(det);
  const save = el('div', { class: 'plot-export' });
  const b = el('button', { type: 'button', class: 'link' }, 'Save SVG');
  b.onclick = () => saveBlob(svgBlob(svg), 'mtf50-map.svg');
  save.append(b);
  fig.append(save);
  return fig;
}
