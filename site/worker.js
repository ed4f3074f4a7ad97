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

self.onmessage = async (ev) => {
  const msg = ev.data;
  if (msg.type === 'init') {
    started = start(msg.module);
    try {
      await started;
      const names = self.sagittaFunctions || {};
      const functions = Object.keys(CALLS).filter((k) => typeof self[names[k]] === 'function');
      self.postMessage({ type: 'ready', functions });
    } catch (e) {
      self.postMessage({ type: 'error', id: 0, message: 'the measuring engine did not start: ' + text(e), fatal: true });
    }
    return;
  }
  try {
    if (!started) throw new Error('worker used before init');
    await started;
    if (msg.type === 'analyze') analyze(msg);
    else if (msg.type === 'call') call(msg);
    else throw new Error(`unknown message type "${msg.type}"`);
  } catch (e) {
    self.postMessage({ type: 'error', id: msg.id, message: text(e), fatal: isDead(e), fileFault: !!(e && e.fileFault === true), memory: memory() });
  }
};

async function start(module) {
  go = new self.Go();
  instance = await WebAssembly.instantiate(module, go.importObject);
  go.run(instance); // resolves only when the Go program exits
  if (!self.sagittaReady) throw new Error('the core did not register its functions');
}

function analyze(msg) {
  const bytes = new Uint8Array(msg.bytes);
  let last = 0;
  const progress = (stage, fraction) => {
    const now = Date.now();
    if (fraction < 1 && now - last < 60) return; // at most ~16 messages a second
    last = now;
    self.postMessage({ type: 'progress', id: msg.id, stage, fraction });
  };
  const json = check(self.sagittaAnalyze(msg.name, bytes, msg.settings, progress));
  const result = JSON.parse(json);
  let preview = null;
  const transfer = [];
  if (msg.previewSide > 0) {
    const settings = JSON.parse(msg.settings || '{}');
    try {
      preview = check(self.sagittaPreview(bytes, msg.previewSide, settings.tone || ''));
      transfer.push(preview.pixels.buffer);
    } catch (e) {
      preview = null; // the analysis stands; only the picture is missing
    }
  }
  self.postMessage({ type: 'result', id: msg.id, result, preview, memory: memory() }, transfer);
}

function call(msg) {
  const f = CALLS[msg.fn];
  if (!f) throw new Error(`unknown core function "${msg.fn}"`);
  const { result, transfer = [] } = f(...(msg.args || []));
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
