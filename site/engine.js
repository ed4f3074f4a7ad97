// Starting the measuring engine: the core's WebAssembly, kept as base64 of
// its gzip, is decompressed in the page (DecompressionStream; no fetch, which
// the page's Content-Security-Policy forbids), compiled once, and shared
// with a pool of workers.
//
// Workers always start from a Blob URL holding wasm_exec.js and worker.js,
// which inherits the page's policy and needs no request when the pool grows
// or replaces a worker. Served by `make run`, the compressed core and the
// worker's source come from two scripts, sagitta-wasm.js and
// sagitta-worker.js (allowed by script-src 'self'), loaded when the engine
// starts; in the single-file page both are inline data blocks
// (<script type="text/plain">). The demo photo's simulator is a second,
// separate WebAssembly (sagitta-demo-wasm.js, or the block demo-wasm-gzip),
// loaded the same way only when the user asks for the demo.

import { Pool, poolSize } from './pool.js';

let enginePromise = null;
let demoModule = null;

/** engine returns the shared Pool, starting it on first use. */
export function engine() {
  if (!enginePromise) enginePromise = start();
  return enginePromise;
}

async function start() {
  const [module, url] = await Promise.all([compile(compressed('core-wasm-gzip', 'sagitta-wasm.js', 'sagittaCoreGzip')), workerURL()]);
  // ?decoder=browser lets the browser decode JPEG and 8-bit PNG (the core
  // decodes every photo by default; ?decoder=core says so explicitly): for
  // the decoders' comparison and the benchmark.
  const decoder = new URLSearchParams(location.search).get('decoder');
  return new Pool({ module, spawn: () => new Worker(url), size: poolSize(), ...(decoder === 'core' || decoder === 'browser' ? { decoder } : {}) });
}

/**
 * demoEngine starts a pool of one worker running the demo photo's own
 * WebAssembly (wasm/demo: the simulator, kept out of the measuring engine),
 * loaded only now; the worker stops a second after its last job.
 */
export async function demoEngine() {
  if (!demoModule) demoModule = compile(compressed('demo-wasm-gzip', 'sagitta-demo-wasm.js', 'sagittaDemoGzip'));
  const [module, url] = await Promise.all([demoModule, workerURL()]);
  return new Pool({ module, spawn: () => new Worker(url), size: 1, idleMs: 1000 });
}

// compile decompresses and compiles the base64 of a gzip-compressed
// WebAssembly module.
async function compile(b64Promise) {
  const gz = base64Bytes(await b64Promise);
  const stream = new Blob([gz]).stream().pipeThrough(new DecompressionStream('gzip'));
  return WebAssembly.compile(await new Response(stream).arrayBuffer());
}

let urlPromise = null;

// workerURL returns the Blob URL every worker starts from.
function workerURL() {
  if (!urlPromise) urlPromise = workerSource().then((text) => URL.createObjectURL(new Blob([text], { type: 'text/javascript' })));
  return urlPromise;
}

// compressed returns the base64 text of a gzip-compressed module: the
// single-file page's data block of that id, else the served page's script
// that sets self[global].
async function compressed(blockId, script, global) {
  const block = document.getElementById(blockId);
  if (block) return block.textContent.trim();
  if (!self[global]) await loadScript(script);
  return self[global];
}

// workerSource returns the worker's text (wasm_exec.js, then worker.js).
async function workerSource() {
  const block = document.getElementById('worker-source');
  if (block) return block.textContent;
  if (!self.sagittaWorkerSource) await loadScript('sagitta-worker.js');
  return self.sagittaWorkerSource;
}

function loadScript(src) {
  return new Promise((resolve, reject) => {
    const s = document.createElement('script');
    s.src = src;
    s.onload = resolve;
    s.onerror = () => reject(new Error(`${src} is missing; run "make wasm"`));
    document.head.append(s);
  });
}

function base64Bytes(b64) {
  const bin = atob(b64);
  const out = new Uint8Array(bin.length);
  for (let i = 0; i < bin.length; i++) out[i] = bin.charCodeAt(i);
  return out;
}
