// Browser tests of the served page (make run): a dropped photo gives the
// command-line tool's numbers, the page makes no network request and its
// policy blocks one, TIFF, cancelling, broken files, keyboard use, exports.
// The reference for every number is the native command-line tool run on the
// same file (`sagitta analyze --json/--csv`).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import { ROOT, WORK, demoPhoto, testPhoto, cli, recordRequests, dropFiles, waitStatus, waitEngine, diff, shot, download, useServedPage } from './helpers.mjs';

const env = useServedPage();

// csvDiff compares two CSV files of the tool's layout: the same header, rows
// and words, and numbers within one unit of their last decimal. (The page
// writes its CSV from the JSON results, whose numbers the core rounds to 5
// decimals; the tool writes it from the full values, so a value near a
// rounding boundary can differ in its last printed digit.)
function csvDiff(a, b) {
  const la = a.trimEnd().split('\n');
  const lb = b.trimEnd().split('\n');
  if (la.length !== lb.length) return `${la.length} lines != ${lb.length}`;
  if (la[0] !== lb[0]) return `header ${la[0]} != ${lb[0]}`;
  for (let i = 1; i < la.length; i++) {
    const ca = la[i].split(',');
    const cb = lb[i].split(',');
    if (ca.length !== cb.length) return `line ${i}: ${la[i]} != ${lb[i]}`;
    for (let j = 0; j < ca.length; j++) {
      if (ca[j] === cb[j]) continue;
      const d = (ca[j].split('.')[1] || '').length;
      if (!/^-?\d+\.\d+$/.test(ca[j]) || Math.abs(+ca[j] - +cb[j]) > 1.0001 * 10 ** -d) return `line ${i}, column ${j}: ${ca[j]} != ${cb[j]}`;
    }
  }
  return '';
}

async function open(viewport = { width: 1400, height: 1000 }) {
  const context = await env.browser.newContext({ viewport, acceptDownloads: true });
  const requests = recordRequests(context);
  const page = await context.newPage();
  const errors = [];
  page.on('pageerror', (e) => errors.push(e.message));
  const response = await page.goto(env.server.url);
  await waitEngine(page);
  return { context, page, requests, errors, response, loaded: Date.now() };
}

test('a dropped photo gives the command-line tool\'s JSON and CSV, with no network request', async () => {
  const photo = demoPhoto(2);
  const { context, page, requests, errors, response } = await open();
  assert.equal(await page.evaluate(() => document.body.dataset.status), 'ready');
  await shot(page, '01-measure-empty');

  // Every file of the page came from the page's own server, with the policy.
  const csp = response.headers()['content-security-policy'];
  assert.match(csp, /connect-src 'none'/);
  const origin = new URL(env.server.url).origin;
  for (const r of requests.network()) assert.ok(r.url.startsWith(origin + '/'), `request to ${r.url}`);
  const settled = Date.now();

  await dropFiles(page, [photo]);
  assert.equal(await waitStatus(page, ['done', 'error']), 'done');
  const got = await page.evaluate(() => window.sagitta.results);
  const wantText = cli(['--json'], [photo]);
  const want = JSON.parse(wantText);
  assert.equal(got.images.length, 1);
  assert.ok(want.images[0].measurements.length > 50, 'the demo photo has many edges');
  assert.equal(diff(got, want, 1e-6), '');
  await page.waitForTimeout(300);
  await shot(page, '02-measure-result', { fullPage: true });

  // No request of any kind after load (only blob:/data: may appear).
  assert.deepEqual(requests.network(settled).map((r) => r.url), []);

  // The policy blocks a deliberate connection, from the page and from a worker.
  const pageFetch = await page.evaluate(() => fetch(location.origin + '/index.html').then(() => 'connected', (e) => 'blocked: ' + e.message));
  assert.match(pageFetch, /^blocked/);
  const workers = page.workers();
  assert.ok(workers.length >= 1, 'a measuring worker is running');
  const workerFetch = await workers[0].evaluate(() => fetch(self.location.origin + '/index.html').then(() => 'connected', (e) => 'blocked: ' + e.message));
  assert.match(workerFetch, /^blocked/);
  const beacon = await page.evaluate(() => {
    const img = new Image();
    return new Promise((res) => {
      img.onload = () => res('loaded');
      img.onerror = () => res('blocked');
      img.src = 'http://127.0.0.1:9/x.png';
    });
  });
  assert.equal(beacon, 'blocked');

  // Exports: exactly what the command-line tool writes.
  await page.click('#export-menu summary');
  const json = await download(page, () => page.click('#export-json'));
  assert.equal(json.name, 'sagitta-results.json');
  // Same document, laid out as the tool prints it; the last digits of a few
  // numbers may differ, as WebAssembly and amd64 round some math functions
  // differently.
  assert.equal(diff(JSON.parse(json.text), want, 1e-6), '');
  assert.equal(json.text.slice(0, 40), wantText.slice(0, 40));
  assert.equal(json.text.split('\n').length, wantText.split('\n').length);
  await page.click('#export-menu summary');
  const csv = await download(page, () => page.click('#export-csv'));
  assert.equal(csvDiff(csv.text, cli(['--csv'], [photo])), '');

  // A target in detail, by keyboard: Tab into the photo, Enter on a target.
  await page.focus('.viewer-stage');
  await page.keyboard.press('Tab');
  const focused = await page.evaluate(() => document.activeElement.getAttribute('aria-label'));
  assert.match(focused, /^(Edge|Star|Gratings) \d+: (sagittal|tangential|mixed)/);
  await page.focus('.target-edge >> nth=0');
  await page.keyboard.press('Enter');
  await page.waitForSelector('#target-detail svg.plot');
  const plots = await page.$$eval('#target-detail figure', (fs) => fs.map((f) => f.querySelector('caption').textContent));
  assert.deepEqual(plots, ['Edge profile (ESF)', 'Line spread (LSF, the derivative)', 'Response (MTF)']);
  // The reference comes from the core after the first drawing.
  await page.waitForFunction(() => [...document.querySelectorAll('#target-detail figure:last-of-type .legend li')].some((l) => /perfect lens/.test(l.textContent)));
  const mtfLegend = await page.$$eval('#target-detail figure:last-of-type .legend li', (ls) => ls.map((l) => l.textContent));
  assert.ok(mtfLegend.some((t) => /perfect lens at f\/2\.8/.test(t)), 'diffraction reference at the Exif f-number: ' + mtfLegend);
  // Its values: diffraction of a circular pupil, vc = 1/(lambda N) (J. W.
  // Goodman, Introduction to Fourier Optics, 3rd ed., ch. 6), times a square
  // pixel's |sinc| (G. D. Boreman, MTF in Optical and Electro-Optical
  // Systems, ch. 2), 0.55 um light, at the photo's pitch and f-number.
  const refRows = await page.$$eval('#target-detail figure:last-of-type table tbody tr', (trs) => trs.map((tr) => [...tr.cells].map((c) => c.textContent)));
  const targetId = +(await page.textContent('#target-detail h3')).match(/\d+/)[0];
  const shown = got.images[0].measurements.find((m) => m.id === targetId);
  const vc = got.images[0].pitch_um / (0.55 * got.images[0].exif.f_number);
  const perfect = (f) => {
    const x = f / vc;
    const d = x >= 1 ? 0 : (2 / Math.PI) * (Math.acos(x) - x * Math.sqrt(1 - x * x));
    return f === 0 ? d : d * Math.abs(Math.sin(Math.PI * f) / (Math.PI * f));
  };
  assert.ok(refRows.length > 10 && refRows[0].length === 3, 'the MTF table has a perfect-lens column');
  refRows.forEach((row, i) => assert.ok(Math.abs(+row[2] - perfect(shown.freq_cy_px[i])) < 1e-4, `perfect lens at ${shown.freq_cy_px[i]} cy/px: ${row[2]}, want ${perfect(shown.freq_cy_px[i])}`));
  assert.ok(mtfLegend.some((t) => /Nyquist/.test(t)));
  await shot(page.locator('#result'), '03-target-detail');

  // Zoom by wheel and keys.
  const before = await page.textContent('.zoom-label');
  await page.hover('.viewer-stage');
  await page.mouse.wheel(0, -600);
  await page.keyboard.press('+');
  assert.notEqual(await page.textContent('.zoom-label'), before);
  await shot(page.locator('.viewer'), '04-zoomed');

  // The offline copy offered by the served page is the single file.
  const offline = await download(page, () => page.click('#offline-link'));
  assert.equal(offline.name, 'sagitta.html');
  assert.ok(offline.bytes.equals(fs.readFileSync(path.join(ROOT, 'dist/sagitta.html'))));

  // Units: LW/PH relabels the key.
  await page.click('#settings summary');
  await page.selectOption('#units', 'lwph');
  assert.match(await page.textContent('.key'), /LW\/PH/);
  await page.waitForFunction(() => !document.querySelector('[aria-busy="true"]'));

  // Still no request after all that (plots drawn, exports made, the pool
  // grown), except the offline copy the user asked to download and the
  // deliberate image above, which the policy stopped.
  assert.deepEqual(requests.network(settled).map((r) => r.url).filter((u) => !u.endsWith('/sagitta.html') && u !== 'http://127.0.0.1:9/x.png'), []);
  assert.deepEqual(errors, []);
  await context.close();
});

test('a TIFF is measured and shown from the worker\'s preview', async () => {
  const tif = testPhoto('chart-16bit.tif', ['-w', '1800', '-h', '1200', '-f', '8']);
  const { context, page, errors } = await open();
  await page.setInputFiles('#file-input', tif);
  assert.equal(await waitStatus(page, ['done', 'error']), 'done');
  const r = await page.evaluate(() => window.sagitta.results.images[0]);
  assert.equal(r.format, 'tiff');
  assert.equal(r.bit_depth, 16);
  // The file has no Exif: the page assumed its default sensor format, full frame.
  assert.equal(r.pitch_source, 'sensor size');
  assert.equal(r.pitch_assumed, true);
  // The tool is told the same sensor, so it does not call the pitch assumed.
  const tool = JSON.parse(cli(['--json', '--sensor', '36x24'], [tif]));
  tool.images[0].pitch_assumed = true;
  assert.equal(diff({ images: [r] }, tool, 1e-6), '');
  await page.waitForTimeout(300);
  // The viewer shows the picture: its canvas holds both dark and light pixels.
  const spread = await page.evaluate(() => {
    const c = document.querySelector('.viewer-stage canvas');
    const d = c.getContext('2d').getImageData(0, 0, c.width, c.height).data;
    let lo = 255;
    let hi = 0;
    for (let i = 0; i < d.length; i += 4) {
      lo = Math.min(lo, d[i]);
      hi = Math.max(hi, d[i]);
    }
    return hi - lo;
  });
  assert.ok(spread > 100, `viewer canvas spread ${spread}`);
  await shot(page.locator('#result'), '05-tiff');
  assert.deepEqual(errors, []);
  await context.close();
});

test('sine stars and gratings: the tool\'s numbers, drawn as rings and areas, shown in detail', async () => {
  const photo = testPhoto('patterns.jpg', ['-w', '3000', '-h', '2000', '-patterns']);
  const { context, page, errors } = await open();
  await page.setInputFiles('#file-input', photo);
  assert.equal(await waitStatus(page, ['done', 'error']), 'done');
  const got = await page.evaluate(() => window.sagitta.results);
  assert.equal(diff(got, JSON.parse(cli(['--json'], [photo])), 1e-6), '');
  const kinds = got.images[0].measurements.map((m) => m.kind);
  const stars = kinds.filter((k) => k === 'star').length;
  assert.ok(stars >= 1, 'the star was measured');
  assert.equal(await page.locator('.target-star').count(), stars);
  assert.equal(await page.locator('.target-grating').count(), kinds.filter((k) => k === 'grating').length);
  assert.match(await page.textContent('.photo .state'), /\d+ edges, 1 star, \d+ gratings? measured/);
  await page.focus('.target-star >> nth=0');
  await page.keyboard.press('Enter');
  await page.waitForSelector('#target-detail svg.plot');
  assert.match(await page.textContent('#target-detail h3'), /^Star \d+/);
  const captions = await page.$$eval('#target-detail figure caption', (cs) => cs.map((c) => c.textContent));
  assert.deepEqual(captions, ['Response (MTF)'], 'a star has no edge profile');
  await shot(page.locator('#result'), '08-star-detail');
  assert.deepEqual(errors, []);
  await context.close();
});

test('a photo whose Exif says "turn it" is drawn as stored, under its targets', async () => {
  const turned = testPhoto('turned-6.jpg', ['-w', '900', '-h', '600', '-orientation', '6']);
  const { context, page, errors } = await open();
  await page.setInputFiles('#file-input', turned);
  assert.equal(await waitStatus(page, ['done', 'error']), 'done');
  const r = await page.evaluate(() => window.sagitta.results.images[0]);
  assert.equal(r.exif.orientation, 6);
  assert.deepEqual([r.width, r.height], [900, 600]);
  await page.waitForTimeout(300);
  // The photo fills the stored 3:2 frame: no pixel of the viewer's empty
  // background (#2b2f35) inside it. A photo left turned (600 x 900) would
  // leave a third of the frame empty.
  const empty = await page.evaluate(() => {
    const c = document.querySelector('.viewer-stage canvas');
    const d = c.getContext('2d').getImageData(0, 0, c.width, c.height).data;
    let n = 0;
    for (let i = 0; i < d.length; i += 4) if (d[i] === 0x2b && d[i + 1] === 0x2f && d[i + 2] === 0x35) n++;
    return n / (c.width * c.height);
  });
  assert.ok(empty < 0.01, `${(100 * empty).toFixed(1)} % of the frame is empty`);
  await shot(page.locator('.viewer'), '07-turned-photo');
  assert.deepEqual(errors, []);
  await context.close();
});

test('cancelling stops a photo; a broken file is an error; the next photo still works', async () => {
  const big = demoPhoto(1);
  const small = demoPhoto(4);
  const bad = path.join(WORK, 'not-a-photo.jpg');
  fs.copyFileSync(path.join(ROOT, 'testdata/bad/not-an-image.txt'), bad);
  const { context, page, errors } = await open();
  await page.setInputFiles('#file-input', big);
  await page.waitForFunction(() => /Reading|Finding|Measuring/.test(document.querySelector('.photo .state').textContent));
  await page.click('.photo .row-actions button:has-text("Cancel")');
  await page.waitForFunction(() => document.querySelector('.photo .state').textContent === 'Cancelled');
  assert.notEqual(await page.evaluate(() => document.body.dataset.status), 'working');

  await page.setInputFiles('#file-input', bad);
  assert.equal(await waitStatus(page, ['error']), 'error');
  const msg = await page.textContent('.photo:nth-child(2) .state');
  assert.match(msg, /^Not measured: /);

  await page.setInputFiles('#file-input', small);
  await page.waitForFunction(() => window.sagitta.results.images.length === 1, null, { timeout: 120000 });
  await page.waitForFunction(() => document.body.dataset.status !== 'working');
  // The broken file stays listed with its state; the page is done, as a photo was measured.
  assert.equal(await page.evaluate(() => document.body.dataset.status), 'done');
  assert.equal(await page.getAttribute('.photo:nth-child(2)', 'data-state'), 'error');
  // A dead WebAssembly instance (a trap, as on running out of memory) is
  // reported, and a fresh worker measures the next photo.
  // The first worker finds the next photo's targets (pool.js takes the first
  // free worker): its instance is the one that traps.
  let patched = 0;
  for (const w of page.workers()) {
    try {
      await w.evaluate(() => { self.sagittaFind = () => { throw new WebAssembly.RuntimeError('unreachable'); }; });
      patched++;
      break;
    } catch {
      // a worker that was just retired
    }
  }
  assert.ok(patched >= 1);
  await page.setInputFiles('#file-input', small);
  await page.waitForFunction(() => /unreachable/.test(document.querySelector('.photo:nth-child(4) .state').textContent), null, { timeout: 60000 });
  await page.click('.photo:nth-child(4) .row-actions button:has-text("Measure again")');
  await page.waitForFunction(() => window.sagitta.results.images.length === 2, null, { timeout: 120000 });
  await shot(page.locator('#photo-list'), '06-cancel-error-list');
  await page.click('.photo:nth-child(4) .row-actions button:has-text("Remove")');
  await page.click('.photo:nth-child(2) .row-actions button:has-text("Remove")');
  assert.equal(await page.evaluate(() => document.body.dataset.status), 'done');
  assert.deepEqual(errors, []);
  await context.close();
});

test('24 MP JPEG: time from drop to result (measured, not asserted)', async () => {
  const big = demoPhoto(1);
  const { context, page } = await open();
  // The main thread's long tasks (over 50 ms) while the photo is measured.
  await page.evaluate(() => {
    window.longTasks = [];
    new PerformanceObserver((l) => window.longTasks.push(...l.getEntries().map((e) => e.duration))).observe({ type: 'longtask' });
  });
  // When each stage began, from the photo's progress line.
  await page.evaluate(() => {
    window.stages = [];
    new MutationObserver(() => {
      const t = document.querySelector('.photo .state')?.textContent || '';
      const stage = t.replace(/ \(\d+ %\)$/, '');
      if (!window.stages.length || window.stages[window.stages.length - 1][0] !== stage) window.stages.push([stage, performance.now()]);
    }).observe(document.getElementById('photo-list'), { subtree: true, childList: true, characterData: true });
  });
  const t0 = Date.now();
  const p0 = await page.evaluate(() => performance.now());
  await dropFiles(page, [big]);
  assert.equal(await waitStatus(page, ['done', 'error'], 300000), 'done');
  const ms = Date.now() - t0;
  const stages = await page.evaluate((p0) => window.stages.map(([s, t]) => `${s.split(';')[0]} at ${((t - p0) / 1000).toFixed(1)} s`).join(', '), p0);
  console.log('# stages: ' + stages);
  const n = await page.evaluate(() => window.sagitta.results.images[0].measurements.length);
  await page.waitForTimeout(500);
  const longest = await page.evaluate(() => Math.max(0, ...window.longTasks));
  // New field frequencies for the same photo: the core resummarises its
  // result without measuring again.
  await page.click('#settings summary');
  await page.fill('#freq-2', '40');
  await page.evaluate(() => (window.longTasks = []));
  const t1 = Date.now();
  await page.dispatchEvent('#freq-2', 'change');
  await page.waitForFunction(() => document.body.dataset.status === 'done' && window.sagitta.results.images[0].freqs_lp_mm[1] === 40, null, { timeout: 60000, polling: 20 });
  const msResum = Date.now() - t1;
  await page.waitForTimeout(500);
  const longestResum = await page.evaluate(() => Math.max(0, ...window.longTasks));
  const line = `24 MP JPEG (6000 x 4000): ${n} edges, ${ms} ms from drop to result in headless Chromium; longest main-thread task ${Math.round(longest)} ms; ` +
    `new field frequencies applied in ${msResum} ms (longest main-thread task ${Math.round(longestResum)} ms)`;
  fs.writeFileSync(path.join(WORK, 'timing.txt'), line + '\n');
  console.log('# ' + line);
  await context.close();
});
