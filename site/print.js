// The Print and plan place: the printable chart (core/chart) on one sheet
// or across 2 x 2 or 3 x 3 sheets, with a live preview of every sheet,
// downloads (PDF, SVG, PNG) and printing at actual size with the ruler check; beside it the shooting planner (core/plan): distance,
// magnification, the field frequencies on paper and whether the print
// limits the measurement.

import { saveBlob } from './plot.js';
import { fmt } from './units.js';
import { el } from './dom.js';

// The form's state, kept between visits.
const form = {
  paper: 'A4', customW: 300, customH: 400, orientation: 'landscape', aspect: '3:2', contrast: '4:1',
  dpi: 600, margin: 10, ruler: '', sheets: '1x1', focal: 50, sensor: 'full-frame', pixelsW: 6000, pixelsH: 4000, surface: 'photo',
};

let built = false;
let previewURLs = [];
let seq = 0;

/** renderPrint fills the Print and plan place (once) and refreshes its preview and plan. */
export function renderPrint(root, state) {
  if (!built) {
    build(root, state);
    built = true;
  }
  refresh(root, state);
}

/** chartOptions are the chart options for the core (chart.Options). */
function chartOptions() {
  const o = { paper: form.paper, orientation: form.orientation, aspect: form.aspect, contrast: form.contrast, dpi: +form.dpi, margin_mm: +form.margin };
  if (form.paper === 'custom') o.paper_mm = [+form.customW, +form.customH];
  const r = parseFloat(form.ruler);
  if (r > 0) o.ruler_measured_mm = r;
  if (form.sheets !== '1x1') o.sheets = form.sheets;
  return o;
}

// sheetCount is the number of sheets the chart is printed on.
function sheetCount() {
  return { '1x1': 1, '2x2': 4, '3x3': 9 }[form.sheets] || 1;
}

// sheetSVGs returns the SVG of every sheet, in reading order.
async function sheetSVGs(state) {
  const n = sheetCount();
  const out = [];
  for (let k = 1; k <= n; k++) {
    const o = chartOptions();
    if (n > 1) o.sheet = k;
    out.push(await state.pool.call('chart', [JSON.stringify(o), 'svg']));
  }
  return out;
}

function planOptions(state) {
  const o = { focal_mm: +form.focal, sensor: form.sensor, chart: chartOptions(), surface: form.surface };
  if (form.pixelsW > 0 && form.pixelsH > 0) o.pixels = [+form.pixelsW, +form.pixelsH];
  const freqs = [parseFloat(document.getElementById('freq-1').value), parseFloat(document.getElementById('freq-2').value)];
  if (freqs.every((f) => f > 0)) o.freqs_lp_mm = freqs;
  return o;
}

function field(label, input, hint) {
  const l = el('label', { class: 'field' });
  l.append(el('span', {}, label), input);
  if (hint) l.append(el('span', { class: 'hint' }, hint));
  return l;
}

function select(key, options, onChange) {
  const s = el('select', { id: `chart-${key}` });
  for (const [v, t] of options) s.append(new Option(t, v, false, String(form[key]) === v));
  s.addEventListener('change', () => {
    form[key] = s.value;
    onChange();
  });
  return s;
}

function number(key, attrs, onChange) {
  const i = el('input', { type: 'number', id: `chart-${key}`, ...attrs });
  i.value = form[key];
  i.addEventListener('change', () => {
    form[key] = i.value;
    onChange();
  });
  return i;
}

function build(root, state) {
  root.replaceChildren();
  const update = () => refresh(root, state);
  const grid = el('div', { class: 'print-grid' });
  root.append(grid);

  // The chart.
  const left = el('section', { class: 'panel', 'aria-labelledby': 'chart-title' });
  left.append(el('h2', { id: 'chart-title' }, 'Print a chart'));
  left.append(el('p', { class: 'hint' }, 'Squares turned a few degrees give slanted edges everywhere in the frame; the marks let Sagitta recognise the chart in a photo.'));
  const opts = el('div', { class: 'form-grid' });
  opts.append(field('Paper', select('paper', [['A4', 'A4'], ['A3', 'A3'], ['A3+', 'A3+'], ['A2', 'A2'], ['Letter', 'Letter'], ['Tabloid', 'Tabloid'], ['custom', 'Custom size…']], () => {
    customRow.hidden = form.paper !== 'custom';
    update();
  })));
  const customRow = el('div', { class: 'field inline' });
  customRow.append(el('span', {}, 'Custom sheet'), number('customW', { min: 100, max: 2000, 'aria-label': 'Custom sheet width in mm' }, update), ' × ', number('customH', { min: 100, max: 2000, 'aria-label': 'Custom sheet height in mm' }, update), ' mm');
  customRow.hidden = form.paper !== 'custom';
  opts.append(customRow);
  opts.append(field('Orientation', select('orientation', [['landscape', 'Landscape (camera level)'], ['portrait', 'Portrait (camera upright)']], update)));
  opts.append(field('Shape', select('aspect', [['3:2', '3:2 (most cameras)'], ['4:3', '4:3'], ['16:9', '16:9'], ['1:1', '1:1']], update), 'Match the sensor so the chart can fill the frame.'));
  opts.append(field('Contrast', select('contrast', [['4:1', '4:1 grey (edges; recommended)'], ['high', 'High: black on white']], update)));
  opts.append(field('Printer resolution', number('dpi', { min: 100, max: 2880, step: 1 }, update), 'dots per inch'));
  opts.append(field('Margin', number('margin', { min: 3, max: 50, step: 1 }, update), 'mm of blank paper on every side'));
  opts.append(field('Sheets', select('sheets', [['1x1', 'One sheet'], ['2x2', '2 × 2 sheets, assembled on a wall'], ['3x3', '3 × 3 sheets, assembled on a wall']], update), 'A larger chart lets you shoot from farther, where the print is sharper on the sensor. Each sheet carries its own marks; cut on the dashed lines and lay each cut edge on the next sheet\'s solid line.'));
  left.append(opts);
  const preview = el('div', { class: 'chart-preview', id: 'chart-preview', role: 'img', 'aria-label': 'Preview of the chart' });
  left.append(preview);
  left.append(el('p', { class: 'notes', id: 'chart-error', hidden: '' }));
  const dl = el('div', { class: 'chart-actions' });
  for (const [fmtName, label] of [['pdf', 'Download PDF'], ['svg', 'SVG'], ['png', 'PNG']]) {
    const b = el('button', { type: 'button', class: fmtName === 'pdf' ? 'button primary' : 'button', id: `chart-download-${fmtName}` }, label);
    b.addEventListener('click', () => download(state, fmtName));
    dl.append(b);
  }
  const pr = el('button', { type: 'button', class: 'button', id: 'chart-print' }, 'Print at actual size');
  pr.addEventListener('click', () => printChart(state));
  dl.append(pr);
  left.append(dl);
  const ruler = el('div', { class: 'ruler-box' });
  ruler.append(el('p', {}, 'Print at 100 %, with "fit to page" or "scale to fit" turned off. Then measure the 100 mm ruler on the print with a good rule.'));
  ruler.append(field('The ruler measures', number('ruler', { min: 80, max: 120, step: 0.1, placeholder: '100.0' }, update), 'mm on my print (the chart is redrawn to correct the printer\'s scale)'));
  left.append(ruler);
  grid.append(left);

  // The planner.
  const right = el('section', { class: 'panel', 'aria-labelledby': 'plan-title' });
  right.append(el('h2', { id: 'plan-title' }, 'Plan the shot'));
  const p = el('div', { class: 'form-grid' });
  p.append(field('Focal length', number('focal', { min: 1, max: 2000, step: 1 }, update), 'mm'));
  p.append(field('Sensor', select('sensor', [['full-frame', 'Full frame, 36 × 24 mm'], ['aps-c', 'APS-C, about 23.5 × 15.6 mm'], ['four-thirds', 'Four Thirds, 17.3 × 13 mm'], ['1-inch', '1-inch type, 13.2 × 8.8 mm']], update)));
  const px = el('div', { class: 'field inline' });
  px.append(el('span', {}, 'Photo size'), number('pixelsW', { min: 100, max: 20000, step: 1, 'aria-label': 'Photo width in pixels' }, update), ' × ', number('pixelsH', { min: 100, max: 20000, step: 1, 'aria-label': 'Photo height in pixels' }, update), ' px');
  p.append(px);
  p.append(field('Paper surface', select('surface', [['photo', 'Coated photo paper'], ['plain', 'Plain paper']], update)));
  right.append(p);
  right.append(el('div', { id: 'plan-result', 'aria-live': 'polite' }));
  grid.append(right);
}

async function refresh(root, state) {
  const my = ++seq;
  const err = root.querySelector('#chart-error');
  try {
    const svgs = await sheetSVGs(state);
    if (my !== seq) return;
    for (const u of previewURLs) URL.revokeObjectURL(u);
    previewURLs = svgs.map((svg) => URL.createObjectURL(new Blob([svg], { type: 'image/svg+xml' })));
    const box = root.querySelector('#chart-preview');
    const side = Math.round(Math.sqrt(svgs.length));
    box.style.gridTemplateColumns = side > 1 ? `repeat(${side}, 1fr)` : '';
    box.classList.toggle('sheets', side > 1);
    box.replaceChildren(...previewURLs.map((u, i) => el('img', { src: u, alt: side > 1 ? `Sheet ${Math.floor(i / side) + 1}-${(i % side) + 1} as it will print` : 'The chart as it will print' })));
    err.hidden = true;
  } catch (e) {
    if (my !== seq) return;
    err.hidden = false;
    err.textContent = e.message;
  }
  try {
    const plan = JSON.parse(await state.pool.call('plan', [JSON.stringify(planOptions(state))]));
    if (my !== seq) return;
    showPlan(root.querySelector('#plan-result'), plan);
  } catch (e) {
    if (my !== seq) return;
    root.querySelector('#plan-result').replaceChildren(el('p', { class: 'notes' }, e.message));
  }
}

function showPlan(box, p) {
  box.replaceChildren();
  const verdict = el('p', { class: `verdict verdict-${p.verdict}` }, p.summary);
  box.append(verdict);
  const dl = el('dl', { class: 'plan-numbers' });
  const row = (k, v) => dl.append(el('dt', {}, k), el('dd', {}, v));
  row('Sensor to chart', `${fmt(p.sensor_to_chart_mm / 1000, 2)} m (${fmt(p.distance_focal_lengths, 0)} focal lengths)`);
  row('Magnification', `1 : ${fmt(1 / p.magnification, 1)}`);
  row('Chart on paper', `${fmt(p.chart_mm[0], 0)} × ${fmt(p.chart_mm[1], 0)} mm (${p.paper}, filled along its ${p.limited_by})`);
  for (const f of p.frequencies) row(`${f.sensor_lp_mm} lp/mm on the sensor`, `${fmt(f.paper_lp_mm, 2)} lp/mm on paper; the print keeps ${Math.round(100 * f.print_mtf)} % of its contrast`);
  if (p.nyquist) row('Nyquist on paper', `${fmt(p.nyquist.paper_lp_mm, 2)} lp/mm; the print keeps ${Math.round(100 * p.nyquist.print_mtf)} %`);
  box.append(dl);
  if (p.tiling && p.tiling.enough) {
    const t = p.tiling;
    row('Across sheets', `${t.sheets.replace('x', ' × ')} sheets: ${fmt(t.chart_mm[0], 0)} × ${fmt(t.chart_mm[1], 0)} mm, ${fmt(t.object_distance_mm / 1000, 2)} m from the lens; choose it under Sheets`);
  }
  if (p.advice && p.advice.length) {
    const ul = el('ul', { class: 'advice' });
    for (const a of p.advice) ul.append(el('li', {}, a));
    box.append(ul);
  }
  for (const w of p.warnings || []) box.append(el('p', { class: 'notes' }, w));
}

async function download(state, format) {
  const bytes = await state.pool.call('chart', [JSON.stringify(chartOptions()), format]);
  const o = chartOptions();
  // A chart across sheets comes as one PDF, or a ZIP of one SVG or PNG per sheet.
  const zip = o.sheets && format !== 'pdf';
  const type = zip ? 'application/zip' : { pdf: 'application/pdf', svg: 'image/svg+xml', png: 'image/png' }[format];
  const name = `sagitta-chart-${(o.paper === 'custom' ? o.paper_mm.join('x') + 'mm' : o.paper).replace('+', 'plus')}-${o.orientation}${o.sheets ? '-' + o.sheets : ''}.${zip ? format + '.zip' : format}`;
  saveBlob(new Blob([bytes], { type }), name);
}

// printChart prints the chart's SVG alone, on a page of its exact size
// (the SVG's width and height are in millimetres).
async function printChart(state) {
  const box = el('div', { class: 'print-sheet' });
  let w = '';
  let h = '';
  for (const bytes of await sheetSVGs(state)) {
    const doc = new DOMParser().parseFromString(new TextDecoder().decode(bytes), 'image/svg+xml').documentElement;
    w = doc.getAttribute('width');
    h = doc.getAttribute('height');
    box.append(document.importNode(doc, true)); // one page per sheet
  }
  document.body.append(box);
  const style = el('style');
  style.textContent = `@page { size: ${w} ${h}; margin: 0; } @media print { body > *:not(.print-sheet) { display: none !important; } .print-sheet { display: block !important; } .print-sheet svg { width: ${w}; height: ${h}; display: block; break-after: page; } }`;
  document.head.append(style);
  document.body.classList.add('printing-chart');
  const done = () => {
    box.remove();
    style.remove();
    document.body.classList.remove('printing-chart');
    window.removeEventListener('afterprint', done);
  };
  window.addEventListener('afterprint', done);
  window.print();
}
