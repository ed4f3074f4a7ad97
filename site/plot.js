// Plots drawn in the page as SVG: axes with titles and units, a legend, and
// the data table behind every plot (for screen readers and export). Used for
// the interactive views only (a target's edge profile and response, MTF50
// across the frame); the field curves and Compare are the core's figures
// (corefig.js). The visual code is the core's: one marker shape per kind of
// target, solid data lines, dashes for reference curves only.

const NS = 'http://www.w3.org/2000/svg';

/**
 * KIND_MARKER is the marker shape of each kind of target, the same as the
 * core's plots (core/plot KindMarker); a square marks a value read off a
 * curve (MTF50), never a target.
 */
export const KIND_MARKER = { edge: 'circle', star: 'triangle', grating: 'diamond' };
const FONT = 'system-ui, -apple-system, "Segoe UI", Roboto, sans-serif';

/** svgEl creates an SVG element with attributes. */
export function svgEl(name, attrs = {}, parent = null) {
  const e = document.createElementNS(NS, name);
  for (const [k, v] of Object.entries(attrs)) if (v != null) e.setAttribute(k, String(v));
  if (parent) parent.append(e);
  return e;
}

/** niceTicks returns about n round tick values (steps of 1, 2 or 5 x 10^k) covering [lo, hi]. */
function niceTicks(lo, hi, n = 5) {
  if (!(hi > lo)) return [lo];
  const raw = (hi - lo) / n;
  const p = Math.pow(10, Math.floor(Math.log10(raw)));
  const step = [1, 2, 5, 10].map((m) => m * p).find((s) => s >= raw) || 10 * p;
  const out = [];
  for (let v = Math.ceil(lo / step - 1e-9) * step; v <= hi + step * 1e-9; v += step) out.push(+v.toPrecision(12));
  return out;
}

function tickText(v, step) {
  const d = Math.max(0, -Math.floor(Math.log10(step) + 1e-9));
  return v.toFixed(Math.min(d, 4));
}

/**
 * plot builds a figure: an SVG plot, its legend, its data table, and
 * export buttons.
 *
 * spec: {
 *   title, xLabel, yLabel, xDomain: [lo, hi], yDomain: [lo, hi],
 *   series: [{name, points: [[x, y], ...], colour, width, dash, marker ('circle'|'triangle'|'diamond'|'square'),
 *             line (default true), legend (default true)}],
 *   vlines: [{x, label, colour, dash}],
 *   table: {columns: [...], rows: [[...], ...]}  (default: one row per point),
 *   width, height, fileName
 * }
 */
export function plot(spec) {
  const W = spec.width || 560;
  const H = spec.height || 320;
  const m = { l: 58, r: 16, t: spec.title ? 30 : 12, b: 46 };
  const [x0, x1] = spec.xDomain;
  const [y0, y1] = spec.yDomain;
  const sx = (x) => m.l + ((x - x0) / (x1 - x0)) * (W - m.l - m.r);
  const sy = (y) => H - m.b - ((y - y0) / (y1 - y0)) * (H - m.t - m.b);
  const svg = svgEl('svg', {
    xmlns: NS, viewBox: `0 0 ${W} ${H}`, width: W, height: H, role: 'img',
    'aria-label': `${spec.title || 'Plot'}: ${spec.yLabel} against ${spec.xLabel}. The data table follows.`,
    'font-family': FONT, 'font-size': 12, class: 'plot',
  });
  svgEl('rect', { x: 0, y: 0, width: W, height: H, fill: '#ffffff' }, svg);
  if (spec.title) {
    const t = svgEl('text', { x: m.l, y: 19, 'font-size': 13, 'font-weight': 600, fill: '#1b1f24' }, svg);
    t.textContent = spec.title;
  }
  // Grid and ticks.
  const gx = niceTicks(x0, x1, Math.max(3, Math.round((W - m.l - m.r) / 80)));
  const gy = niceTicks(y0, y1, Math.max(3, Math.round((H - m.t - m.b) / 50)));
  const axes = svgEl('g', { stroke: '#d5d9de', 'stroke-width': 1 }, svg);
  const labels = svgEl('g', { fill: '#3d444d', 'font-size': 11 }, svg);
  const stepX = gx.length > 1 ? gx[1] - gx[0] : 1;
  const stepY = gy.length > 1 ? gy[1] - gy[0] : 1;
  for (const v of gx) {
    svgEl('line', { x1: sx(v), x2: sx(v), y1: m.t, y2: H - m.b }, axes);
    const t = svgEl('text', { x: sx(v), y: H - m.b + 15, 'text-anchor': 'middle' }, labels);
    t.textContent = tickText(v, stepX);
  }
  for (const v of gy) {
    svgEl('line', { x1: m.l, x2: W - m.r, y1: sy(v), y2: sy(v) }, axes);
    const t = svgEl('text', { x: m.l - 6, y: sy(v) + 4, 'text-anchor': 'end' }, labels);
    t.textContent = tickText(v, stepY);
  }
  svgEl('rect', { x: m.l, y: m.t, width: W - m.l - m.r, height: H - m.t - m.b, fill: 'none', stroke: '#8a939d' }, svg);
  const xt = svgEl('text', { x: (m.l + W - m.r) / 2, y: H - 8, 'text-anchor': 'middle', fill: '#1b1f24' }, svg);
  xt.textContent = spec.xLabel;
  const yt = svgEl('text', { x: 14, y: (m.t + H - m.b) / 2, 'text-anchor': 'middle', fill: '#1b1f24', transform: `rotate(-90 14 ${(m.t + H - m.b) / 2})` }, svg);
  yt.textContent = spec.yLabel;

  // Clip the data to the plot area.
  const clipId = 'clip' + Math.random().toString(36).slice(2, 9);
  const defs = svgEl('defs', {}, svg);
  const cp = svgEl('clipPath', { id: clipId }, defs);
  svgEl('rect', { x: m.l, y: m.t, width: W - m.l - m.r, height: H - m.t - m.b }, cp);
  const data = svgEl('g', { 'clip-path': `url(#${clipId})` }, svg);

  for (const v of spec.vlines || []) {
    if (v.x < x0 || v.x > x1) continue;
    svgEl('line', { x1: sx(v.x), x2: sx(v.x), y1: m.t, y2: H - m.b, stroke: v.colour || '#1b1f24', 'stroke-width': 1.2, 'stroke-dasharray': v.dash || null }, data);
    if (v.label) {
      const t = svgEl('text', { x: sx(v.x) - 4, y: m.t + 13, 'text-anchor': 'end', fill: v.colour || '#1b1f24', 'font-size': 11 }, svg);
      t.textContent = v.label;
    }
  }
  for (const s of spec.series) {
    if (s.band) {
      // A shaded band between two curves: [[x, lo, hi], ...].
      const b = s.band.filter((p) => p.every(Number.isFinite));
      if (b.length > 1) {
        const d = b.map((p, i) => `${i ? 'L' : 'M'}${sx(p[0]).toFixed(2)},${sy(p[2]).toFixed(2)}`).join('') +
          [...b].reverse().map((p) => `L${sx(p[0]).toFixed(2)},${sy(p[1]).toFixed(2)}`).join('') + 'Z';
        svgEl('path', { d, fill: s.colour, 'fill-opacity': s.opacity || 0.16, stroke: 'none' }, data);
      }
      continue;
    }
    const pts = s.points.filter((p) => Number.isFinite(p[0]) && Number.isFinite(p[1]));
    if (s.line !== false && pts.length > 1) {
      const d = pts.map((p, i) => `${i ? 'L' : 'M'}${sx(p[0]).toFixed(2)},${sy(p[1]).toFixed(2)}`).join('');
      svgEl('path', { d, fill: 'none', stroke: s.colour, 'stroke-width': s.width || 1.5, 'stroke-dasharray': s.dash || null, 'stroke-linejoin': 'round' }, data);
    }
    if (s.marker) for (const p of pts) marker(data, s.marker, sx(p[0]), sy(p[1]), s.colour, s.markerSize || 3.2);
  }

  const fig = document.createElement('figure');
  fig.className = 'plot-figure';
  fig.append(svg);
  const legend = document.createElement('ul');
  legend.className = 'legend';
  for (const s of spec.series.filter((s) => s.legend !== false && !s.band)) legend.append(legendItem(s));
  for (const v of (spec.vlines || []).filter((v) => v.legend)) legend.append(legendItem({ name: v.legend, colour: v.colour || '#1b1f24', dash: v.dash || null, width: 1.2 }));
  if (legend.childElementCount) fig.append(legend);
  fig.append(dataTable(spec));
  fig.append(exportButtons(svg, spec.fileName || 'sagitta-plot'));
  return fig;
}

function marker(g, kind, x, y, colour, r) {
  const a = { fill: colour, stroke: '#ffffff', 'stroke-width': 0.8 };
  if (kind === 'triangle') svgEl('path', { ...a, d: `M${x},${y - r * 1.4}L${x + r * 1.25},${y + r * 0.8}L${x - r * 1.25},${y + r * 0.8}Z` }, g);
  else if (kind === 'diamond') svgEl('path', { ...a, d: `M${x},${y - r * 1.35}L${x + r * 1.35},${y}L${x},${y + r * 1.35}L${x - r * 1.35},${y}Z` }, g);
  else if (kind === 'square') svgEl('rect', { ...a, x: x - r, y: y - r, width: 2 * r, height: 2 * r }, g);
  else svgEl('circle', { ...a, cx: x, cy: y, r }, g);
}

function legendItem(s) {
  const li = document.createElement('li');
  const sw = svgEl('svg', { width: 30, height: 12, 'aria-hidden': 'true' });
  if (s.line !== false) svgEl('line', { x1: 1, x2: 29, y1: 6, y2: 6, stroke: s.colour, 'stroke-width': s.width || 1.5, 'stroke-dasharray': s.dash || null }, sw);
  if (s.marker) marker(sw, s.marker, 15, 6, s.colour, 3.2);
  li.append(sw, document.createTextNode(s.name));
  return li;
}

function dataTable(spec) {
  const det = document.createElement('details');
  det.className = 'data-table';
  const sum = document.createElement('summary');
  sum.textContent = 'Data table';
  det.append(sum);
  const table = document.createElement('table');
  const cap = document.createElement('caption');
  cap.textContent = spec.title || `${spec.yLabel} against ${spec.xLabel}`;
  table.append(cap);
  let columns = spec.table && spec.table.columns;
  let rows = spec.table && spec.table.rows;
  if (!columns) {
    columns = ['Series', spec.xLabel, spec.yLabel];
    rows = [];
    for (const s of spec.series) for (const p of s.points || []) rows.push([s.name, p[0], p[1]]);
  }
  const thead = table.createTHead().insertRow();
  for (const c of columns) {
    const th = document.createElement('th');
    th.scope = 'col';
    th.textContent = c;
    thead.append(th);
  }
  const tb = table.createTBody();
  for (const r of rows) {
    const tr = tb.insertRow();
    for (const v of r) tr.insertCell().textContent = typeof v === 'number' ? (Number.isFinite(v) ? +v.toPrecision(5) + '' : 'n/a') : v;
  }
  det.append(table);
  return det;
}

function exportButtons(svg, name) {
  const div = document.createElement('div');
  div.className = 'plot-export';
  const b1 = document.createElement('button');
  b1.type = 'button';
  b1.className = 'link';
  b1.textContent = 'Save SVG';
  b1.onclick = () => saveBlob(svgBlob(svg), name + '.svg');
  const b2 = document.createElement('button');
  b2.type = 'button';
  b2.className = 'link';
  b2.textContent = 'Save PNG';
  b2.onclick = async () => saveBlob(await svgToPNG(svg, 2), name + '.png');
  div.append(b1, b2);
  return div;
}

/** svgBlob serialises an SVG element as a standalone file. */
export function svgBlob(svg) {
  const text = '<?xml version="1.0" encoding="UTF-8"?>\n' + new XMLSerializer().serializeToString(svg);
  return new Blob([text], { type: 'image/svg+xml' });
}

/** svgToPNG renders an SVG element to a PNG at the given scale. */
async function svgToPNG(svg, scale = 2) {
  const url = URL.createObjectURL(svgBlob(svg));
  try {
    const img = new Image();
    img.src = url;
    await img.decode();
    const w = +svg.getAttribute('width');
    const h = +svg.getAttribute('height');
    const c = document.createElement('canvas');
    c.width = Math.round(w * scale);
    c.height = Math.round(h * scale);
    const ctx = c.getContext('2d');
    ctx.drawImage(img, 0, 0, c.width, c.height);
    return await new Promise((res) => c.toBlob(res, 'image/png'));
  } finally {
    URL.revokeObjectURL(url);
  }
}

/** saveBlob offers a Blob as a download (a navigation to a blob: URL, not a connection). */
export function saveBlob(blob, name) {
  const a = document.createElement('a');
  a.href = URL.createObjectURL(blob);
  a.download = name;
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(a.href), 10000);
}
