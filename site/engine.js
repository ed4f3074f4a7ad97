// Starting the measuring engine: the core's WebAssembly, kept as base64 of
// its gzip, is decompressed in the page (DecompressionStream; no fetch, which
// the page's Content-Security-Policy forbids), compiled once, and shared
// with a pool of workers.
//
// Served by `make run`, the compressed core comes from sagitta-wasm.js (a
// script, allowed by script-src 'self') and the workers from worker.js. In
// the single-file page both are inline data blocks (<script type="text/plain">)
// and the workers start from a Blob URL, which inherits the page's policy.

import { Pool, poolSize } from './pool.js';

let enginePromise = null;

/** engine returns the shared Pool, starting it on first use. */
export function engine() {
  if (!enginePromise) enginePromise = start();
  return enginePromise;
}

async function start() {
  const b64 = await compressedCore();
  const gz = base64Bytes(b64);
  const stream = new Blob([gz]).stream().pipeThrough(new DecompressionStream('gzip'));
  const bytes = await new Response(stream).arrayBuffer();
  const module = await WebAssembly.compile(bytes);
  return new Pool({ module, spawn: workerSpawner(), size: poolSize() });
}

// compressedCore returns the base64 text of the gzip-compressed core.
async function compressedCore() {
  const block = document.getElementById('core-wasm-gzip');
  if (block) return block.textContent.trim();
  if (!self.sagittaCoreGzip) {
    await new Promise((resolve, reject) => {
      const s = document.createElement('script');
      s.src = 'sagitta-wasm.js';
      s.onload = resolve;
      s.onerror = () => reject(new Error('the measuring engine (sagitta-wasm.js) is missing; run "make wasm"'));
      document.head.append(s);
    });
  }
  return self.sagittaCoreGzip;
}

// workerSpawner returns a function that starts one worker.
function workerSpawner() {
  const block = document.getElementById('worker-source');
  if (!block) return () => new Worker('worker.js');
  const url = URL.createObjectURL(new Blob([block.textContent], { type: 'text/javascript' }));
  return () => new Worker(url);
}

function base64Bytes(b64) {
  const bin = atob(b64);
  const out = new Uint8Array(bin.length);
  for (let i = 0; i < bin.length; i++) out[i] = bin.charCodeAt(i);
  return out;
}
