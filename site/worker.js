// A measuring worker: one instance of Sagitta's Go core (WebAssembly) that
// runs one job at a time. The messages are described in protocol.js.
//
// This is a classic worker script. It runs from a Blob that holds Go's
// wasm_exec.js in front of this file (see engine.js and site/pack).
'use strict';

// The core's functions reachable through a "call" message, by name. Each
// takes the message's args and returns {result, transfer}.
const CALLS = {
  csv: (results) => ({ result: core('csv')(results) }),
  json: (results) => ({ result: core('json')(results) }),
  plot: (kind, data, options) => {
    const r = core('plot')(kind, data, options);
    return { result: r, transfer: r.png ? [r.png.buffer] : [] };
  },
  palette: () => ({ result: core('palette')() }),
  chart: (options, format) => bytesOut(core('chart')(options, format)),
  plan: (options) => ({ result: core('plan')(options) }),
  demo: (reduce) => bytesOut(core('demo')(reduce)),
  resummarise: (image, settings) => {
    const r = core('resummarise')(image, settings);
    return { result: r.image ? { image: JSON.parse(r.image) } : { remeasure: r.remeasure, remeasure_codes: Array.from(r.remeasure_codes || []) } };
  },
  reference: (args) => ({ result: JSON.parse(core('reference')(JSON.stringify(args))) }),
  series: (kind, images, options) => ({ result: JSON.parse(core('series')(kind, images, options)) }),
  decoders: async (bytes) => {
    const u8 = new Uint8Array(bytes);
    const px = await browserPixels(u8);
    if (!px) return { result: null }; // the core decodes this file itself
    return { result: core('decoders')(u8, px.data, px.width, px.height) };
  },
};
// The core's global behind each call comes from the core itself
// (sagittaFunctions, the one list in wasm/functions.go; a Go test checks
// this table against it).

let started = null; // promise of the running Go instance
let go = null;
let instance = null;

// memory is the size of the core's WebAssembly memory, bytes (it only grows).
function memory() {
  try {
    return instance ? instance.exports.mem.buffer.byteLength : 0;
  } catch {
    return 0;
  }
}

// Messages run one after another, in the order they came (a photo's
// decoding by the browser is asynchronous).
let queue = Promise.resolve();

self.onmessage = (ev) => {
  const msg = ev.data;
  if (msg.type === 'init') {
    started = start(msg.module);
    started.then(
      () => {
        const names = self.sagittaFunctions || {};
        const functions = Object.keys(CALLS).filter((k) => typeof self[names[k]] === 'function');
        self.postMessage({ type: 'ready', functions });
      },
      (e) => self.postMessage({ type: 'error', id: 0, message: 'the measuring engine did not start: ' + text(e), fatal: true }),
    );
    return;
  }
  queue = queue.then(() => handle(msg));
};

async function handle(msg) {
  try {
    if (!started) throw new Error('worker used before init');
    await started;
    const run = HANDLERS[msg.type];
    if (!run) throw new Error(`unknown message type "${msg.type}"`);
    await run(msg);
  } catch (e) {
    try {
      if (msg.id && self.sagittaRelease) self.sagittaRelease(msg.id); // the photo, if any, is dropped
    } catch {
      // the Go program has stopped: nothing to drop
    }
    held.delete(msg.id);
    self.postMessage({ type: 'error', id: msg.id, message: text(e), fatal: isDead(e), fileFault: !!(e && e.fileFault === true), memory: memory() });
  }
}

const HANDLERS = { analyze: find, call, prepare, measure, finish, release };

async function start(module) {
  go = new self.Go();
  instance = await WebAssembly.instantiate(module, go.importObject);
  go.run(instance); // resolves only when the Go program exits
  if (!self.sagittaReady) throw new Error('the core did not register its functions');
}

// held: what this worker keeps of the photos it finds (by job id) until
// they are finished: the file for a preview, and who decoded it.
const held = new Map();

// find (an "analyze" message) runs the first stage of one photo (decode, chart, patterns,
// candidates) and keeps it for measuring and finishing.
async function find(msg) {
  const bytes = new Uint8Array(msg.bytes);
  const px = msg.decoder === 'core' ? null : await browserPixels(bytes);
  let last = 0;
  const progress = (stage, fraction) => {
    const now = Date.now();
    if (fraction < 1 && now - last < 60) return;
    last = now;
    self.postMessage({ type: 'progress', id: msg.id, stage, fraction });
  };
  const r = check(self.sagittaFind(msg.id, msg.name, bytes, px && px.data, px ? px.width : 0, px ? px.height : 0, msg.settings, progress));
  const decodedBy = px ? 'browser' : 'core';
  held.set(msg.id, { bytes: msg.previewSide > 0 ? bytes : null, previewSide: msg.previewSide, settings: msg.settings, decodedBy });
  self.postMessage({ type: 'found', id: msg.id, targets: r.targets, plan: r.plan, width: r.width, height: r.height, orientation: r.orientation, decodedBy, memory: memory() });
}

// prepare decodes a photo that another worker finds, to measure some of
// its candidates here.
async function prepare(msg) {
  const bytes = new Uint8Array(msg.bytes);
  const px = msg.decoder === 'core' ? null : await browserPixels(bytes);
  check(self.sagittaPrepare(msg.id, msg.name, bytes, px && px.data, px ? px.width : 0, px ? px.height : 0, msg.settings));
  self.postMessage({ type: 'prepared', id: msg.id, decodedBy: px ? 'browser' : 'core', memory: memory() });
}

// measure measures the candidates lo..hi-1 of a photo found or prepared
// here (a prepared one gets the finder's plan with its first range).
function measure(msg) {
  if (msg.plan) check(self.sagittaUse(msg.id, msg.plan));
  const parts = check(self.sagittaMeasure(msg.id, msg.lo, msg.hi));
  self.postMessage({ type: 'measured', id: msg.id, lo: msg.lo, hi: msg.hi, parts, memory: memory() });
}

// finish merges every candidate's part and summarises the photo.
function finish(msg) {
  const h = held.get(msg.id) || {};
  held.delete(msg.id);
  // The analysis goes to the page as the core's JSON text, parsed there:
  // copying a string between threads is cheaper than cloning the object
  // (7 MB of JSON for a 24 MP chart photo).
  const resultJSON = check(self.sagittaFinish(msg.id, msg.parts));
  let preview = null;
  const transfer = [];
  if (h.previewSide > 0 && h.bytes) {
    const settings = JSON.parse(h.settings || '{}');
    try {
      preview = check(self.sagittaPreview(h.bytes, h.previewSide, settings.tone || ''));
      transfer.push(preview.pixels.buffer);
    } catch (e) {
      preview = null; // the analysis stands; only the picture is missing
    }
  }
  self.postMessage({ type: 'result', id: msg.id, resultJSON, preview, decodedBy: h.decodedBy, memory: memory() }, transfer);
}

// release drops a photo this worker holds.
function release(msg) {
  held.delete(msg.id);
  check(self.sagittaRelease(msg.id));
}

// browserPixels decodes a JPEG or 8-bit PNG with the browser's own decoder,
// colour values as stored (no colour management, no premultiplication) and
// its Exif orientation not applied (the core lets only files without one
// come this way), and returns its RGBA bytes; null when the core decodes
// the file itself: a file the core keeps for its own decoders (16-bit PNG,
// TIFF, CMYK JPEG, DNG, ...; sagittaDecodable) or one the browser declines.
async function browserPixels(bytes) {
  if (check(self.sagittaDecodable(bytes)) !== true) return null;
  let bmp = null;
  try {
    bmp = await createImageBitmap(new Blob([bytes]), { colorSpaceConversion: 'none', premultiplyAlpha: 'none', imageOrientation: 'from-image' });
    const { width, height } = bmp;
    const ctx = new OffscreenCanvas(width, height).getContext('2d', { willReadFrequently: true });
    ctx.drawImage(bmp, 0, 0);
    const data = ctx.getImageData(0, 0, width, height).data;
    return { data: new Uint8Array(data.buffer, data.byteOffset, data.byteLength), width, height };
  } catch {
    return null; // the browser declined it: the core decodes it, silently
  } finally {
    if (bmp) bmp.close();
  }
}

async function call(msg) {
  const f = CALLS[msg.fn];
  if (!f) throw new Error(`unknown core function "${msg.fn}"`);
  const { result, transfer = [] } = await f(...(msg.args || []));
  self.postMessage({ type: 'result', id: msg.id, result, preview: null }, transfer);
}

// core returns the core's function behind a call name, checking that this
// build has it.
function core(call) {
  const f = self[(self.sagittaFunctions || {})[call]];
  if (typeof f !== 'function') throw new Error(`this build of the core has no function "${call}"`);
  return (...args) => check(f(...args));
}

// bytesOut wraps a Uint8Array result for transfer.
function bytesOut(u8) {
  return { result: u8, transfer: [u8.buffer] };
}

// check turns an Error returned by the Go glue into a thrown one.
function check(v) {
  if (v instanceof Error) throw v;
  return v;
}

// isDead reports whether the Go program has stopped (a runtime fatal error)
// or its memory is in an unknown state (a WebAssembly trap, out of memory):
// the worker can do nothing more and must be replaced.
function isDead(e) {
  return !go || go.exited === true || e instanceof WebAssembly.RuntimeError || e instanceof RangeError;
}

function text(e) {
  const m = e && e.message ? e.message : String(e);
  return m.split('\n')[0];
}
