// Browser tests of changing a setting after photos are measured: a new
// pixel size, optical centre or field frequencies is applied by the core to
// each result without measuring again (sagittaResummarise), and the page
// then holds what the command-line tool gives with those settings; a new
// tone, or a new centre for a photo with sine stars, waits for "Measure all
// again". The reference for every number is the native tool on the same
// file (`sagitta analyze --json`).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { testPhoto, cli, waitStatus, waitEngine, diff, shot, useServedPage } from './helpers.mjs';

const env = useServedPage();

async function open() {
  const context = await env.browser.newContext({ viewport: { width: 1400, height: 1000 } });
  const page = await context.newPage();
  const errors = [];
  page.on('pageerror', (e) => errors.push(e.message));
  await page.goto(env.server.url);
  await waitEngine(page);
  return { context, page, errors };
}

// watch records every text the photo rows show from now on, and counts the
// measurements the workers start (their sagittaFind calls, the first stage of each).
async function watch(page) {
  await page.evaluate(() => {
    window.rowTexts = [];
    new MutationObserver(() => {
      for (const s of document.querySelectorAll('.photo .state')) window.rowTexts.push(s.textContent);
    }).observe(document.getElementById('photo-list'), { subtree: true, childList: true, characterData: true });
  });
  for (const w of page.workers()) {
    await w.evaluate(() => {
      // Every analysis of a photo begins with the core's find stage.
      const find = self.sagittaFind;
      self.analyzeCalls = 0;
      self.sagittaFind = (...args) => {
        self.analyzeCalls++;
        return find(...args);
      };
    });
  }
  return {
    texts: () => page.evaluate(() => window.rowTexts),
    analyses: async () => {
      let n = 0;
      for (const w of page.workers()) n += await w.evaluate(() => self.analyzeCalls ?? 0);
      return n;
    },
    workers: page.workers().length,
  };
}

// set types a value into a settings field and commits it, as leaving the field does.
async function set(page, selector, value) {
  await page.fill(selector, String(value));
  await page.dispatchEvent(selector, 'change');
}

// settled waits until no photo is measured or updated, and returns the
// milliseconds since t0.
async function settled(page, t0) {
  await page.waitForFunction(() => document.body.dataset.status !== 'working', null, { timeout: 120000, polling: 20 });
  return Date.now() - t0;
}

const MEASURING = /Reading the file|Finding targets|Measuring edges|Summarising|Waiting for a free worker/;

test('a new pixel size, optical centre or field frequencies applies at once, with the tool\'s numbers', async () => {
  const photo = testPhoto('grid-1800.jpg', ['-w', '1800', '-h', '1200']);
  const { context, page, errors } = await open();
  await page.setInputFiles('#file-input', photo);
  assert.equal(await waitStatus(page, ['done', 'error']), 'done');
  const measured = await page.evaluate(() => window.sagitta.results);
  assert.equal(diff(measured, JSON.parse(cli(['--json'], [photo])), 1e-6), '');
  assert.equal(measured.images[0].stars.length, 0, 'no sine star in this photo');
  const w = await watch(page);
  await page.click('#settings summary');

  // Field frequencies (the two fields one after the other, as a user types them).
  let t0 = Date.now();
  await set(page, '#freq-1', 20);
  await set(page, '#freq-2', 40);
  const msFreqs = await settled(page, t0);
  let got = await page.evaluate(() => window.sagitta.results);
  assert.deepEqual(got.images[0].freqs_lp_mm, [20, 40]);
  assert.equal(diff(got, JSON.parse(cli(['--json', '--freqs', '20,40'], [photo])), 1e-6), '');

  // Pixel size.
  t0 = Date.now();
  await page.check('input[name="pitch-mode"][value="um"]');
  await set(page, '#pitch-um', 5);
  const msPitch = await settled(page, t0);
  got = await page.evaluate(() => window.sagitta.results);
  assert.equal(got.images[0].pitch_source, 'user');
  assert.equal(diff(got, JSON.parse(cli(['--json', '--freqs', '20,40', '--pitch-um', '5'], [photo])), 1e-6), '');

  // Optical centre.
  t0 = Date.now();
  await set(page, '#centre-x', 950);
  await set(page, '#centre-y', 560);
  const msCentre = await settled(page, t0);
  got = await page.evaluate(() => window.sagitta.results);
  assert.deepEqual(got.images[0].center_px, [950, 560]);
  const want = JSON.parse(cli(['--json', '--freqs', '20,40', '--pitch-um', '5', '--center', '950,560'], [photo]));
  assert.equal(diff(got, want, 1e-6), '');
  assert.notEqual(diff(got, measured, 1e-6), '', 'the settings changed the results');

  // Nothing was measured again: no worker read or measured the photo, and
  // the row showed only the update.
  const texts = await w.texts();
  assert.ok(texts.some((t) => /Applying the new settings/.test(t)), 'the row showed the update');
  assert.deepEqual(texts.filter((t) => MEASURING.test(t)), []);
  assert.equal(await w.analyses(), 0);
  assert.equal(page.workers().length, w.workers, 'no new worker started');
  assert.equal(await page.isHidden('#stale-bar'), true);
  assert.match(await page.textContent('.photo .state'), /edges measured/);
  console.log(`# 1800 x 1200 px, ${got.images[0].measurements.length} edges: new frequencies in ${msFreqs} ms (two changes), pitch in ${msPitch} ms, centre in ${msCentre} ms (two changes)`);
  await page.waitForTimeout(300);
  await shot(page, '30-settings-applied', { fullPage: true });
  assert.deepEqual(errors, []);
  await context.close();
});

test('a new optical centre for a photo with sine stars, or a new tone, waits for "Measure all again"', async () => {
  const photo = testPhoto('patterns.jpg', ['-w', '3000', '-h', '2000', '-patterns']);
  const { context, page, errors } = await open();
  await page.setInputFiles('#file-input', photo);
  assert.equal(await waitStatus(page, ['done', 'error']), 'done');
  const measured = await page.evaluate(() => window.sagitta.results);
  assert.ok(measured.images[0].stars.length >= 1, 'the star was measured');
  const w = await watch(page);
  await page.click('#settings summary');

  // The centre: the core says the star must be measured again; the result stays.
  await set(page, '#centre-x', 1530);
  await set(page, '#centre-y', 980);
  await settled(page, Date.now());
  await page.waitForSelector('#stale-bar', { state: 'visible' });
  assert.match(await page.textContent('#stale-text'), /^Sine stars are measured along and across the radius from the optical centre: measure patterns\.jpg again to apply them\.$/);
  assert.equal(diff(await page.evaluate(() => window.sagitta.results), measured, 0), '');
  assert.equal(await w.analyses(), 0);
  await shot(page.locator('#settings'), '31-settings-measure-again');

  // A new tone as well: the core answers with both causes' codes, and the
  // bar says so; nothing is measured until asked.
  const staleText = (re) => page.waitForFunction((src) => new RegExp(src).test(document.getElementById('stale-text').textContent), re.source);
  await page.selectOption('#tone', 'linear');
  await staleText(/^The tone and the estimator change how photos are read and measured; sine stars/);
  await page.selectOption('#tone', '');
  await staleText(/^Sine stars are measured along and across the radius from the optical centre: measure/);
  assert.doesNotMatch(await page.textContent('#stale-text'), /tone/);
  assert.equal(await w.analyses(), 0);

  // Measured again, the photo has the tool's numbers for the new centre.
  await page.click('#remeasure');
  assert.equal(await waitStatus(page, ['done', 'error']), 'done');
  assert.ok(await w.analyses() >= 1 || page.workers().length > w.workers, 'the photo was measured again');
  const got = await page.evaluate(() => window.sagitta.results);
  assert.equal(diff(got, JSON.parse(cli(['--json', '--center', '1530,980'], [photo])), 1e-6), '');
  assert.equal(await page.isHidden('#stale-bar'), true);

  // Its frequencies then apply at once, stars and gratings included.
  await set(page, '#freq-2', 50);
  await settled(page, Date.now());
  assert.equal(diff(await page.evaluate(() => window.sagitta.results), JSON.parse(cli(['--json', '--center', '1530,980', '--freqs', '10,50'], [photo])), 1e-6), '');
  assert.deepEqual(errors, []);
  await context.close();
});
