// The page's benchmark (run by `make bench`, never by `make test`): chart
// photos of 6, 24 and 50 MP (JPEG q95, the simulated camera's photon and
// read noise, site/testphoto) dropped on the served page in headless
// Chromium, with one worker and with all of them. For each it prints a row
//
//   | page | 24 MP | drop -> first targets / result, all workers | 1.2 s / 2.3 s | - | 410 MB workers |
//
// in the columns of `make bench`'s native table (where, photo, stage, time,
// allocated, peak): first: drop -> the first measured targets drawn on the
// photo; result: drop -> the whole result (status "done"); the last column
// is the workers' WebAssembly memory after the run (their largest memory,
// summed); a photo
// the page cannot measure gets its row's sentence instead. Times are
// printed, never asserted. SAGITTA_BENCH_MP=6,24 picks sizes;
// SAGITTA_BENCH_DECODER=core|browser who decodes the JPEGs (the page's
// own choice by default).

import fs from 'node:fs';
import path from 'node:path';
import { testPhoto, startServer, launch, waitEngine } from './helpers.mjs';

const SIZES = { 6: [3000, 2000], 24: [6000, 4000], 50: [8660, 5774] };
const wanted = (process.env.SAGITTA_BENCH_MP || '6,24,50').split(',').map(Number);
const DECODER = process.env.SAGITTA_BENCH_DECODER || ''; // "core" or "browser": the page's ?decoder=

const server = await startServer();
const browser = await launch();
try {
  for (const mp of wanted) {
    const [w, h] = SIZES[mp];
    const file = testPhoto(`bench-${mp}mp.jpg`, ['-chart', '-w', String(w), '-h', String(h)]);
    for (const workers of [1, 0]) {
      const label = workers === 1 ? '1 worker' : 'all workers';
      const r = await once(file, workers);
      if (r.error) {
        console.log(`| page | ${mp} MP | drop -> result, ${label} | not measured: ${r.error} | - | - |`);
        continue;
      }
      console.log(`| page | ${mp} MP | drop -> first targets / result, ${label} | ${sec(r.first)} / ${sec(r.full)} | - | ${Math.round(r.memory / 2 ** 20)} MB workers |`);
      console.error(`${mp} MP, ${label}: targets found after ${sec(r.found)}`);
    }
  }
} finally {
  await browser.close();
  server.stop();
}

// once measures one drop in a fresh page; workers 1 limits the pool to one
// worker (the page sizes its pool from navigator.hardwareConcurrency), 0
// leaves the page's own choice.
async function once(file, workers) {
  const context = await browser.newContext();
  if (workers > 0) await context.addInitScript((n) => Object.defineProperty(navigator, 'hardwareConcurrency', { get: () => n }), workers);
  const page = await context.newPage();
  await page.goto(server.url + (DECODER ? `?decoder=${DECODER}` : ''));
  await waitEngine(page);
  await page.evaluate(() => {
    window.benchT = { first: 0, full: 0, found: 0 };
    const t0 = () => window.benchT.t0;
    const watch = () => {
      const now = performance.now();
      if (!window.benchT.first && Number(document.body.dataset.shownTargets || 0) > 0) window.benchT.first = now - t0();
      const row = document.querySelector('.photo .state');
      if (!window.benchT.found && row && /^Measuring edges/.test(row.textContent)) window.benchT.found = now - t0();
      if (!window.benchT.full && document.body.dataset.status === 'done') window.benchT.full = now - t0();
      if (!window.benchT.full) requestAnimationFrame(watch);
    };
    window.benchWatch = watch;
  });
  await drop(page, file);
  await page.waitForFunction(() => window.benchT.full > 0 || document.body.dataset.status === 'error', null, { timeout: 300000, polling: 50 });
  const r = await page.evaluate(() => ({ ...window.benchT, status: document.body.dataset.status, memory: window.sagitta.workerMemory ? window.sagitta.workerMemory() : 0 }));
  if (r.status !== 'done') r.error = await page.evaluate(() => document.querySelector('.photo .state').textContent);
  if (!r.first) r.first = r.full; // a page that shows nothing before the end
  await context.close();
  return r;
}

function sec(ms) {
  return (ms / 1000).toFixed(1) + ' s';
}

// drop builds the file in the page, then starts the clock and drops it (the
// transfer of the test's bytes into the page is not timed).
async function drop(page, file) {
  await page.evaluate(
    ({ name, b64 }) => {
      const bin = atob(b64);
      const u8 = new Uint8Array(bin.length);
      for (let i = 0; i < bin.length; i++) u8[i] = bin.charCodeAt(i);
      const dt = new DataTransfer();
      dt.items.add(new File([u8], name, { type: 'image/jpeg' }));
      const dz = document.getElementById('dropzone');
      window.benchT.t0 = performance.now();
      requestAnimationFrame(window.benchWatch);
      for (const type of ['dragenter', 'dragover', 'drop']) dz.dispatchEvent(new DragEvent(type, { dataTransfer: dt, bubbles: true, cancelable: true }));
    },
    { name: path.basename(file), b64: fs.readFileSync(file).toString('base64') },
  );
}
