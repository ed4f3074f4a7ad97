// Figures drawn by the core (core/plot, through the worker's "plot" call):
// the same description gives the SVG shown here, the PNG offered for
// download, and the data table behind the picture.

import { saveBlob } from './plot.js';
import { el } from './dom.js';

/**
 * coreFigure returns a <figure> at once and fills it when the core has
 * drawn kind (see sagittaPlot in wasm/plot.go) from data (a JSON string)
 * with options; fileName names the downloads.
 */
export function coreFigure(pool, kind, data, options, fileName) {
  const fig = el('figure', { class: 'plot-figure core-figure', 'data-kind': kind, 'aria-busy': 'true' });
  fig.append(el('p', { class: 'hint' }, 'Drawing…'));
  pool.call('plot', [kind, data, JSON.stringify({ ...options, format: 'svg' })]).then(
    (r) => {
      fig.replaceChildren();
      const doc = new DOMParser().parseFromString(r.svg, 'image/svg+xml').documentElement;
      const svg = document.importNode(doc, true);
      svg.classList.add('plot');
      fig.append(svg, table(r.table), buttons(pool, kind, data, options, fileName, r.svg));
      fig.removeAttribute('aria-busy');
    },
    (e) => {
      fig.replaceChildren(el('p', { class: 'notes' }, `This plot could not be drawn: ${e.message}`));
      fig.removeAttribute('aria-busy');
    },
  );
  return fig;
}

function table(t) {
  const det = el('details', { class: 'data-table' });
  det.append(el('summary', {}, 'Data table'));
  const tab = el('table');
  tab.append(el('caption', {}, t.caption));
  const hr = tab.createTHead().insertRow();
  for (const c of t.columns) hr.append(el('th', { scope: 'col' }, c));
  const tb = tab.createTBody();
  for (const r of t.rows) {
    const tr = tb.insertRow();
    for (const v of r) tr.insertCell().textContent = v;
  }
  det.append(tab);
  return det;
}

function buttons(pool, kind, data, options, fileName, svgText) {
  const div = el('div', { class: 'plot-export' });
  const svgB = el('button', { type: 'button', class: 'link' }, 'Save SVG');
  svgB.onclick = () => saveBlob(new Blob([svgText], { type: 'image/svg+xml' }), fileName + '.svg');
  const pngB = el('button', { type: 'button', class: 'link' }, 'Save PNG');
  pngB.onclick = async () => {
    const r = await pool.call('plot', [kind, data, JSON.stringify({ ...options, format: 'png', scale: 2 })]);
    saveBlob(new Blob([r.png], { type: 'image/png' }), fileName + '.png');
  };
  div.append(svgB, pngB);
  return div;
}
