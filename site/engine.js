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
// (<script type="text/plain">).

import { Pool, poolSize } from './pool.js';

let enginePromise = null;

/** engine returns the shared Pool, starting it on first use. */
export function engine() {
  if (!enginePromise) enginePromise = start();
  return enginePromise;
}

async function start() {
  const [b64, workerText] = await Promise.all([compressedCore(), workerSource()]);
  const gz = base64Bytes(b64);
  const stream = new Blob([gz]).stream().pipeThrough(new DecompressionStream('gzip'));
  const bytes = await new Response(stream).arrayBuffer();
  const module = await WebAssembly.compile(bytes);
  const url = URL.createObjectURL(new Blob([workerText], { type: 'text/javascript' }));
  return new Pool({ module, spawn: () => new Worker(url), size: poolSize() });
}

// compressedCore returns the base64 text of the gzip-compressed core.
async function compressedCore() {
  const block = document.getElementById('core-wasm-gzip');
  if (block) return block.textContent.trim();
  if (!self.sagittaCoreGzip) await loadScript('sagitta-wasm.js');
  return self.sagittaCoreGzip;
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
    s.onerror = () => reject(new Error(`the measuring engine (${src}) is missing; run "make wasm"`));
    document.head.append(s);
  });
}

function base64Bytes(b64) {
  const bin = atob(b64);
  const out = new Uint8Array(bin.length);
  for (let i = 0; i < bin.length; i++) out[i] = bin.charCodeAt(i);
  return out;
}
