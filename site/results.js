// The result of one photo in the Measure place: the photo with its targets,
// a selected target's edge profile and response, the field across the
// frame, the photo's Exif, the settings used and the cautions.

import { PhotoViewer, drawStored } from './viewer.js';
import { plot, saveBlob, svgBlob, KIND_MARKER } from './plot.js';
import { mtf50Colour, scaleGradient, SCALE_MAX_CY_PX, ORIENTATION } from './colour.js';
import { fromCyPx, fmtFreq, fmt, fmtFNumber, fmtExposure, UNITS, NYQUIST_CY_PX, digits } from './units.js';
import { settingsSummary } from './settings.js';
import { labelOf } from './compare.js';
import { renderSummary } from './summary.js';
import { el } from './dom.js';
import { explainBox, titled } from './explain.js';

/** outcome says in one line what came of a photo. */
export function outcome(r) {
  const edges = r.measurements.filter((m) => m.kind === 'edge').length;
  const stars = new Set(r.measurements.filter((m) => m.kind === 'star').map((m) => `${m.x_px},${m.y_px}`)).size;
  const gratings = (r.gratings || []).length;
  let s = `${edges} edge${edges === 1 ? '' : 's'}` + (stars ? `, ${stars} star${stars === 1 ? '' : 's'}` : '') +
    (gratings ? `, ${gratings} grating${gratings === 1 ? '' : 's'}` : '') + ' measured';
  if (r.rejected.length) s += `; ${r.rejected.length} set aside`;
  return s;
}

// The photo on show, kept between renders so that zoom survives a change of units.
let current = null;

/**
 * renderResult fills sec with the result of photo p.
 * display: {source (ImageBitmap or canvas, or null), factor (photo px per source px),
 * orientation (the Exif orientation the browser applied to source, 1 if none)}.
 */
export function renderResult(sec, p, state, display) {
  const r = p.result;
  if (current && current.key === p.key && current.result === r && current.sec === sec) {
    refreshUnits(state);
    return;
  }
  sec.replaceChildren();
  const rep = el('p', { class: 'report-only report-head' }, `Lens sharpness report, measured with Sagitta on this device, ${new Date().toLocaleString()}.`);
  sec.append(rep);
  const head = el('div', { class: 'result-head' });
  const h = el('h2', { id: 'result-title' }, labelOf(p));
  const facts = el('p', { class: 'facts' }, `${p.name} · ${r.width} × ${r.height} px · ${r.format.toUpperCase()}${r.raw ? ` (${r.raw.text})` : ''} · ${outcome(r)}`);
  head.append(h, facts);
  sec.append(head);
  if (r.warnings.length) {
    const notes = el('div', { class: 'notes', role: 'note' });
    notes.append(el('strong', {}, 'Notes on this photo'));
    const ul = el('ul');
    for (const w of r.warnings) ul.append(el('li', {}, w));
    notes.append(ul);
    sec.append(notes);
  }

  if (r.agreement && r.agreement.records > 0) {
    const a = r.agreement;
    // The core words a disagreement among the photo's warnings.
    const words = r.warning_codes.includes('stars-edges-disagree') ? 'disagree' : 'agree';
    sec.append(el('p', { class: 'facts agreement' }, `Sine stars and edges ${words}: they differ by ${fmt(a.rms_diff, 3)} rms between ${fmtFreq(a.lo_cy_px, state.units, r)} and ${fmtFreq(a.hi_cy_px, state.units, r)} ` +
      `(${a.records} star record${a.records === 1 ? '' : 's'}; edges read ${a.mean_diff >= 0 ? 'higher' : 'lower'} by ${fmt(Math.abs(a.mean_diff), 3)} on average).`));
  }
  const grid = el('div', { class: 'result-grid' });
  const left = el('div');
  const viewerRoot = el('div');
  left.append(viewerRoot);
  const key = el('div', { class: 'key', 'aria-label': 'Colour key' });
  left.append(key);
  const detail = el('aside', { class: 'detail', id: 'target-detail', 'aria-live': 'polite' });
  grid.append(left, detail);
  sec.append(grid);

  const frame = el('section', { class: 'frame', 'aria-labelledby': 'frame-title' });
  sec.append(frame);
  const about = el('div', { class: 'about' });
  sec.append(about);
  sec.append(cautions(r));

  const viewer = new PhotoViewer(viewerRoot, { onSelect: (id) => selectTarget(id) });
  current = { key: p.key, result: r, sec, p, state, viewer, detail, frame, keyEl: key, about, selected: null, refF: null };
  if (display.source) viewer.setPhoto(display.source, r.width, r.height, display.factor, display.orientation || 1);
  else {
    viewer.setPhoto(blankCanvas(r.width, r.height), r.width, r.height, Math.max(1, r.width / 64));
  }
  viewer.setTargets(r.measurements, r.rejected, colourOf, (m) => targetLabel(m, r, state.units));
  if (r.chart) viewer.setMarks(r.chart.marks);
  left.append(targetTable(r, state.units));
  if (r.rejected.length) left.append(setAsideList(r, viewer));
  const map = mapFigure(r, display);
  const saveMap = el('button', { type: 'button', class: 'link' }, 'Save the targets on the photo (SVG)');
  saveMap.onclick = () => saveBlob(svgBlob(map.querySelector('svg')), 'targets-on-the-photo.svg');
  left.append(saveMap, map);
  renderKey(key, r, state.units);
  renderDetail();
  renderFrame();
  renderAbout(about, r);
}

let partial = null; // the photo being measured, as renderPartial last drew it

/**
 * renderPartial fills sec with a photo being measured: the photo, the
 * targets measured so far outlined on it (their figures come with the
 * result, once the core has placed and summarised them all) and how many
 * of how many are measured. display: {source (ImageBitmap or null),
 * orientation (the Exif orientation the browser applied to source)}.
 */
export function renderPartial(sec, p, display) {
  const { records, measured, targets } = p.partial;
  if (!partial || partial.key !== p.key || partial.sec !== sec || !sec.contains(partial.count)) {
    current = null; // the result, when it comes, draws the section afresh
    sec.replaceChildren();
    const head = el('div', { class: 'result-head' });
    head.append(el('h2', { id: 'result-title' }, labelOf(p)));
    const count = el('p', { class: 'facts', 'aria-live': 'polite' });
    head.append(count);
    const root = el('div');
    sec.append(head, root);
    const viewer = new PhotoViewer(root, { onSelect: () => {} });
    const { width, height } = p.partial.frame;
    if (display.source) viewer.setPhoto(display.source, width, height, 1, display.orientation || 1);
    else viewer.setPhoto(blankCanvas(width, height), width, height, Math.max(1, width / 64));
    partial = { key: p.key, sec, viewer, count };
  }
  setTextOf(partial.count, `${p.name} · measuring: ${measured} of ${targets} targets, ${records.length} usable so far; the figures come when all are measured`);
  const { found = [], done } = p.partial;
  partial.viewer.setFound(found.filter((f) => !done || !done.has(f.index)).map((f) => f.pts));
  partial.viewer.setTargets(records, [], () => '#ffffff', () => 'Measured; its figures come with the result');
}

function setTextOf(node, text) {
  if (node.textContent !== text) node.textContent = text;
}

/** refreshUnits redraws what depends on the units shown. */
export function refreshUnits(state) {
  if (!current) return;
  const r = current.result;
  current.viewer.recolour(colourOf, (m) => targetLabel(m, r, state.units));
  renderKey(current.keyEl, r, state.units);
  const old = current.sec.querySelector('.targets-table');
  if (old) old.replaceWith(targetTable(r, state.units));
  renderDetail();
  renderFrame();
}

function selectTarget(id) {
  current.selected = id;
  current.viewer.select(id);
  renderDetail();
}

function colourOf(m) {
  return mtf50Colour(m.mtf50_cy_px);
}

function kindWord(m) {
  return { star: 'Star', grating: 'Gratings' }[m.kind] || 'Edge';
}

function targetLabel(m, r, units) {
  let s = `${kindWord(m)} ${m.id}: ${m.orientation}, ${fmt(m.height_mm, 1)} mm from the optical centre, MTF50 ${fmtFreq(m.mtf50_cy_px, units, r)}`;
  if (m.warnings.length) s += ` (${m.warnings.join('; ')})`;
  return s;
}

let mapURL = null;

/**
 * mapFigure is a still picture of the photo with its targets filled by
 * MTF50 ("targets on the photo"; the interpolated MTF50 map is the core's), in the photo's own coordinates: shown in the
 * printed report, and offered as an SVG file.
 */
function mapFigure(r, display) {
  const fig = el('figure', { class: 'map-figure' });
  const NS = 'http://www.w3.org/2000/svg';
  const svg = document.createElementNS(NS, 'svg');
  svg.setAttribute('xmlns', NS);
  svg.setAttribute('viewBox', `0 0 ${r.width} ${r.height}`);
  svg.setAttribute('width', 720);
  svg.setAttribute('height', Math.round((720 * r.height) / r.width));
  svg.setAttribute('role', 'img');
  svg.setAttribute('aria-label', 'Targets on the photo: each measured target filled by its MTF50');
  if (mapURL) URL.revokeObjectURL(mapURL);
  mapURL = null;
  const bg = document.createElementNS(NS, 'rect');
  bg.setAttribute('width', r.width);
  bg.setAttribute('height', r.height);
  bg.setAttribute('fill', '#5a6068');
  svg.append(bg);
  if (display.source) {
    // A reduced copy of the photo (at most 1600 px wide) as a data URL, so
    // that a saved SVG carries its picture.
    const k = Math.min(1, 1600 / r.width);
    const c = document.createElement('canvas');
    c.width = Math.round(r.width * k);
    c.height = Math.round(r.height * k);
    const ctx = c.getContext('2d');
    ctx.scale(k, k);
    drawStored(ctx, display.source, r.width, r.height, display.orientation || 1, display.factor || 1);
    const img = document.createElementNS(NS, 'image');
    img.setAttribute('href', c.toDataURL('image/jpeg', 0.85));
    img.setAttribute('width', r.width);
    img.setAttribute('height', r.height);
    svg.append(img);
  }
  const sw = Math.max(1, r.width / 800);
  for (const m of r.measurements) {
    const poly = document.createElementNS(NS, 'polygon');
    poly.setAttribute('points', m.region_px.map((q) => q.join(',')).join(' '));
    poly.setAttribute('fill', colourOf(m));
    poly.setAttribute('fill-opacity', '0.75');
    poly.setAttribute('stroke', '#0d1117');
    poly.setAttribute('stroke-width', sw);
    svg.append(poly);
  }
  fig.append(svg);
  fig.append(el('figcaption', { class: 'hint' }, 'Targets on the photo: each measured target filled by its MTF50 on the scale above.'));
  return fig;
}

function blankCanvas(w, h) {
  const c = document.createElement('canvas');
  c.width = 64;
  c.height = Math.max(1, Math.round((64 * h) / w));
  const ctx = c.getContext('2d');
  ctx.fillStyle = '#5a6068';
  ctx.fillRect(0, 0, c.width, c.height);
  return c;
}

function renderKey(key, r, units) {
  key.replaceChildren();
  key.append(titled(el('span', {}, `MTF50 (${UNITS[units].label})`), 'MTF50'));
  const bar = el('div', { class: 'key-bar' });
  bar.style.background = scaleGradient();
  key.append(bar);
  const ticks = el('div', { class: 'key-ticks', 'aria-hidden': 'true' });
  for (let i = 0; i <= 5; i++) {
    const v = (SCALE_MAX_CY_PX * i) / 5;
    const s = el('span', {}, fromCyPx(v, units, r).toFixed(Math.max(0, digits(units) - (units === 'lpmm' ? 1 : 0))));
    s.style.left = `${(i / 5) * 100}%`;
    ticks.append(s);
  }
  key.append(el('span', { class: 'hint' }, 'soft → sharp'), ticks);
  key.setAttribute('aria-label', `Colour key: MTF50 from 0 (dark blue, soft) to ${fmtFreq(SCALE_MAX_CY_PX, units, r)}, the Nyquist frequency (pale yellow, sharp).`);
}

// targetTable lists every measured target: the text behind the photo.
function targetTable(r, units) {
  const det = el('details', { class: 'data-table targets-table' });
  det.append(el('summary', {}, `All ${r.measurements.length} targets as a table`));
  const t = el('table');
  t.append(el('caption', {}, 'Measured targets, nearest the optical centre first'));
  const hr = t.createTHead().insertRow();
  const cols = ['target', 'x, y (px)', 'distance from the optical centre (mm)', 'orientation', `MTF50 (${UNITS[units].label})`, ...r.freqs_lp_mm.map((f) => `MTF at ${f} lp/mm`), 'notes'];
  for (const c of cols) hr.append(el('th', { scope: 'col' }, c));
  const tb = t.createTBody();
  for (const m of r.measurements) {
    const tr = tb.insertRow();
    const cell = tr.insertCell();
    const b = el('button', { type: 'button', class: 'link' }, `${kindWord(m)} ${m.id}`);
    b.addEventListener('click', () => selectTarget(m.id));
    cell.append(b);
    tr.insertCell().textContent = `${fmt(m.x_px, 0)}, ${fmt(m.y_px, 0)}`;
    tr.insertCell().textContent = fmt(m.height_mm, 2);
    tr.insertCell().textContent = m.orientation;
    tr.insertCell().textContent = fmtFreq(m.mtf50_cy_px, units, r, false);
    for (const v of m.mtf_at_freqs) tr.insertCell().textContent = fmt(v, 3);
    tr.insertCell().textContent = m.warnings.join('; ');
  }
  det.append(t);
  return det;
}

function setAsideList(r, viewer) {
  const det = el('details', { class: 'setaside' });
  det.append(el('summary', {}, `${r.rejected.length} candidate${r.rejected.length === 1 ? '' : 's'} set aside, and why`));
  det.append(el('p', { class: 'hint' }, 'Edges found in the photo but not measured are set aside (the JSON calls them "rejected"), each with its reason.'));
  const ul = el('ul');
  r.rejected.forEach((c, i) => {
    const li = el('li');
    const b = el('button', { type: 'button' }, `near (${Math.round((c.x0_px + c.x1_px) / 2)}, ${Math.round((c.y0_px + c.y1_px) / 2)}) px: ${c.reason}`);
    b.addEventListener('focus', () => viewer.highlightRejected(i, true));
    b.addEventListener('blur', () => viewer.highlightRejected(i, false));
    b.addEventListener('mouseenter', () => viewer.highlightRejected(i, true));
    b.addEventListener('mouseleave', () => viewer.highlightRejected(i, false));
    b.addEventListener('click', () => viewer.centreOn((c.x0_px + c.x1_px) / 2, (c.y0_px + c.y1_px) / 2));
    li.append(b);
    ul.append(li);
  });
  det.append(ul);
  return det;
}

// ---------------------------------------------------------------- one target

function renderDetail() {
  const { detail, result: r, state } = current;
  const units = state.units;
  detail.replaceChildren();
  const m = r.measurements.find((x) => x.id === current.selected);
  detail.classList.toggle('nothing-selected', !m);
  if (!m) {
    detail.append(el('h3', {}, 'One target in detail'));
    detail.append(el('p', { class: 'hint' }, r.measurements.length
      ? 'Select a target on the photo (click it, or Tab to it and press Enter) to see its edge profile and its response curve.'
      : 'No target was measured in this photo.'));
    if (r.measurements.length) {
      const best = [...r.measurements].sort((a, b) => a.height_mm - b.height_mm)[0];
      const b = el('button', { type: 'button', class: 'button small' }, `Show the target nearest the optical centre (${kindWord(best).toLowerCase()} ${best.id})`);
      b.onclick = () => selectTarget(best.id);
      detail.append(b);
    }
    return;
  }
  const title = el('h3', {}, `${kindWord(m)} ${m.id}`);
  const chip = el('span', { class: 'hint' }, ` · ${m.orientation}`);
  chip.style.color = ORIENTATION[m.orientation] || 'inherit';
  title.append(chip);
  detail.append(title);
  const dl = el('dl');
  const row = (k, v, term) => dl.append(titled(el('dt', {}, k), term), el('dd', {}, v));
  row('Position', `${fmt(m.x_px, 1)}, ${fmt(m.y_px, 1)} px`);
  row('Distance from the optical centre', `${fmt(m.height_mm, 2)} mm (${Math.round((100 * m.height_mm) / r.corner_mm)} % of the way to a corner)`);
  row('Orientation', `${m.orientation}: measured ${fmt(m.radius_angle_deg, 0)}° from the radius`);
  // Standard errors from the noise, where the core gives them.
  const pm = (se, d) => (Number.isFinite(se) ? ` ± ${se < 0.5 * 10 ** -d ? '<' + 10 ** -d : fmt(se, d)}` : '');
  const se50 = Number.isFinite(m.mtf50_se_cy_px) && Number.isFinite(m.mtf50_cy_px) && m.mtf50_cy_px > 0 ? m.mtf50_se_cy_px / m.mtf50_cy_px : NaN;
  row('MTF50', fmtFreq(m.mtf50_cy_px, units, r) + (Number.isFinite(se50) ? ` ± ${fmt(100 * se50, 1)} %` : ''), 'MTF50');
  row('MTF50P', fmtFreq(m.mtf50p_cy_px, units, r), 'MTF50P');
  r.freqs_lp_mm.forEach((f, i) => row(`MTF at ${f} lp/mm`, Number.isFinite(m.mtf_at_freqs[i]) || !m.measured_cy_px ? fmt(m.mtf_at_freqs[i], 3) + pm((m.mtf_at_freqs_se || [])[i], 3)
    : `n/a: beyond the frequencies this ${m.kind === 'star' ? 'star' : 'set of gratings'} measured (${fmtFreq(m.measured_cy_px[0], 'lpmm', r, false)}–${fmtFreq(m.measured_cy_px[1], 'lpmm', r)})`));
  row('MTF at Nyquist', fmt(m.mtf_nyquist, 3), 'Nyquist');
  // Raw photos: the edge on each colour plane of the mosaic (the curve above is green's).
  if (m.channels && m.channels.length) row('MTF50 by colour', m.channels.map((c) => `${c.channel} ${c.error ? 'not measured' : fmtFreq(c.mtf50_cy_px, units, r)}`).join(' · '));
  if (m.kind === 'edge') {
    row('Edge', `${fmt(m.length_px, 0)} px long, slanted ${fmt(m.slant_deg, 1)}°, contrast ${fmt(m.contrast, 1)}:1` + (Number.isFinite(m.snr) ? `, signal/noise ${fmt(m.snr, 0)}` : ''));
  } else {
    patternRows(m, r, units, row);
  }
  if (m.warnings.length) row('Notes', m.warnings.join('; '));
  detail.append(dl);

  // The reference curve: a perfect lens at the photo's f-number.
  const refRow = el('p', { class: 'ref-row' });
  const fIn = el('input', { type: 'number', min: '0.7', max: '64', step: '0.1', id: 'ref-fnumber', 'aria-label': 'f-number for the reference curve' });
  if (current.refF == null) current.refF = r.exif && r.exif.f_number ? r.exif.f_number : null;
  if (current.refF) fIn.value = current.refF;
  fIn.addEventListener('change', () => {
    const v = parseFloat(fIn.value);
    current.refF = v > 0 ? v : null;
    renderDetail();
  });
  refRow.append('Reference: a perfect lens at f/ ', fIn, r.exif && r.exif.f_number ? ' (from Exif)' : ' (enter the f-number)');
  detail.append(refRow);

  if (m.esf.x_px.length) detail.append(plot({
    title: 'Edge profile (ESF)', xLabel: 'distance across the edge (px)', yLabel: 'level (dark 0, light 1)',
    xDomain: extent(m.esf.x_px), yDomain: padded(m.esf.v),
    series: [{ name: 'edge profile', points: zip(m.esf.x_px, m.esf.v), colour: '#1b1f24', width: 1.6 }],
    width: 460, height: 220, fileName: `edge-${m.id}-profile`,
  }));
  if (m.lsf.x_px.length) detail.append(plot({
    title: 'Line spread (LSF, the derivative)', xLabel: 'distance across the edge (px)', yLabel: 'relative level',
    xDomain: extent(m.lsf.x_px), yDomain: padded(m.lsf.v),
    series: [{ name: 'line spread', points: zip(m.lsf.x_px, m.lsf.v), colour: '#1b1f24', width: 1.6 }],
    width: 460, height: 220, fileName: `edge-${m.id}-line-spread`,
  }));
  const fmax = Math.max(NYQUIST_CY_PX, Math.min(1, m.freq_cy_px[m.freq_cy_px.length - 1]));
  const conv = (f) => fromCyPx(f, units, r);
  const pts = [];
  for (let i = 0; i < m.freq_cy_px.length && m.freq_cy_px[i] <= fmax + 1e-9; i++) pts.push([conv(m.freq_cy_px[i]), m.mtf[i]]);
  const series = [];
  // A sine pattern measures some frequencies only: its standard errors as a
  // band, the other records of the same star beside it.
  if (m.mtf_std_err && m.mtf_std_err.length === m.mtf.length) {
    series.push({ band: m.freq_cy_px.map((f, i) => [conv(f), m.mtf[i] - 2 * m.mtf_std_err[i], m.mtf[i] + 2 * m.mtf_std_err[i]]), colour: ORIENTATION[m.orientation] || '#1b1f24' });
  }
  const grating = m.kind === 'grating';
  series.push({ name: `measured (${m.orientation})`, points: pts, colour: ORIENTATION[m.orientation] || '#1b1f24', width: 2, line: !grating, marker: grating ? KIND_MARKER.grating : null, markerSize: 4 });
  if (m.kind === 'star') {
    for (const o of r.measurements.filter((x) => x.kind === 'star' && x.pattern_id === m.pattern_id && x.id !== m.id)) {
      series.push({ name: `same star, ${o.orientation}`, points: o.freq_cy_px.map((f, i) => [conv(f), o.mtf[i]]), colour: ORIENTATION[o.orientation] || '#6f767e', width: 1.4 });
    }
  }
  // The reference, a perfect lens, comes from the core (optics.PerfectLens).
  const ref = current.refF ? reference(m, r, fmax) : null;
  if (ref) {
    series.push({ name: `a perfect lens at ${fmtFNumber(current.refF)}: diffraction (${ref.wavelength_um * 1000} nm) × pixel area`, points: zip(ref.curve_cy_px.map(conv), ref.curve), colour: '#555555', width: 1.4, dash: '6 4' });
  }
  const ymax = Math.max(1.05, ...m.mtf.filter(Number.isFinite));
  const table = { columns: [`frequency (${UNITS[units].label})`, 'MTF measured'].concat(ref ? ['perfect lens'] : []), rows: [] };
  for (let i = 0; i < pts.length; i++) {
    const rowv = [pts[i][0], pts[i][1]];
    if (ref) rowv.push(ref.at_freqs[i]);
    table.rows.push(rowv);
  }
  const measured = m.measured_cy_px ? [{ x: conv(m.measured_cy_px[0]), label: '', colour: '#8a939d', dash: '1 3', legend: 'measured range of the pattern' }, { x: conv(m.measured_cy_px[1]), label: '', colour: '#8a939d', dash: '1 3' }] : [];
  detail.append(plot({
    title: 'Response (MTF)', xLabel: `spatial frequency (${UNITS[units].label})`, yLabel: 'MTF',
    xDomain: [0, conv(fmax)], yDomain: [0, ymax],
    series, vlines: [{ x: conv(NYQUIST_CY_PX), label: 'Nyquist', colour: '#1f6f8b', legend: 'Nyquist frequency (half the sampling rate)' }, ...measured],
    table, width: 460, height: 260, fileName: `edge-${m.id}-mtf`,
  }));
  detail.append(explainBox(['MTF', 'MTF50', 'MTF50P', 'Nyquist', units === 'cypx' ? 'cy/px' : 'lp/mm', 'perfect lens']));
  if (ref && ref.exceeds) {
    detail.append(el('p', { class: 'notes' }, 'This edge responds above what a perfect lens could give at this f-number: the file was sharpened (in the camera or later), or the f-number is wrong. Sharpened files overstate the lens.'));
  }
}

// reference returns the core's reference curve for target m at the chosen
// f-number, or null while the core works it out (the detail is drawn again
// when it arrives).
function reference(m, r, fmax) {
  const key = `${r.pitch_um}|${current.refF}|${m.id}|${fmax}`;
  const cache = current.refs || (current.refs = new Map());
  if (cache.has(key)) return cache.get(key);
  cache.set(key, null);
  const pool = current.state.pool;
  if (!pool || !current.state.functions.has('reference')) return null;
  const args = { f_number: current.refF, pitch_um: r.pitch_um, freq_cy_px: m.freq_cy_px, measured: m.mtf, max_cy_px: fmax, curve_points: 200 };
  const mine = current;
  pool.call('reference', [args]).then((v) => {
    cache.set(key, v);
    if (current === mine && current.selected === m.id && current.refF === args.f_number) renderDetail();
  }, () => {});
  return null;
}

// patternRows describes a star or a set of gratings.
function patternRows(m, r, units, row) {
  if (m.kind === 'star') {
    const st = (r.stars || []).find((x) => x.id === m.pattern_id);
    if (st) {
      row('Star', `${st.cycles} cycles, ${fmt(st.radius_px, 0)} px radius; rings from ${fmt(st.inner_px, 0)} to ${fmt(st.outer_px, 0)} px measured; centre within ±${fmt(st.center_unc_px, 2)} px`);
      row('Resolved', `up to ${fmtFreq(st.resolved_cy_px, units, r)} (modulation above three standard errors)`);
    }
  } else if (m.measured_cy_px) {
    row('Gratings', `one value per grating from ${fmtFreq(m.measured_cy_px[0], units, r)} to ${fmtFreq(m.measured_cy_px[1], units, r)}, relative to the coarsest`);
  }
  if (m.agreement) {
    const a = m.agreement;
    row('Against edges', `${a.edges} nearby edge${a.edges === 1 ? '' : 's'} of the same orientation read ${a.mean_diff >= 0 ? 'higher' : 'lower'} by ${fmt(Math.abs(a.mean_diff), 3)} on average (rms ${fmt(a.rms_diff, 3)})`);
  }
}

function zip(a, b) {
  return a.map((x, i) => [x, b[i]]);
}

function extent(a) {
  return [Math.min(...a), Math.max(...a)];
}

function padded(a) {
  const lo = Math.min(0, ...a.filter(Number.isFinite));
  const hi = Math.max(1, ...a.filter(Number.isFinite));
  const pad = 0.05 * (hi - lo);
  return [lo - pad, hi + pad];
}

// ---------------------------------------------------------------- across the frame

function renderFrame() {
  const { frame, result: r, state } = current;
  const units = state.units;
  frame.replaceChildren();
  frame.append(el('h3', { id: 'frame-title' }, 'Across the frame'));
  const ms = r.measurements.filter((m) => Number.isFinite(m.height_mm));
  if (!ms.length) {
    frame.append(el('p', { class: 'hint' }, 'Nothing was measured, so there is nothing to show across the frame.'));
    return;
  }
  frame.append(el('p', { class: 'hint' }, 'Each mark is one measured target, at its distance from the optical centre. ' +
    'Sagittal targets are measured across the radius from the optical centre, tangential ones along it.'));
  if (r.summary) {
    renderSummary(frame, r, units, state.pool, labelOf(current.p));
    return;
  }
  const grid = el('div', { class: 'frame-grid' });
  frame.append(grid);

  // One small plot per field frequency (the same axes), colour by
  // orientation, one marker shape per kind of target, as in the core's plots.
  const freqs = r.freqs_lp_mm;
  const table = { columns: ['target', 'kind', 'orientation', 'distance from the optical centre (mm)'].concat(freqs.map((f) => `MTF at ${f} lp/mm`)), rows: [] };
  for (const m of ms) table.rows.push([m.id, m.kind, m.orientation, m.height_mm, ...m.mtf_at_freqs]);
  const ymax = Math.max(1, ...ms.flatMap((m) => m.mtf_at_freqs).filter(Number.isFinite));
  freqs.forEach((f, i) => {
    const series = [];
    for (const o of ['sagittal', 'tangential', 'mixed']) {
      for (const kind of ['edge', 'star', 'grating']) {
        const sel = ms.filter((m) => m.orientation === o && m.kind === kind);
        if (!sel.length) continue;
        series.push({
          name: `${o} ${kind}s`, points: sel.map((m) => [m.height_mm, m.mtf_at_freqs[i]]),
          colour: ORIENTATION[o], line: false, marker: KIND_MARKER[kind], markerSize: 3.2,
        });
      }
    }
    grid.append(plot({
      title: `MTF at ${f} lp/mm`, xLabel: 'distance from the optical centre (mm)', yLabel: 'MTF',
      xDomain: [0, Math.max(r.corner_mm, 1)], yDomain: [0, ymax],
      series, table: i === 0 ? table : { columns: table.columns, rows: [] }, width: 460, height: 300, fileName: `field-mtf-${f}lpmm`,
    }));
  });
  const s50 = [];
  for (const o of ['sagittal', 'tangential', 'mixed']) {
    for (const kind of ['edge', 'star', 'grating']) {
      const sel = ms.filter((m) => m.orientation === o && m.kind === kind && Number.isFinite(m.mtf50_cy_px));
      if (sel.length) s50.push({ name: `${o} ${kind}s`, points: sel.map((m) => [m.height_mm, fromCyPx(m.mtf50_cy_px, units, r)]), colour: ORIENTATION[o], line: false, marker: KIND_MARKER[kind], markerSize: 3.2 });
    }
  }
  const yMax = fromCyPx(NYQUIST_CY_PX, units, r);
  grid.append(plot({
    title: 'MTF50 across the frame', xLabel: 'distance from the optical centre (mm)', yLabel: `MTF50 (${UNITS[units].label})`,
    xDomain: [0, Math.max(r.corner_mm, 1)], yDomain: [0, yMax], series: s50,
    table: { columns: ['target', 'orientation', 'distance from the optical centre (mm)', `MTF50 (${UNITS[units].label})`], rows: ms.map((m) => [m.id, m.orientation, m.height_mm, fromCyPx(m.mtf50_cy_px, units, r)]) },
    width: 560, height: 320, fileName: 'field-mtf50',
  }));
}

// ---------------------------------------------------------------- about, cautions

function renderAbout(about, r) {
  const ex = r.exif || {};
  const a = el('div');
  a.append(el('h3', {}, 'About this photo'));
  const dl = el('dl');
  // Exif texts come from the file: long ones are cut, the whole text in a tooltip.
  const row = (k, v) => {
    if (!v) return;
    const dd = el('dd', {}, v.length > 120 ? v.slice(0, 117) + '…' : v);
    if (v.length > 120) dd.title = v;
    dl.append(el('dt', {}, k), dd);
  };
  row('Camera', ex.model && ex.make && ex.model.toLowerCase().startsWith(ex.make.toLowerCase()) ? ex.model : [ex.make, ex.model].filter(Boolean).join(' '));
  row('Lens', ex.lens_model);
  row('Aperture', fmtFNumber(ex.f_number));
  row('Focal length', ex.focal_length_mm ? `${+ex.focal_length_mm.toFixed(1)} mm` + (ex.focal_length_35mm ? ` (${ex.focal_length_35mm} mm in 35 mm terms)` : '') : '');
  row('Exposure', [fmtExposure(ex.exposure_time_s), ex.iso ? `ISO ${ex.iso}` : '', ex.exposure_bias_ev ? `${ex.exposure_bias_ev > 0 ? '+' : ''}${ex.exposure_bias_ev} EV` : ''].filter(Boolean).join(', '));
  row('Size', `${r.width} × ${r.height} px, ${r.bit_depth}-bit ${r.format.toUpperCase()}`);
  if (!dl.childElementCount) dl.append(el('dd', {}, 'The file carries no camera data (Exif).'));
  a.append(dl);
  if (r.chart) about.append(chartBox(r));
  const b = el('div');
  b.append(el('h3', {}, 'Settings used'));
  b.append(el('p', { id: 'report-settings' }, settingsSummary(r)));
  about.append(a, b);
}

// chartBox says what the analysis learnt from Sagitta's chart in the photo:
// which chart, how many of its edges were measured, and the set-up checks.
function chartBox(r) {
  const c = r.chart;
  const st = c.setup;
  const box = el('div', { class: 'chart-found' });
  box.append(el('h3', {}, 'The chart in this photo'));
  box.append(el('p', {}, `Sagitta chart ${c.code}: ${c.edges_identified} of its ${c.edges_expected} edges found and tied to their places on the sheet.`));
  const dl = el('dl');
  const row = (k, v) => dl.append(el('dt', {}, k), el('dd', {}, v));
  row('Frame covered', `${fmt(st.frame_covered_pct, 0)} % by the chart; ${fmt(st.chart_visible_pct, 0)} % of the chart in the photo`);
  row('Turned', `${fmt(st.rotation_deg, 1)}°`);
  row('Keystone', `${fmt(st.keystone_left_right_pct, 1)} % left to right, ${fmt(st.keystone_top_bottom_pct, 1)} % top to bottom`);
  row('Off centre', `${fmt(st.off_centre_pct, 1)} % of the shorter side`);
  if (st.tilt_deg) row('Tilt', `${fmt(st.tilt_deg, 1)}° between the chart and the camera's axis`);
  // A chart across sheets: each sheet placed on its own, and the joins.
  if (c.sheets && c.sheets.length) {
    row('Sheets', `${c.sheets.length} sheets, ${c.sheets.filter((s) => s.own_pose).length} placed by their own marks`);
    for (const sm of c.seams || []) {
      const gap = sm.gap_mm < 0 ? `overlapping by ${fmt(-sm.gap_mm, 1)} mm` : `${fmt(sm.gap_mm, 1)} mm apart`;
      row(`Sheets ${sm.sheet_a} and ${sm.sheet_b}`, `${gap}, shifted ${fmt(Math.abs(sm.slide_mm), 1)} mm along their edge, turned ${fmt(Math.abs(sm.turn_deg), 1)}°`);
    }
  }
  box.append(dl);
  if (st.warnings && st.warnings.length) {
    const ul = el('ul', { class: 'setup-warnings' });
    for (const w of st.warnings) ul.append(el('li', {}, w));
    box.append(ul);
  } else {
    box.append(el('p', { class: 'hint' }, 'The set-up checks passed: the camera faced the chart squarely and the chart filled the frame.'));
  }
  return box;
}

function cautions(r) {
  const sec = el('section', { class: 'cautions', 'aria-labelledby': 'cautions-title' });
  sec.append(el('h3', { id: 'cautions-title' }, 'Before you judge the lens'));
  const ul = el('ul');
  const items = [
    'These numbers describe this photo, not only the lens: focus, vibration, lighting, the flatness of the chart and how square the camera faced it matter as much.',
    'Focus carefully (take several frames and keep the best), use a tripod and a delayed or electronic shutter, light the chart evenly without glare, and keep the sensor parallel to the chart.',
    'A poor result first means: repeat the shot and check the set-up. Only a result that repeats says something about the lens, and a repair or warranty question belongs with the maker\'s service.',
  ];
  if (r.summary && r.summary.cautions) items.splice(0, items.length, ...r.summary.cautions);
  if (r.measurements.some((m) => (m.flags || []).includes('sharpened'))) items.push('Some edges show signs of sharpening (their profile dips below its plateaus, or their MTF exceeds what optics can transfer): sharpening in the camera or the converter raises these numbers. Compare only photos processed the same way.');
  if (r.format === 'jpeg') items.push('JPEG files carry the camera\'s processing and compression. A raw file converted without sharpening measures the lens more faithfully.');
  for (const t of items) ul.append(el('li', {}, t));
  sec.append(ul);
  return sec;
}
