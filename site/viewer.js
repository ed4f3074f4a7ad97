// The photo viewer: the photo on a canvas, the measured targets drawn over
// it in SVG (in the photo's own pixel coordinates, x right, y down), zoom and
// pan by wheel, drag, buttons and keys.

import { svgEl } from './plot.js';

const MAX_ZOOM = 16; // screen px per photo px

/**
 * storedFromShown returns the canvas transform [a, b, c, d, e, f] that maps
 * a picture shown in Exif orientation o (1..8; TIFF 6.0, section 8, tag
 * 0x0112) back onto the stored W x H pixels: x = a u + c v + e,
 * y = b u + d v + f for a shown point (u, v). The core measures the pixels
 * as stored, so the photo is drawn as stored for the targets to sit on it.
 */
function storedFromShown(o, W, H) {
  switch (o) {
    case 2: return [-1, 0, 0, 1, W, 0]; // shown mirrored left-right
    case 3: return [-1, 0, 0, -1, W, H]; // shown turned 180 degrees
    case 4: return [1, 0, 0, -1, 0, H]; // shown mirrored top-bottom
    case 5: return [0, 1, 1, 0, 0, 0]; // shown transposed
    case 6: return [0, -1, 1, 0, 0, H]; // shown turned 90 degrees clockwise
    case 7: return [0, -1, -1, 0, W, H]; // shown transposed the other way
    case 8: return [0, 1, -1, 0, W, 0]; // shown turned 90 degrees anticlockwise
    default: return [1, 0, 0, 1, 0, 0];
  }
}

/**
 * drawStored draws source (a picture of the stored W x H photo, reduced by
 * factor, shown in orientation o) onto ctx in stored photo coordinates.
 */
export function drawStored(ctx, source, W, H, o = 1, factor = 1) {
  ctx.save();
  ctx.transform(...storedFromShown(o, W, H));
  ctx.drawImage(source, 0, 0, source.width * factor, source.height * factor);
  ctx.restore();
}

/**
 * ringArc is the SVG path of arc i of n equal arcs of the ring between radii
 * r0 and r1 around (cx, cy), starting at the top and going clockwise.
 */
function ringArc(cx, cy, r0, r1, i, n) {
  const a0 = -Math.PI / 2 + (2 * Math.PI * i) / n;
  const a1 = -Math.PI / 2 + (2 * Math.PI * (i + 1)) / n - (n > 1 ? 0.04 : 0.0001);
  const pt = (r, a) => `${(cx + r * Math.cos(a)).toFixed(2)},${(cy + r * Math.sin(a)).toFixed(2)}`;
  const big = a1 - a0 > Math.PI ? 1 : 0;
  return `M${pt(r1, a0)}A${r1},${r1} 0 ${big} 1 ${pt(r1, a1)}L${pt(r0, a1)}A${r0},${r0} 0 ${big} 0 ${pt(r0, a0)}Z`;
}

export class PhotoViewer {
  /**
   * @param {HTMLElement} root element to fill
   * @param {{onSelect: (id: number) => void}} hooks
   */
  constructor(root, hooks) {
    this.hooks = hooks;
    this.root = root;
    root.classList.add('viewer');
    root.innerHTML = '';
    this.stage = document.createElement('div');
    this.stage.className = 'viewer-stage';
    this.stage.tabIndex = 0;
    this.stage.setAttribute('role', 'group');
    this.stage.setAttribute('aria-label', 'Photo with the measured targets. Plus and minus zoom, arrow keys pan, 0 fits the photo; Tab moves through the targets, Enter opens one.');
    this.canvas = document.createElement('canvas');
    this.canvas.setAttribute('aria-hidden', 'true');
    this.svg = svgEl('svg', { class: 'viewer-overlay' });
    this.layer = svgEl('g', {}, this.svg);
    this.rejLayer = svgEl('g', { class: 'rejected-layer' }, this.layer);
    this.markLayer = svgEl('g', { class: 'mark-layer', 'aria-hidden': 'true' }, this.layer);
    this.foundLayer = svgEl('g', { class: 'found-layer', 'aria-hidden': 'true' }, this.layer);
    this.tgtLayer = svgEl('g', { class: 'target-layer' }, this.layer);
    this.tip = document.createElement('div');
    this.tip.className = 'viewer-tip';
    this.tip.hidden = true;
    this.tip.setAttribute('role', 'status');
    this.stage.append(this.canvas, this.svg, this.tip);
    const bar = document.createElement('div');
    bar.className = 'viewer-tools';
    const btn = (label, title, f) => {
      const b = document.createElement('button');
      b.type = 'button';
      b.textContent = label;
      b.title = title;
      b.setAttribute('aria-label', title);
      b.onclick = f;
      bar.append(b);
      return b;
    };
    btn('+', 'Zoom in', () => this.zoomBy(1.5));
    btn('−', 'Zoom out', () => this.zoomBy(1 / 1.5));
    btn('Fit', 'Fit the photo', () => this.fit());
    btn('1:1', 'One photo pixel per screen pixel', () => this.zoomTo(1 / (window.devicePixelRatio || 1)));
    this.zoomLabel = document.createElement('span');
    this.zoomLabel.className = 'zoom-label';
    bar.append(this.zoomLabel);
    root.append(bar, this.stage); // the tools first, before the many targets in the tab order

    this.photo = null;
    this.view = { s: 1, tx: 0, ty: 0 };
    this.polys = new Map();
    this.selected = null;
    this.listen();
    const ro = new ResizeObserver(() => {
      if (!this.stage.isConnected) {
        ro.disconnect(); // a viewer that was replaced by another
        this.photo = null;
        return;
      }
      this.resize();
    });
    ro.observe(this.stage);
  }

  /**
   * setPhoto shows a photo. source: an ImageBitmap (or canvas) of the photo,
   * possibly reduced by the integer factor `factor`, as the browser shows it
   * (turned by the Exif orientation `orientation`, see storedFromShown);
   * width, height: the stored photo's size in px.
   */
  setPhoto(source, width, height, factor = 1, orientation = 1) {
    this.photo = { source, width, height, factor, orientation };
    this.stage.style.aspectRatio = `${width} / ${height}`;
    this.svg.setAttribute('aria-hidden', 'false');
    this.resize();
    this.fit();
  }

  /**
   * setFound outlines the targets found but not yet measured (polygons,
   * px), under the measured ones.
   */
  setFound(outlines) {
    this.foundLayer.replaceChildren();
    for (const pts of outlines) svgEl('polygon', { class: 'found', points: pts.map((q) => q.join(',')).join(' ') }, this.foundLayer);
  }

  /**
   * setTargets draws the measured targets (polygons filled by colourOf(m))
   * and the rejected candidates (faint lines with their reasons).
   */
  setTargets(measurements, rejected, colourOf, labelOf) {
    this.tgtLayer.replaceChildren();
    this.rejLayer.replaceChildren();
    this.polys.clear();
    this.rejected = [];
    for (const r of rejected) {
      const g = svgEl('g', { class: 'rejected' }, this.rejLayer);
      svgEl('line', { x1: r.x0_px, y1: r.y0_px, x2: r.x1_px, y2: r.y1_px, class: 'rejected-halo' }, g);
      svgEl('line', { x1: r.x0_px, y1: r.y0_px, x2: r.x1_px, y2: r.y1_px, class: 'rejected-line' }, g);
      const text = 'Set aside: ' + r.reason;
      g.addEventListener('pointerenter', (e) => this.showTip(text, e));
      g.addEventListener('pointerleave', () => this.hideTip());
      this.rejected.push({ g, text, x: (r.x0_px + r.x1_px) / 2, y: (r.y0_px + r.y1_px) / 2 });
    }
    // A star's records (one per orientation) share its disc: each gets an
    // arc of a ring around the star, in the order of the records.
    const starRecords = new Map();
    for (const m of measurements) {
      if (m.kind !== 'star') continue;
      const k = `${m.x_px},${m.y_px}`;
      if (!starRecords.has(k)) starRecords.set(k, []);
      starRecords.get(k).push(m);
    }
    for (const m of measurements) {
      const attrs = { class: `target target-${m.kind}`, tabindex: 0, role: 'button', fill: colourOf(m), 'aria-label': labelOf(m) };
      let poly;
      if (m.kind === 'star') {
        const recs = starRecords.get(`${m.x_px},${m.y_px}`);
        const xs = m.region_px.map((p) => p[0]);
        const R = (Math.max(...xs) - Math.min(...xs)) / 2;
        poly = svgEl('path', { ...attrs, d: ringArc(m.x_px, m.y_px, 0.62 * R, R, recs.indexOf(m), recs.length) }, this.tgtLayer);
      } else {
        poly = svgEl('polygon', { ...attrs, points: m.region_px.map((p) => p.join(',')).join(' ') }, this.tgtLayer);
      }
      const label = labelOf(m);
      poly.addEventListener('pointerenter', (e) => this.showTip(label, e));
      poly.addEventListener('pointerleave', () => this.hideTip());
      poly.addEventListener('focus', () => this.showTipAt(label, m.x_px, m.y_px));
      poly.addEventListener('blur', () => this.hideTip());
      poly.addEventListener('click', () => {
        if (!this.dragged) this.hooks.onSelect(m.id);
      });
      poly.addEventListener('keydown', (e) => {
        if (e.key === 'Enter' || e.key === ' ') {
          e.preventDefault();
          this.hooks.onSelect(m.id);
        }
      });
      this.polys.set(m.id, { poly, m });
    }
    this.select(this.selected);
  }

  /** setMarks rings the chart's recognised marks (image px). */
  setMarks(marks) {
    this.markLayer.replaceChildren();
    const r = Math.max(this.photo ? this.photo.width : 1000, 1000) / 90;
    for (const m of marks || []) svgEl('circle', { cx: m.x_px, cy: m.y_px, r, class: 'chart-mark' }, this.markLayer);
  }

  /** select marks one target as selected (null for none). */
  select(id) {
    this.selected = id;
    for (const [k, v] of this.polys) v.poly.classList.toggle('selected', k === id);
    const sel = this.polys.get(id);
    if (sel) this.tgtLayer.append(sel.poly); // draw on top
  }

  /** recolour updates target fills and labels (after a change of units). */
  recolour(colourOf, labelOf) {
    for (const { poly, m } of this.polys.values()) {
      poly.setAttribute('fill', colourOf(m));
      poly.setAttribute('aria-label', labelOf(m));
    }
  }

  /** highlightRejected shows one set-aside candidate and its reason. */
  highlightRejected(i, on) {
    const r = this.rejected && this.rejected[i];
    if (!r) return;
    r.g.classList.toggle('highlight', on);
    if (on) this.showTipAt(r.text, r.x, r.y);
    else this.hideTip();
  }

  /** centreOn pans so that photo point (x, y) is in the middle. */
  centreOn(x, y) {
    const w = this.stage.clientWidth;
    const h = this.stage.clientHeight;
    this.view.tx = w / 2 - x * this.view.s;
    this.view.ty = h / 2 - y * this.view.s;
    this.draw();
  }

  fit() {
    if (!this.photo) return;
    const w = this.stage.clientWidth;
    const h = this.stage.clientHeight;
    const s = Math.min(w / this.photo.width, h / this.photo.height);
    this.view = { s, tx: (w - this.photo.width * s) / 2, ty: (h - this.photo.height * s) / 2 };
    this.minScale = s / 2;
    this.draw();
  }

  zoomBy(f, cx = this.stage.clientWidth / 2, cy = this.stage.clientHeight / 2) {
    this.zoomTo(this.view.s * f, cx, cy);
  }

  zoomTo(s, cx = this.stage.clientWidth / 2, cy = this.stage.clientHeight / 2) {
    if (!this.photo) return;
    s = Math.min(MAX_ZOOM, Math.max(this.minScale || 0.01, s));
    const v = this.view;
    const px = (cx - v.tx) / v.s;
    const py = (cy - v.ty) / v.s;
    this.view = { s, tx: cx - px * s, ty: cy - py * s };
    this.draw();
  }

  panBy(dx, dy) {
    this.view.tx += dx;
    this.view.ty += dy;
    this.draw();
  }

  resize() {
    const dpr = window.devicePixelRatio || 1;
    const w = this.stage.clientWidth;
    const h = this.stage.clientHeight;
    this.canvas.width = Math.max(1, Math.round(w * dpr));
    this.canvas.height = Math.max(1, Math.round(h * dpr));
    this.svg.setAttribute('viewBox', `0 0 ${w} ${h}`);
    this.draw();
  }

  draw() {
    const ctx = this.canvas.getContext('2d');
    const dpr = window.devicePixelRatio || 1;
    ctx.setTransform(1, 0, 0, 1, 0, 0);
    ctx.fillStyle = '#2b2f35';
    ctx.fillRect(0, 0, this.canvas.width, this.canvas.height);
    const v = this.view;
    this.layer.setAttribute('transform', `matrix(${v.s} 0 0 ${v.s} ${v.tx} ${v.ty})`);
    if (!this.photo) return;
    const p = this.photo;
    ctx.setTransform(dpr * v.s, 0, 0, dpr * v.s, dpr * v.tx, dpr * v.ty);
    ctx.imageSmoothingEnabled = v.s * dpr < 2;
    drawStored(ctx, p.source, p.width, p.height, p.orientation, p.factor);
    this.zoomLabel.textContent = `${Math.round(v.s * dpr * 100)} %`;
  }

  showTip(text, e) {
    const r = this.stage.getBoundingClientRect();
    this.placeTip(text, e.clientX - r.left, e.clientY - r.top);
  }

  showTipAt(text, x, y) {
    this.placeTip(text, x * this.view.s + this.view.tx, y * this.view.s + this.view.ty);
  }

  placeTip(text, x, y) {
    this.tip.textContent = text;
    this.tip.hidden = false;
    const w = this.stage.clientWidth;
    this.tip.style.left = Math.min(Math.max(4, x + 12), w - 260) + 'px';
    this.tip.style.top = Math.max(4, y + 14) + 'px';
  }

  hideTip() {
    this.tip.hidden = true;
  }

  listen() {
    const st = this.stage;
    st.addEventListener('wheel', (e) => {
      if (!this.photo) return;
      e.preventDefault();
      const r = st.getBoundingClientRect();
      this.zoomBy(Math.exp(-e.deltaY * 0.0015), e.clientX - r.left, e.clientY - r.top);
    }, { passive: false });
    let drag = null;
    st.addEventListener('pointerdown', (e) => {
      if (e.button !== 0) return;
      drag = { x: e.clientX, y: e.clientY, moved: 0 };
      this.dragged = false;
    });
    st.addEventListener('pointermove', (e) => {
      if (!drag) return;
      const dx = e.clientX - drag.x;
      const dy = e.clientY - drag.y;
      drag.moved += Math.abs(dx) + Math.abs(dy);
      if (drag.moved > 4) {
        if (!this.dragged) st.setPointerCapture(e.pointerId);
        this.dragged = true;
        st.classList.add('dragging');
        this.hideTip();
        this.panBy(dx, dy);
      }
      drag.x = e.clientX;
      drag.y = e.clientY;
    });
    const end = () => {
      drag = null;
      st.classList.remove('dragging');
      setTimeout(() => (this.dragged = false), 0);
    };
    st.addEventListener('pointerup', end);
    st.addEventListener('pointercancel', end);
    st.addEventListener('keydown', (e) => {
      const step = 60;
      const keys = {
        '+': () => this.zoomBy(1.5), '=': () => this.zoomBy(1.5), '-': () => this.zoomBy(1 / 1.5),
        0: () => this.fit(), ArrowLeft: () => this.panBy(step, 0), ArrowRight: () => this.panBy(-step, 0),
        ArrowUp: () => this.panBy(0, step), ArrowDown: () => this.panBy(0, -step),
      };
      const f = keys[e.key];
      if (f) {
        e.preventDefault();
        f();
      }
    });
  }
}
