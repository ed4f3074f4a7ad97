// Sagitta's page: places (Measure, Compare, Print and plan), the photo
// list, the settings, exports and the automation hooks
// (window.sagitta.results, document.body.dataset.status).

import { engine, demoEngine } from './engine.js';
import { AbortError } from './pool.js';
import { readSettings, settingsKey, watchSettings, settingsSummary } from './settings.js';
import { renderResult, renderPartial, refreshUnits, outcome } from './results.js';
import { saveBlob } from './plot.js';
import { renderCompare, seriesReport } from './compare.js';
import { renderPrint } from './print.js';
import { setPalette } from './colour.js';
import { fmtFNumber } from './units.js';

const $ = (id) => document.getElementById(id);

/** state shared by the places. */
const state = {
  photos: [], // in the order added
  selected: null, // key of the photo shown in Measure
  pool: null,
  functions: new Set(),
  units: 'lpmm',
};
let nextKey = 1;

// Automation hooks: the JSON contract of every analysed photo, and the status.
window.sagitta = {
  get results() {
    return { images: state.photos.filter((p) => p.result).map((p) => p.result) };
  },
  // who decoded each measured photo ("browser" or "core"), in the order of results
  get decodedBy() {
    return state.photos.filter((p) => p.result).map((p) => p.decodedBy);
  },
  // the measuring workers' WebAssembly memory, bytes
  workerMemory: () => (state.pool ? state.pool.memory : 0),
};

// The page's status: working while any photo is queued, measured or updated;
// then done when at least one photo was measured (each row's data-state says
// how each photo fared: queued, working, updating, done, error, cancelled);
// error when photos failed and none was measured; ready otherwise.
function setStatus() {
  const ps = state.photos;
  let s = 'ready';
  if (ps.some((p) => p.status === 'queued' || p.status === 'working' || p.status === 'updating')) s = 'working';
  else if (ps.some((p) => p.result)) s = 'done';
  else if (ps.some((p) => p.status === 'error')) s = 'error';
  document.body.dataset.status = s;
  $('queue-head').hidden = ps.length === 0;
  $('first-time').hidden = ps.length > 0;
  document.querySelector('.intake').classList.toggle('compact', ps.length > 0);
  $('cancel-all').hidden = !ps.some((p) => p.job);
  const any = ps.some((p) => p.result);
  for (const id of ['export-json', 'export-csv', 'export-report']) $(id).disabled = !any;
}

function announce(text) {
  $('announce').textContent = text;
}

// ---------------------------------------------------------------- places

function showPlace(name) {
  for (const tab of document.querySelectorAll('[role=tab]')) {
    const on = tab.id === 'tab-' + name;
    tab.setAttribute('aria-selected', String(on));
    tab.tabIndex = on ? 0 : -1;
    $(tab.getAttribute('aria-controls')).hidden = !on;
  }
  if (name === 'compare') renderCompare($('place-compare'), state);
  if (name === 'print') renderPrint($('place-print'), state);
}

function setupTabs() {
  const tabs = [...document.querySelectorAll('[role=tab]')];
  for (const tab of tabs) {
    tab.addEventListener('click', () => showPlace(tab.id.slice(4)));
    tab.addEventListener('keydown', (e) => {
      const visible = tabs.filter((t) => !t.hidden);
      const i = visible.indexOf(tab);
      let j = -1;
      if (e.key === 'ArrowRight') j = (i + 1) % visible.length;
      if (e.key === 'ArrowLeft') j = (i - 1 + visible.length) % visible.length;
      if (j >= 0) {
        e.preventDefault();
        visible[j].focus();
        showPlace(visible[j].id.slice(4));
      }
    });
  }
}

// ---------------------------------------------------------------- intake

function setupIntake() {
  const dz = $('dropzone');
  const input = $('file-input');
  input.addEventListener('change', () => {
    addFiles([...input.files]);
    input.value = '';
  });
  // Photos may be dropped anywhere on the Measure place.
  const place = $('place-measure');
  let depth = 0;
  place.addEventListener('dragenter', (e) => {
    if (!hasFiles(e)) return;
    e.preventDefault();
    depth++;
    dz.classList.add('over');
  });
  place.addEventListener('dragover', (e) => {
    if (!hasFiles(e)) return;
    e.preventDefault();
    e.dataTransfer.dropEffect = 'copy';
  });
  place.addEventListener('dragleave', () => {
    depth = Math.max(0, depth - 1);
    if (depth === 0) dz.classList.remove('over');
  });
  place.addEventListener('drop', (e) => {
    e.preventDefault();
    depth = 0;
    dz.classList.remove('over');
    addFiles([...(e.dataTransfer.files || [])]);
  });
  // A file dropped elsewhere must not make the browser navigate away.
  window.addEventListener('dragover', (e) => e.preventDefault());
  window.addEventListener('drop', (e) => e.preventDefault());
  $('demo-button').addEventListener('click', loadDemo);
  $('cancel-all').addEventListener('click', () => {
    for (const p of state.photos) if (p.job) p.job.cancel();
  });
}

function hasFiles(e) {
  return e.dataTransfer && [...e.dataTransfer.types].includes('Files');
}

// The demo photo is the built-in scenario on a sensor reduced by 2
// (3000 x 2000 px): quick to make and to measure in the page.
const DEMO_REDUCE = 2;

async function loadDemo() {
  const b = $('demo-button');
  b.disabled = true;
  b.textContent = 'Making the demo photo…';
  try {
    const bytes = await (await demoEngine()).call('demo', [DEMO_REDUCE]); // the simulator's own WebAssembly, loaded now
    addFiles([new File([bytes], 'demo-chart.jpg', { type: 'image/jpeg' })]);
  } catch (e) {
    announce('The demo photo could not be made: ' + e.message);
  } finally {
    b.disabled = false;
    b.textContent = 'Try the demo photo';
  }
}

function addFiles(files) {
  const accepted = files;
  for (const file of accepted) {
    const p = {
      key: nextKey++, name: file.name, file, label: '', status: 'queued', stage: 'waiting',
      fraction: 0, result: null, error: '', fileFault: false, thumb: null, preview: null, job: null, settingsKey: '',
      update: null, remeasure: '', remeasureCodes: [], remeasureKey: '',
    };
    state.photos.push(p);
    makeRow(p);
    if (file.size === 0) {
      failed(p, 'the file is empty (0 bytes)', true);
      continue;
    }
    makeThumb(p);
    measure(p);
  }
  if (accepted.length && state.selected == null) select(state.photos[state.photos.length - accepted.length].key);
  if (accepted.length) announce(`${accepted.length} photo${accepted.length > 1 ? 's' : ''} added`);
  setStatus();
}

// ---------------------------------------------------------------- measuring

async function measure(p) {
  const settings = readSettings();
  p.settingsKey = settingsKey(settings);
  p.update = null; // a pending resummary no longer applies
  p.remeasure = p.remeasureKey = '';
  p.remeasureCodes = [];
  p.status = 'queued';
  p.stage = 'waiting';
  p.fraction = 0;
  p.error = '';
  updateRow(p);
  setStatus();
  let bytes;
  try {
    bytes = await p.file.arrayBuffer();
  } catch (e) {
    return failed(p, 'the file could not be read: ' + e.message);
  }
  const tiff = isTIFF(new Uint8Array(bytes, 0, Math.min(4, bytes.byteLength)));
  if (!state.pool) {
    try {
      await started;
    } catch {
      return failed(p, 'the measuring engine did not start in this browser');
    }
  }
  if (!state.photos.includes(p)) return; // removed meanwhile
  p.partial = null;
  const job = state.pool.analyze(p.name, bytes, settings, tiff ? 2048 : 0, (stage, fraction) => {
    if (p.job !== job) return;
    p.status = 'working';
    p.stage = stage;
    p.fraction = fraction;
    updateRow(p);
    setStatus();
    if (stage === 'measuring' && !p.shown && state.selected === p.key) displayBitmap(p); // ready for the first targets
  }, (parts, count) => {
    // Results as they come: the targets measured so far, on the photo.
    if (p.job !== job) return;
    if (!p.partial) p.partial = { records: [], measured: 0, targets: 0, found: [], done: new Set(), frame: count.frame };
    if (count.plan) p.partial.found = foundOutlines(count.plan); // outlined as soon as they are found
    for (const part of parts) {
      p.partial.done.add(part.index);
      if (part.record) p.partial.records.push({ ...part.record, id: part.index });
    }
    p.partial.frame = count.frame;
    p.partial.measured = count.measured;
    p.partial.targets = count.targets;
    updateRow(p);
    if (state.selected === p.key) showSelected();
  });
  p.job = job;
  try {
    const { result, preview, decodedBy } = await job.promise;
    if (p.job !== job) return; // replaced by a newer job
    p.job = null;
    p.partial = null;
    p.shown = null;
    p.decodedBy = decodedBy || 'core';
    p.result = result;
    p.status = 'done';
    if (preview) p.preview = previewCanvas(preview);
    if (tiff && p.preview) drawThumb(p, p.preview);
    updateRow(p);
    if (state.selected === p.key) showSelected();
    if (!$('place-compare').hidden) renderCompare($('place-compare'), state);
    announce(`${p.name}: ${outcome(result)}`);
  } catch (e) {
    if (p.job !== job) return;
    p.job = null;
    p.partial = null; // the row and the panel say why; no targets are drawn
    if (e instanceof AbortError) {
      p.status = 'cancelled';
      updateRow(p);
      if (state.selected === p.key) showSelected();
    } else {
      failed(p, e.message, e.fileFault === true);
    }
  }
  setStatus();
  applySettings();
}

// failed shows why a photo was not measured, in its row and, when it is
// selected, in the result panel. fileFault: the file itself cannot be
// measured, so "Measure again" is not offered.
function failed(p, message, fileFault = false) {
  p.status = 'error';
  p.error = message;
  p.fileFault = fileFault;
  updateRow(p);
  setStatus();
  if (state.selected === p.key) showSelected();
  announce(`${p.name} was not measured: ${sentence(message)}`);
}

// sentence ends a plain line with a full stop.
function sentence(text) {
  return /[.!?]$/.test(text) ? text : text + '.';
}

function isTIFF(b) {
  return b.length === 4 && ((b[0] === 0x49 && b[1] === 0x49 && b[2] === 0x2a && b[3] === 0) || (b[0] === 0x4d && b[1] === 0x4d && b[2] === 0 && b[3] === 0x2a));
}

// previewCanvas turns the worker's grey preview into a canvas.
function previewCanvas(pv) {
  const c = document.createElement('canvas');
  c.width = pv.width;
  c.height = pv.height;
  const ctx = c.getContext('2d');
  const img = ctx.createImageData(pv.width, pv.height);
  for (let i = 0, j = 0; i < pv.pixels.length; i++, j += 4) {
    const v = pv.pixels[i];
    img.data[j] = img.data[j + 1] = img.data[j + 2] = v;
    img.data[j + 3] = 255;
  }
  ctx.putImageData(img, 0, 0);
  c.factor = pv.factor;
  return c;
}

// ---------------------------------------------------------------- photo list

function makeRow(p) {
  const li = document.createElement('li');
  li.className = 'photo';
  li.dataset.key = p.key;
  const thumb = document.createElement('canvas');
  thumb.className = 'thumb';
  thumb.width = 144;
  thumb.height = 96;
  thumb.setAttribute('aria-hidden', 'true');
  const open = document.createElement('button');
  open.type = 'button';
  open.className = 'open';
  open.innerHTML = '<div class="name"></div><div class="meta"></div><div class="state"></div><progress max="1" value="0"></progress>';
  open.addEventListener('click', () => select(p.key));
  const actions = document.createElement('div');
  actions.className = 'row-actions';
  // The buttons are made once and only shown or hidden as the photo's state
  // changes: a button replaced under a held mouse press loses the click.
  const button = (text, f) => {
    const b = document.createElement('button');
    b.type = 'button';
    b.className = 'button small';
    b.textContent = text;
    b.setAttribute('aria-label', `${text} ${p.name}`);
    b.addEventListener('click', f);
    actions.append(b);
    return b;
  };
  const cancel = button('Cancel', () => p.job && p.job.cancel());
  const again = button('Measure again', () => measure(p));
  const removeButton = button('Remove', () => remove(p));
  li.append(thumb, open, actions);
  $('photo-list').append(li);
  p.row = { li, thumb, open, actions, cancel, again, remove: removeButton };
  updateRow(p);
}

// updateRow brings a photo's row up to date in place: texts and attributes
// change, no element is replaced.
function updateRow(p) {
  if (!p.row) return;
  const { li, open, cancel, again } = p.row;
  li.classList.toggle('selected', state.selected === p.key);
  li.dataset.state = p.status;
  setText(open.querySelector('.name'), p.name);
  open.querySelector('.name').title = p.name;
  const ex = p.result && p.result.exif ? p.result.exif : {};
  const meta = [];
  if (ex.f_number) meta.push(fmtFNumber(ex.f_number));
  if (ex.focal_length_mm) meta.push(`${+ex.focal_length_mm.toFixed(1)} mm`);
  if (p.result) meta.push(`${p.result.width} × ${p.result.height} px`);
  setText(open.querySelector('.meta'), meta.join(' · '));
  const st = open.querySelector('.state');
  const bar = open.querySelector('progress');
  st.classList.toggle('error', p.status === 'error');
  bar.hidden = !(p.status === 'queued' || p.status === 'working');
  bar.value = p.fraction;
  let text = '';
  switch (p.status) {
    case 'queued':
      text = 'Waiting for a free worker…';
      bar.removeAttribute('value');
      break;
    case 'working':
      text = p.partial && p.stage === 'measuring' ? `${stageWords(p.stage)}: ${p.partial.measured} of ${p.partial.targets} targets` : stageWords(p.stage) + ` (${Math.round(p.fraction * 100)} %)`;
      break;
    case 'updating':
      text = 'Applying the new settings…';
      break;
    case 'done':
      text = outcome(p.result);
      break;
    case 'error':
      text = 'Not measured: ' + sentence(p.error);
      break;
    case 'cancelled':
      text = 'Cancelled';
      break;
  }
  setText(st, text);
  const label = `${p.name}. ${text}. Show this photo.`;
  if (open.getAttribute('aria-label') !== label) open.setAttribute('aria-label', label);
  const running = p.status === 'queued' || p.status === 'working';
  cancel.hidden = !running;
  again.hidden = running || p.status === 'updating' || (p.status === 'done' && !isStale(p)) || (p.status === 'error' && p.fileFault);
}

// setText changes an element's text only when it differs.
function setText(e, text) {
  if (e.textContent !== text) e.textContent = text;
}

function stageWords(stage) {
  return { reading: 'Reading the file', 'finding targets': 'Finding targets', measuring: 'Measuring edges', summarising: 'Summarising' }[stage] || stage;
}

// Thumbnails are made one at a time: the browser decodes each photo at full
// size first (480 MB for 120 MP), so a dozen at once would hold gigabytes.
let thumbs = Promise.resolve();

function makeThumb(p) {
  thumbs = thumbs.then(async () => {
    if (!state.photos.includes(p)) return; // removed meanwhile
    try {
      const bmp = await bitmap(p.file, { resizeHeight: 96, resizeQuality: 'medium' });
      drawThumb(p, bmp);
      bmp.close();
    } catch {
      // TIFF and anything the browser cannot show: the preview comes with the result.
    }
  });
}

function drawThumb(p, src) {
  const c = p.row.thumb;
  const ctx = c.getContext('2d');
  const s = Math.max(c.width / src.width, c.height / src.height);
  const w = src.width * s;
  const h = src.height * s;
  ctx.drawImage(src, (c.width - w) / 2, (c.height - h) / 2, w, h);
}

/** bitmap decodes a photo for display (as the browser shows it: see turnsPhotos). */
export function bitmap(blob, opts = {}) {
  return createImageBitmap(blob, opts);
}

// A 40 x 20 px JPEG whose Exif orientation (6) says "turn 90 degrees".
const PROBE = '/9j/4QBmRXhpZgAASUkqAAgAAAADABABAgAZAAAAMgAAABIBAwABAAAABgAAAGmHBAABAAAATAAAAAAAAABTYWdpdHRhIFNpbXVsYXRlZCBDYW1lcmEAAAEAAJAHAAQAAAAwMjMwAAAAAP/bAIQACAYGBwYFCAcHBwkJCAoMFA0MCwsMGRITDxQdGh8eHRocHCAkLicgIiwjHBwoNyksMDE0NDQfJzk9ODI8LjM0MgEJCQkMCwwYDQ0YMiEcITIyMjIyMjIyMjIyMjIyMjIyMjIyMjIyMjIyMjIyMjIyMjIyMjIyMjIyMjIyMjIyMjIy/8AACwgAFAAoAQERAP/EANIAAAEFAQEBAQEBAAAAAAAAAAABAgMEBQYHCAkKCxAAAgEDAwIEAwUFBAQAAAF9AQIDAAQRBRIhMUEGE1FhByJxFDKBkaEII0KxwRVS0fAkM2JyggkKFhcYGRolJicoKSo0NTY3ODk6Q0RFRkdISUpTVFVWV1hZWmNkZWZnaGlqc3R1dnd4eXqDhIWGh4iJipKTlJWWl5iZmqKjpKWmp6ipqrKztLW2t7i5usLDxMXGx8jJytLT1NXW19jZ2uHi4+Tl5ufo6erx8vP09fb3+Pn6/9oACAEBAAA/APRYYYreCOGGNIoo1CIiKFVVAwAAOgAp9FFFFFFFFFFFFFf/2Q==';
let turns = null;

/**
 * turnsPhotos resolves to whether this browser turns decoded photos by their
 * Exif orientation (current ones do, whatever createImageBitmap is asked),
 * so that the viewer can turn them back to the pixels the core measured.
 */
export function turnsPhotos() {
  if (!turns) {
    const bytes = Uint8Array.from(atob(PROBE), (c) => c.charCodeAt(0));
    turns = createImageBitmap(new Blob([bytes], { type: 'image/jpeg' })).then((b) => {
      const turned = b.width === 20;
      b.close();
      return turned;
    }, () => true);
  }
  return turns;
}

function remove(p) {
  if (p.job) p.job.cancel();
  state.photos = state.photos.filter((q) => q !== p);
  p.row.li.remove();
  if (state.selected === p.key) {
    state.selected = state.photos.length ? state.photos[0].key : null;
    showSelected();
  }
  setStatus();
}

function select(key) {
  state.selected = key;
  for (const p of state.photos) updateRow(p);
  showSelected();
}

let shownKey = null;
let shownBitmap = null;

async function showSelected() {
  const sec = $('result');
  const p = state.photos.find((q) => q.key === state.selected);
  if (p && !p.result && p.partial) return showPartial(sec, p);
  if (!p || !p.result) {
    sec.hidden = !p;
    if (p) {
      sec.replaceChildren();
      const msg = document.createElement('p');
      msg.className = p.status === 'error' ? 'empty error' : 'empty';
      msg.textContent = p.status === 'error' ? `${p.name} was not measured: ${sentence(p.error)}` :
        p.status === 'cancelled' ? `${p.name} was not measured: measuring it was cancelled.` : `${p.name}: the result appears here when it is measured.`;
      sec.append(msg);
    }
    return;
  }
  sec.hidden = false;
  // Decode the full photo for display (JPEG and PNG); TIFF uses the preview.
  let source = p.preview;
  let factor = p.preview ? p.preview.factor : 1;
  if (!p.preview) {
    if (shownKey === p.key && shownBitmap) source = shownBitmap;
    else {
      try {
        source = await bitmap(p.file);
      } catch {
        source = null;
      }
      if (state.selected !== p.key) {
        if (source) source.close();
        return;
      }
    }
    factor = 1;
  }
  // The browser shows JPEGs turned by their Exif orientation; the core
  // measured the pixels as stored. TIFF previews come from the core as stored.
  const o = (p.result.exif && p.result.exif.orientation) || 1;
  const orientation = !p.preview && o > 1 && (await turnsPhotos()) ? o : 1;
  if (state.selected !== p.key) return;
  renderResult(sec, p, state, { source, factor, orientation });
  // The previous photo's full-size bitmap is released once its viewer is gone.
  if (source !== shownBitmap) {
    if (shownBitmap) shownBitmap.close();
    shownBitmap = source && !p.preview ? source : null;
    shownKey = shownBitmap ? p.key : null;
  }
}

// foundOutlines gives the outline (px) of every target in a photo's plan
// (the core's analyze.Plan), by its index: the edge regions (corners as
// edge.Region.Corners makes them), then the sine patterns (a star as a
// polygon round its disc, a grating by its corners).
function foundOutlines(plan) {
  const out = [];
  const regions = plan.regions || []; // the core writes none as null
  regions.forEach((r, i) => {
    const a = (r.AngleDeg * Math.PI) / 180;
    const [tx, ty, nx, ny] = [Math.cos(a), Math.sin(a), -Math.sin(a), Math.cos(a)];
    const pts = [[-1, -1], [1, -1], [1, 1], [-1, 1]].map(([u, v]) => [r.X + u * r.HalfLen * tx + v * r.HalfWidth * nx, r.Y + u * r.HalfLen * ty + v * r.HalfWidth * ny]);
    out.push({ index: i, pts });
  });
  (plan.patterns || []).forEach((j, k) => {
    let pts = j.corners_px;
    if (j.kind === 'star') {
      const [x, y, rad] = [j.x_px || 0, j.y_px || 0, 1.1 * (j.radius_px || 0)]; // just outside its rim
      pts = Array.from({ length: 24 }, (_, i) => [x + rad * Math.cos((i * Math.PI) / 12), y + rad * Math.sin((i * Math.PI) / 12)]);
    }
    out.push({ index: regions.length + k, pts });
  });
  return out;
}

// displayBitmap decodes a photo for display once, while it is measured (the
// result then reuses it); null for TIFF, which the browser cannot show.
function displayBitmap(p) {
  if (!p.shown) {
    p.shown = (async () => {
      if (isTIFF(new Uint8Array(await p.file.slice(0, 4).arrayBuffer()))) return null;
      try {
        return await bitmap(p.file);
      } catch {
        return null;
      }
    })();
  }
  return p.shown;
}

// showPartial shows a photo being measured: the photo and the targets
// measured so far.
async function showPartial(sec, p) {
  sec.hidden = false;
  const source = await displayBitmap(p);
  if (state.selected !== p.key || p.result || !p.partial) return;
  if (source && source.width === 0) {
    p.shown = null; // closed meanwhile, when another photo was shown
    return showPartial(sec, p);
  }
  if (source && shownBitmap !== source) {
    if (shownBitmap) shownBitmap.close();
    shownBitmap = source;
    shownKey = p.key;
  }
  // As in showSelected: the browser turns a JPEG by its Exif orientation.
  const o = p.partial.frame.orientation || 1;
  const orientation = source && o > 1 && (await turnsPhotos()) ? o : 1;
  if (state.selected !== p.key || p.result || !p.partial) return;
  renderPartial(sec, p, { source, orientation });
  document.body.dataset.shownTargets = String(p.partial.records.length);
}

// ---------------------------------------------------------------- settings

// isStale reports whether a measured photo's settings differ from the
// form's; the fallback sensor does not matter to a photo whose pitch came
// from its Exif.
function isStale(p, s = readSettings()) {
  if (!p.result) return false;
  if (p.settingsKey === settingsKey(s)) return false;
  if (p.result.pitch_from === 'exif' && s.fallback_sensor_mm) {
    const used = JSON.parse(p.settingsKey);
    return settingsKey({ ...s, fallback_sensor_mm: used.fallback_sensor_mm }) !== p.settingsKey;
  }
  return true;
}

// applySettings brings the measured photos to the form's settings. The
// core decides what applies without the photo (analyze.Resummarise: pixel
// size, optical centre and field frequencies only place and summarise what
// was measured) and applies it (quick); what it cannot apply (tone,
// estimator, the optical centre of a photo with sine stars) it answers with
// the codes of its causes, and those photos wait for "Measure all again".
function applySettings() {
  const s = readSettings();
  if (state.functions.has('resummarise')) {
    for (const p of state.photos) {
      const ok = (p.status === 'done' || p.status === 'updating') && isStale(p, s);
      if (ok && p.remeasureKey !== settingsKey(s)) resummarise(p, s);
    }
  }
  refreshStale();
}

// resummarise asks the core for p's result with settings s; a newer
// request, or measuring the photo again, supersedes it.
async function resummarise(p, s) {
  const token = {};
  p.update = token;
  p.remeasure = p.remeasureKey = '';
  p.remeasureCodes = [];
  p.status = 'updating';
  updateRow(p);
  setStatus();
  let r;
  try {
    r = await state.pool.call('resummarise', [JSON.stringify(p.result), JSON.stringify(s)]);
  } catch (e) {
    r = { remeasure: e.message, remeasure_codes: [] };
  }
  if (p.update !== token || !state.photos.includes(p)) return;
  p.update = null;
  p.status = 'done';
  if (r.image) {
    p.result = r.image;
    p.settingsKey = settingsKey(s);
    if (state.selected === p.key) showSelected();
    if (!$('place-compare').hidden) renderCompare($('place-compare'), state);
  } else {
    p.remeasure = r.remeasure; // the core's reason and its codes; asked again only for other settings
    p.remeasureCodes = r.remeasure_codes || [];
    p.remeasureKey = settingsKey(s);
  }
  setStatus();
  refreshStale();
  if (!state.photos.some((q) => q.status === 'updating')) {
    const n = state.photos.filter((q) => q.result && !isStale(q)).length;
    announce(`Settings applied to ${n} photo${n === 1 ? '' : 's'} without measuring again.`);
  }
}

// refreshStale shows which photos wait to be measured again, and why.
function refreshStale() {
  const s = readSettings();
  const waiting = state.photos.filter((p) => p.status === 'done' && isStale(p, s));
  $('stale-bar').hidden = waiting.length === 0;
  if (waiting.length) {
    const why = [];
    // The page words the core's codes (analyze.MeasureAgainError).
    const has = (...codes) => (p) => p.remeasureCodes.some((c) => codes.includes(c));
    const known = has('method-changed', 'tone-changed', 'centre-moved-stars');
    if (waiting.some(has('method-changed', 'tone-changed'))) why.push('the tone and the estimator change how photos are read and measured');
    if (waiting.some(has('centre-moved-stars'))) why.push('sine stars are measured along and across the radius from the optical centre');
    if (waiting.some((p) => p.remeasure && !known(p))) why.push('the new settings could not be applied without measuring');
    if (!why.length) why.push('these settings differ from the ones the photos were measured with');
    const what = waiting.length === 1 ? `${waiting[0].name} again` : `these ${waiting.length} photos again`;
    $('stale-text').textContent = `${why.join('; ').replace(/^./, (c) => c.toUpperCase())}: measure ${what} to apply them.`;
  }
  for (const p of state.photos) updateRow(p);
}

function setupSettings() {
  watchSettings({
    analysis: applySettings,
    units: (u) => {
      state.units = u;
      refreshUnits(state);
    },
  });
  $('remeasure').addEventListener('click', () => {
    for (const p of state.photos) if ((p.status === 'done' && isStale(p)) || (p.status === 'error' && !p.fileFault) || p.status === 'cancelled') measure(p);
  });
}

// ---------------------------------------------------------------- exports

async function exportJSON() {
  const text = await state.pool.call('json', [JSON.stringify(window.sagitta.results)]);
  saveBlob(new Blob([text], { type: 'application/json' }), 'sagitta-results.json');
}

async function exportCSV() {
  const text = await state.pool.call('csv', [JSON.stringify(window.sagitta.results)]);
  saveBlob(new Blob([text], { type: 'text/csv' }), 'sagitta-measurements.csv');
}

async function exportReport() {
  const p = state.photos.find((q) => q.key === state.selected && q.result) || state.photos.find((q) => q.result);
  if (!p) return;
  // The series of the photos ticked in Compare, printed after the photo
  // (compare.js; hidden on screen).
  document.getElementById('report-series')?.remove();
  const series = await seriesReport(state);
  showPlace('measure');
  if (state.selected !== p.key) select(p.key);
  if (series) $('place-measure').append(series);
  const box = document.getElementById('report-settings');
  if (box) box.textContent = settingsSummary(p.result) + ` Printed ${new Date().toLocaleString()}.`;
  setTimeout(() => window.print(), 50);
}

function setupExports() {
  const menu = $('export-menu');
  const wrap = (f) => async () => {
    menu.open = false;
    try {
      await f();
    } catch (e) {
      announce('Export failed: ' + e.message);
    }
  };
  $('export-json').addEventListener('click', wrap(exportJSON));
  $('export-csv').addEventListener('click', wrap(exportCSV));
  $('export-report').addEventListener('click', wrap(exportReport));
  // The single file has nothing to download: it is the offline copy.
  if (document.documentElement.dataset.build === 'single-file') $('offline-link').hidden = true;
}

// ---------------------------------------------------------------- start

let started;

function boot() {
  setupTabs();
  setupIntake();
  setupSettings();
  setupExports();
  setStatus();
  started = engine().then(async (pool) => {
    state.pool = pool;
    state.functions = await pool.warm();
    if (state.functions.has('palette')) setPalette(await pool.call('palette'));
    $('demo-button').hidden = false; // the demo photo has its own WebAssembly, loaded on the first click
    $('tab-print').hidden = !state.functions.has('chart');
    if (state.functions.has('chart')) {
      const b = document.createElement('button');
      b.type = 'button';
      b.className = 'button small';
      b.textContent = 'Make the chart and plan the shot';
      b.addEventListener('click', () => {
        showPlace('print');
        $('tab-print').focus();
      });
      $('step-print').append(' ', b);
    }
    document.body.dataset.engine = 'ready';
  });
  started.catch((e) => {
    document.body.dataset.status = 'error';
    document.body.dataset.engine = 'failed';
    announce('The measuring engine did not start: ' + e.message);
    const p = document.createElement('p');
    p.className = 'notes';
    p.textContent = 'The measuring engine did not start in this browser: ' + e.message;
    $('place-measure').prepend(p);
  });
}

boot();
