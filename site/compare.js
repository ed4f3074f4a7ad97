// The Compare place: ticked photos' field curves overlaid (one colour per
// photo) and a table of key numbers per photo, sorted by f-number then
// focal length. Labels come from Exif; the user can rename.

import { plot } from './plot.js';
import { PHOTO } from './colour.js';
import { fmtFNumber, fmt } from './units.js';
import { el } from './dom.js';

// Choices kept between visits.
const view = { fi: 1, orient: 'both', unticked: new Set() };

/** defaultLabel names a photo from its Exif, else by its file name. */
function defaultLabel(p) {
  const ex = (p.result && p.result.exif) || {};
  const parts = [];
  if (ex.f_number) parts.push(fmtFNumber(ex.f_number));
  if (ex.focal_length_mm) parts.push(`${+ex.focal_length_mm.toFixed(1)} mm`);
  return parts.length ? parts.join(', ') : p.name;
}

export function labelOf(p) {
  return p.label || defaultLabel(p);
}

/** sortKey orders photos by f-number, then focal length, then name (unknowns last). */
function sorted(photos) {
  const k = (p) => {
    const ex = p.result.exif || {};
    return [ex.f_number || Infinity, ex.focal_length_mm || Infinity, p.name];
  };
  return [...photos].sort((a, b) => {
    const ka = k(a);
    const kb = k(b);
    for (let i = 0; i < 3; i++) if (ka[i] !== kb[i]) return ka[i] < kb[i] ? -1 : 1;
    return 0;
  });
}

/** renderCompare fills the Compare place. */
export function renderCompare(root, state) {
  root.replaceChildren();
  const done = sorted(state.photos.filter((p) => p.result));
  const title = el('h2', {}, 'Compare photos');
  root.append(title);
  if (done.length === 0) {
    root.append(el('p', { class: 'empty' }, 'Measure some photos first (in Measure); they can be compared here: an aperture series, two copies of a lens, two zoom settings.'));
    return;
  }
  const colours = new Map(done.map((p, i) => [p.key, PHOTO[i % PHOTO.length]]));
  const grid = el('div', { class: 'compare-grid' });
  root.append(grid);

  // The photos, ticked to compare, with their labels.
  const side = el('div');
  side.append(el('h3', {}, 'Photos'));
  side.append(el('p', { class: 'hint' }, 'Tick the photos to compare. Rename a photo by editing its label.'));
  const ul = el('ul', { class: 'pick' });
  for (const p of done) {
    const li = el('li');
    const box = el('input', { type: 'checkbox', 'aria-label': `Compare ${labelOf(p)}` });
    box.checked = !view.unticked.has(p.key);
    box.addEventListener('change', () => {
      if (box.checked) view.unticked.delete(p.key);
      else view.unticked.add(p.key);
      renderCompare(root, state);
    });
    const sw = el('span', { class: 'swatch', 'aria-hidden': 'true' });
    sw.style.background = colours.get(p.key);
    const name = el('input', { type: 'text', 'aria-label': `Label of ${p.name}` });
    name.value = labelOf(p);
    name.addEventListener('change', () => {
      p.label = name.value.trim() === defaultLabel(p) ? '' : name.value.trim();
      const title = document.getElementById('result-title');
      if (title && state.selected === p.key) title.textContent = labelOf(p);
      renderCompare(root, state);
    });
    const ex = p.result.exif || {};
    const sub = el('span', { class: 'sub' }, [p.name, ex.lens_model].filter(Boolean).join(' · '));
    li.append(box, sw, name, sub);
    ul.append(li);
  }
  side.append(ul);
  grid.append(side);

  const main = el('div', { class: 'panel' });
  grid.append(main);
  const ticked = done.filter((p) => !view.unticked.has(p.key));
  if (!ticked.length) {
    main.append(el('p', { class: 'empty' }, 'Tick at least one photo.'));
    return;
  }
  const freqs = ticked[0].result.freqs_lp_mm;
  const mixedFreqs = ticked.some((p) => p.result.freqs_lp_mm.join() !== freqs.join());

  // Choices: frequency and orientation.
  const controls = el('div', { class: 'compare-controls' });
  const fSel = el('select', { id: 'compare-freq', 'aria-label': 'Frequency of the field curves' });
  freqs.forEach((f, i) => fSel.append(new Option(`${f} lp/mm`, String(i), false, i === view.fi)));
  fSel.addEventListener('change', () => {
    view.fi = +fSel.value;
    renderCompare(root, state);
  });
  const oSel = el('select', { id: 'compare-orient', 'aria-label': 'Orientations shown' });
  for (const [v, t] of [['both', 'sagittal and tangential'], ['sagittal', 'sagittal only'], ['tangential', 'tangential only']]) oSel.append(new Option(t, v, false, v === view.orient));
  oSel.addEventListener('change', () => {
    view.orient = oSel.value;
    renderCompare(root, state);
  });
  const l1 = el('label', {}, 'Frequency ');
  l1.append(fSel);
  const l2 = el('label', {}, ' Show ');
  l2.append(oSel);
  controls.append(l1, l2);
  main.append(controls);
  if (mixedFreqs) main.append(el('p', { class: 'notes' }, 'These photos have different field frequencies (a photo waiting to be measured again keeps its old ones): measure it again, on the Measure place, to compare them.'));

  const fi = Math.min(view.fi, freqs.length - 1);
  const series = [];
  const rows = [];
  const orients = view.orient === 'both' ? ['sagittal', 'tangential'] : [view.orient];
  let xmax = 1;
  let smooth = '';
  for (const p of ticked) {
    const r = p.result;
    xmax = Math.max(xmax, r.corner_mm);
    const c = colours.get(p.key);
    for (const o of orients) {
      const keep = (m) => m.orientation === o;
      const pts = r.measurements.filter(keep).map((m) => [m.height_mm, m.mtf_at_freqs[fi]]);
      // The core's smooth field curve; without one (too few targets of this
      // orientation) only the targets are drawn.
      const curve = r.summary.curves.find((k) => k.quantity === 'mtf' && k.orientation === o && k.freq_lp_mm === freqs[fi]);
      const line = curve ? curve.height_mm.map((h, i) => [h, curve.value[i]]) : [];
      series.push({ name: `${labelOf(p)}, ${o}`, points: line, colour: c, width: 2.2, dash: o === 'tangential' ? '7 4' : null, marker: curve ? null : o === 'sagittal' ? 'circle' : 'square', markerSize: 3.4 });
      series.push({ name: '', points: pts, colour: c, line: false, marker: o === 'sagittal' ? 'circle' : 'square', markerSize: 1.6, legend: false });
      for (const q of line) rows.push([labelOf(p), o, q[0], q[1]]);
      if (curve) smooth = r.summary.smoother;
    }
  }
  main.append(plot({
    title: `MTF at ${freqs[fi]} lp/mm across the frame`, xLabel: 'distance from the optical centre (mm)', yLabel: 'MTF',
    xDomain: [0, xmax], yDomain: [0, 1], series, width: 760, height: 380, fileName: 'compare-field',
    table: { columns: ['photo', 'orientation', 'height (mm)', 'MTF'], rows },
  }));
  main.append(el('p', { class: 'hint' }, (smooth ? `Lines: the field curves (${smooth}).` : 'Too few targets of one orientation for a field curve.') +
    ' Small marks are single targets. Solid: sagittal; dashed: tangential.'));

  // The table of key numbers.
  const table = el('table', { class: 'numbers', id: 'compare-table' });
  table.append(el('caption', { class: 'visually-hidden' }, 'Key numbers per photo'));
  const head = table.createTHead();
  const h1 = head.insertRow();
  const h2 = head.insertRow();
  const th = (row, text, attrs = {}) => row.append(el('th', { scope: 'col', ...attrs }, text));
  th(h1, 'Photo', { rowspan: 2 });
  th(h1, 'Aperture', { rowspan: 2 });
  th(h1, 'Focal length', { rowspan: 2 });
  for (const f of freqs) th(h1, `MTF at ${f} lp/mm`, { colspan: 3 });
  th(h1, `Sagittal − tangential at ${freqs[freqs.length - 1]} lp/mm`, { rowspan: 2 });
  th(h1, `Balance at ${freqs[freqs.length - 1]} lp/mm`, { rowspan: 2 });
  // The zones and their medians come from the core (summary.zones).
  const zoneNames = ticked[0].result.summary.zones.map((z) => z.name);
  const zoneKey = view.orient === 'both' ? 'all' : view.orient;
  for (const _ of freqs) for (const z of zoneNames) th(h2, z);
  const tb = table.createTBody();
  const last = freqs.length - 1;
  for (const p of ticked) {
    const r = p.result;
    const ex = r.exif || {};
    const tr = tb.insertRow();
    const name = el('th', { scope: 'row' });
    const sw = el('span', { class: 'swatch', 'aria-hidden': 'true' });
    sw.style.cssText = `display:inline-block;width:10px;height:10px;border-radius:2px;margin-right:6px;background:${colours.get(p.key)}`;
    name.append(sw, labelOf(p));
    tr.append(name);
    tr.insertCell().textContent = fmtFNumber(ex.f_number) || '—';
    tr.insertCell().textContent = ex.focal_length_mm ? `${+ex.focal_length_mm.toFixed(1)} mm` : '—';
    freqs.forEach((_, i) => r.summary.zones.forEach((z) => (tr.insertCell().textContent = fmt(z[zoneKey][i], 2))));
    tr.insertCell().textContent = gapWords(r.summary, freqs[last]);
    tr.insertCell().textContent = balanceWords(r.summary, freqs[last]);
  }
  main.append(table);
  main.append(el('p', { class: 'hint' }, `Each number is the median over the ${view.orient === 'both' ? '' : view.orient + ' '}targets in a third of the distance from the centre to the corner. ` +
    'A positive sagittal − tangential difference means detail across the radius is held better than along it (astigmatism); ± one standard error. ' +
    'Balance compares opposite halves of the frame, beyond 0.4 of the way to the corner, at matched distance from the centre. Differences of a few hundredths are within what refocusing and re-shooting change.'));
}

// gapWords gives the core's largest sagittal - tangential difference at
// frequency f with its standard error (summary.astigmatism).
function gapWords(s, f) {
  const a = s.astigmatism.find((a) => a.freq_lp_mm === f);
  if (!a) return 'n/a';
  return `${a.max_gap >= 0 ? '+' : ''}${a.max_gap.toFixed(2)} ± ${seText(a.max_gap_se)} at ${a.max_gap_height_mm.toFixed(1)} mm`;
}

// balanceWords names the notable differences between opposite halves at
// frequency f (the core's balance check, summary.balance).
function balanceWords(s, f) {
  if (s.balance.verdict === 'not enough measurements') return 'not enough targets';
  const parts = [];
  for (const p of s.balance.pairs) {
    if (!['left', 'top'].includes(p.a)) continue; // the halves; quarters are in the Measure place
    const d = p.by_freq.find((d) => d.freq_lp_mm === f);
    if (d && d.notable) parts.push(`${d.diff < 0 ? p.a : p.b} softer by ${Math.abs(d.diff).toFixed(2)} ± ${seText(d.se)}`);
  }
  return parts.length ? parts.join('; ') : 'balanced';
}

// seText shows a standard error to two decimals, or "<0.01" when it would
// read as zero.
function seText(se) {
  return se < 0.005 ? '<0.01' : se.toFixed(2);
}
