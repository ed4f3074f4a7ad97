// The Compare place: ticked photos' field curves, drawn by the core
// (core/plot Compare: one small panel per field frequency and orientation,
// one colour per photo), and a table of key numbers per photo, sorted by
// f-number then focal length. Labels come from Exif; the user can rename.

import { coreFigure } from './corefig.js';
import { compareFringes } from './fringes.js';
import { compareGeometry } from './geometry.js';
import { explainBox } from './explain.js';
import { PHOTO } from './colour.js';
import { fmtFNumber, fmt } from './units.js';
import { el } from './dom.js';

// Choices kept between visits.
const view = { orient: 'both', unticked: new Set() };

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
  // Colours follow the ticked photos in order, as the core's figure does.
  const colours = new Map(done.filter((p) => !view.unticked.has(p.key)).map((p, i) => [p.key, PHOTO[i % PHOTO.length]]));
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
    sw.style.background = colours.get(p.key) || 'transparent';
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

  if (mixedFreqs) main.append(el('p', { class: 'notes' }, 'These photos have different field frequencies (a photo waiting to be measured again keeps its old ones): measure it again, on the Measure place, to compare them.'));

  // The core's figure: one small panel per field frequency and orientation,
  // on the same axes, one colour per photo.
  const data = JSON.stringify(ticked.map((p) => ({ label: labelOf(p), summary: p.result.summary || null })));
  main.append(coreFigure(state.pool, 'compare', data, { freqs_lp_mm: freqs }, 'field-curves-compared'));
  const missing = ticked.filter((p) => !p.result.summary).map(labelOf);
  if (missing.length) main.append(el('p', { class: 'notes' }, `No field curves for ${missing.join(', ')}: too few targets were measured.`));
  main.append(el('p', { class: 'hint' }, 'One colour per photo, as in the list of photos.'));
  const fringes = compareFringes(state.pool, ticked.map((p) => ({ label: labelOf(p), result: p.result })));
  if (fringes) main.append(fringes);
  compareGeometry(main, ticked, state.pool, labelOf); // distortion and light fall-off (geometry.js)

  // The table of key numbers, for all targets or one orientation.
  const oSel = el('select', { id: 'compare-orient', 'aria-label': 'Orientations in the table' });
  for (const [v, t] of [['both', 'all targets'], ['sagittal', 'sagittal targets'], ['tangential', 'tangential targets']]) oSel.append(new Option(t, v, false, v === view.orient));
  oSel.addEventListener('change', () => {
    view.orient = oSel.value;
    renderCompare(root, state);
  });
  const oLab = el('label', { class: 'compare-controls' }, 'Numbers for ');
  oLab.append(oSel);
  main.append(oLab);
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
  main.append(el('p', { class: 'hint' }, `Each number is the median over the ${view.orient === 'both' ? '' : view.orient + ' '}targets in a third of the distance from the optical centre to the corner. ` +
    'A positive sagittal − tangential difference means detail across the radius is held better than along it (astigmatism); ± one standard error. ' +
    'Balance compares opposite halves of the frame, beyond 0.4 of the way to the corner, at matched distance from the optical centre. Differences of a few hundredths are within what refocusing and re-shooting change.'));
  main.append(explainBox(['sagittal', 'tangential', 'standard error']));
  if (ticked.length >= 2 && !mixedFreqs) main.append(seriesSection(state, ticked));
}

// Choices of the series section kept between visits: the turn of a turned
// pair ("" = not a turned pair, "chart" = read it from the chart).
const seriesView = { turn: '' };

/**
 * seriesSection answers what a series is shot for, from the core
 * (core/series through the worker's "series" call): the sharpest stop of an
 * aperture series, and, for two photos, lens or set-up when the camera was
 * turned between them.
 */
function seriesSection(state, ticked) {
  const sec = el('section', { class: 'series', id: 'compare-series' });
  sec.append(el('h3', {}, 'Sharpest aperture'));
  const images = JSON.stringify(ticked.map((p) => p.result));
  const stops = new Set(ticked.map((p) => (p.result.exif || {}).f_number).filter(Boolean));
  const aperture = el('div', { id: 'series-aperture', 'aria-live': 'polite' });
  sec.append(aperture);
  if (stops.size < 2) {
    aperture.append(el('p', { class: 'hint' }, 'Tick photos of one lens at different f-numbers (the f-number comes from Exif) to find the stop where it is sharpest.'));
  } else {
    aperture.append(el('p', { class: 'hint' }, 'Working out the series…'));
    state.pool.call('series', ['aperture', images, '{}']).then(
      (a) => {
        aperture.replaceChildren(el('p', { class: 'verdict' }, a.text));
        aperture.append(coreFigure(state.pool, 'series', JSON.stringify(a), {}, 'aperture-series')); // its note is the caution
      },
      (e) => aperture.replaceChildren(el('p', { class: 'notes' }, `Not an aperture series: ${plain(e.message)}`)),
    );
  }
  if (ticked.length !== 2) return sec;

  sec.append(el('h3', {}, 'Lens or set-up?'));
  const pair = el('div', { id: 'series-turned', 'aria-live': 'polite' });
  const label = el('label', {}, 'Between these two photos the camera was turned about the lens axis by ');
  const sel = el('select', { id: 'series-turn' });
  for (const [v, t] of [['', 'not turned'], ['180', '180°'], ['90', '90° (the chart turned clockwise on screen)'], ['270', '90° the other way'], ['chart', 'as the chart shows']]) {
    sel.append(new Option(t, v, false, v === seriesView.turn));
  }
  label.append(sel);
  const answer = el('div');
  const show = () => {
    seriesView.turn = sel.value;
    if (!sel.value) {
      answer.replaceChildren(el('p', { class: 'hint' }, 'Shoot the same set-up again with the camera turned by 180° (or 90°) about the lens axis: a softer side that stays put belongs to the lens, one that turns belongs to the set-up.'));
      return;
    }
    answer.replaceChildren(el('p', { class: 'hint' }, 'Working out the pair…'));
    const turn = sel.value === 'chart' ? 0 : +sel.value;
    state.pool.call('series', ['turned', images, JSON.stringify({ turn_deg: turn })]).then(
      (t) => answer.replaceChildren(el('p', { class: 'verdict' }, t.text), el('p', { class: 'notes' }, t.caution)),
      (e) => answer.replaceChildren(el('p', { class: 'notes' }, `Not a turned pair: ${plain(e.message)}`)),
    );
  };
  sel.addEventListener('change', show);
  pair.append(label, answer);
  sec.append(pair);
  show();
  return sec;
}

// plain drops the core's package prefix from a message.
function plain(m) {
  return String(m).replace(/^series: /, '');
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

/**
 * seriesReport returns the series of the photos ticked in Compare for the
 * printable report, once the core has answered (null when they make no
 * series): the aperture-series figure with the sharpest-stop words, and for
 * a pair whose turn was chosen in Compare, the lens/set-up decomposition.
 */
export async function seriesReport(state) {
  const ticked = sorted(state.photos.filter((p) => p.result && !view.unticked.has(p.key)));
  const stops = new Set(ticked.map((p) => (p.result.exif || {}).f_number).filter(Boolean));
  const turned = ticked.length === 2 && seriesView.turn !== '';
  if (ticked.length < 2 || (stops.size < 2 && !turned)) return null;
  const images = JSON.stringify(ticked.map((p) => p.result));
  const sec = el('section', { class: 'report-only report-series', id: 'report-series' });
  sec.append(el('h2', {}, 'Series'));
  sec.append(el('p', { class: 'hint' }, `Photos: ${ticked.map(labelOf).join('; ')}.`));
  if (stops.size >= 2) {
    sec.append(el('h3', {}, 'Sharpest aperture'));
    try {
      const a = await state.pool.call('series', ['aperture', images, '{}']);
      sec.append(el('p', { class: 'verdict', id: 'report-series-aperture' }, a.text));
      const r = await state.pool.call('plot', ['series', JSON.stringify(a), JSON.stringify({ format: 'svg' })]);
      const fig = el('figure', { class: 'plot-figure core-figure', 'data-kind': 'series' });
      const svg = document.importNode(new DOMParser().parseFromString(r.svg, 'image/svg+xml').documentElement, true);
      svg.classList.add('plot');
      fig.append(svg);
      sec.append(fig);
    } catch (e) {
      sec.append(el('p', { class: 'notes' }, `Not an aperture series: ${plain(e.message)}`));
    }
  }
  if (turned) {
    sec.append(el('h3', {}, 'Lens or set-up?'));
    try {
      const t = await state.pool.call('series', ['turned', images, JSON.stringify({ turn_deg: seriesView.turn === 'chart' ? 0 : +seriesView.turn })]);
      sec.append(el('p', { class: 'verdict', id: 'report-series-turned' }, t.text));
      // The split at each field frequency: differences between opposite
      // sides (positive: left or top sharper), ± one standard error.
      const tab = el('table', { class: 'split-table', id: 'report-series-split' });
      tab.append(el('caption', {}, 'The differences between sides split into the part that stays with the lens and the part that turns with the set-up (positive: the left or top side sharper; ± one standard error).'));
      const hr = tab.createTHead().insertRow();
      for (const c of ['Frequency', 'Lens, left − right', 'Lens, top − bottom', 'Set-up, left − right', 'Set-up, top − bottom']) hr.append(el('th', { scope: 'col' }, c));
      const tb = tab.createTBody();
      const part = (q) => {
        if (q.diff == null) return 'n/a';
        const d = Math.abs(q.diff) < 0.005 ? 0 : q.diff; // no "-0.00"
        return `${d > 0 ? '+' : ''}${d.toFixed(2)} ± ${seText(q.se)}${q.notable ? ' (notable)' : ''}`;
      };
      for (const b of t.by_freq) {
        const tr = tb.insertRow();
        tr.insertCell().textContent = `${b.freq_lp_mm} lp/mm`;
        for (const q of [b.lens_left_right, b.lens_top_bottom, b.setup_left_right, b.setup_top_bottom]) tr.insertCell().textContent = part(q);
      }
      sec.append(tab, el('p', { class: 'notes' }, t.caution));
    } catch (e) {
      sec.append(el('p', { class: 'notes', id: 'report-series-turned' }, `Not a turned pair: ${plain(e.message)}`));
    }
  }
  return sec;
}
