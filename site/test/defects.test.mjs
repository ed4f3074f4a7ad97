// Browser tests of the page driven as a person drives it (issue 17): real
// mouse presses held while the row updates, bad and odd files, a long Exif
// text, and many large photos at once.

import { test } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import { ROOT, WORK, demoPhoto, testPhoto, dropFiles, waitStatus, waitEngine, shot, useServedPage, sampleRSS } from './helpers.mjs';
import { png, bigFlatPNG, exifBlock, withExif, write } from './files.mjs';

const env = useServedPage();

async function open(viewport = { width: 1400, height: 1000 }) {
  const context = await env.browser.newContext({ viewport });
  const page = await context.newPage();
  const errors = [];
  page.on('pageerror', (e) => errors.push(e.message));
  await page.goto(env.server.url);
  await waitEngine(page);
  return { context, page, errors };
}

// press holds the mouse button for ms on the row button with this text, as a
// person clicks.
async function press(page, text, ms = 150) {
  const box = await page.evaluate((t) => {
    const b = [...document.querySelectorAll('.photo .row-actions button')].find((x) => x.textContent === t && !x.hidden);
    const r = b.getBoundingClientRect();
    return { x: r.x, y: r.y, width: r.width, height: r.height };
  }, text);
  await page.mouse.move(box.x + box.width / 2, box.y + box.height / 2);
  await page.mouse.down();
  await page.waitForTimeout(ms);
  await page.mouse.up();
}

const rowState = (page, n = 1) => page.textContent(`.photo:nth-child(${n}) .state`);
const PREFIX = /\b(decode|analyze|field|exif|edge|settings):/;

test('1: a held press on "Cancel" while progress arrives cancels; the button stays the same element', async () => {
  const { context, page, errors } = await open();
  await dropFiles(page, [demoPhoto(1)]);
  await page.waitForFunction(() => /Measuring edges/.test(document.querySelector('.photo .state').textContent), null, { timeout: 120000 });
  await page.evaluate(() => {
    window.cancelButton = document.querySelector('.photo .row-actions button');
    window.progressSeen = 0;
    new MutationObserver(() => window.progressSeen++).observe(document.querySelector('.photo .state'), { childList: true, characterData: true, subtree: true });
  });
  await press(page, 'Cancel', 150);
  await page.waitForFunction(() => document.querySelector('.photo .state').textContent === 'Cancelled', null, { timeout: 5000 });
  const seen = await page.evaluate(() => window.progressSeen);
  assert.ok(seen >= 1, `progress arrived during the press (${seen} updates)`);
  assert.deepEqual(errors, []);
  await context.close();
});

test('1: the row\'s buttons stay the same elements while progress arrives', async () => {
  const { context, page } = await open();
  await dropFiles(page, [demoPhoto(1)]);
  await page.waitForFunction(() => /Finding|Measuring/.test(document.querySelector('.photo .state').textContent), null, { timeout: 120000 });
  await page.evaluate(() => (window.firstButton = document.querySelector('.photo .row-actions button')));
  await shot(page.locator('#photo-list'), '17-row-progress');
  const before = await page.textContent('.photo .state');
  await page.waitForFunction((t) => document.querySelector('.photo .state').textContent !== t, before, { timeout: 30000 });
  assert.ok(await page.evaluate(() => document.querySelector('.photo .row-actions button') === window.firstButton), 'the Cancel button was replaced');
  await page.click('.photo .row-actions button:has-text("Cancel")');
  await context.close();
});

test('1: the first held press on "Remove" after a settings change removes the photo', async () => {
  const { context, page, errors } = await open();
  await dropFiles(page, [demoPhoto(4)]);
  assert.equal(await waitStatus(page, ['done', 'error']), 'done');
  await page.click('#settings summary');
  await page.click('#freq-2', { clickCount: 3 });
  await page.keyboard.type('40');
  // The press itself moves the focus away from the field: its change applies
  // the new settings while the button is held.
  await press(page, 'Remove', 150);
  await page.waitForFunction(() => document.querySelectorAll('.photo').length === 0, null, { timeout: 3000 });
  assert.deepEqual(errors, []);
  await context.close();
});

test('2, 6: a failed photo shows its one plain sentence in the result panel; no "Measure again" for a file that cannot be read', async () => {
  const bad = path.join(WORK, 'not-a-photo.jpg');
  fs.copyFileSync(path.join(ROOT, 'testdata/bad/not-an-image.txt'), bad);
  const { context, page, errors } = await open();
  await dropFiles(page, [bad]);
  assert.equal(await waitStatus(page, ['done', 'error']), 'error');
  const row = await rowState(page);
  const panel = await page.textContent('#result');
  assert.match(row, /^Not measured: the file cannot be read as a photo \(not a PNG, JPEG or TIFF image\)\.$/);
  assert.doesNotMatch(row, PREFIX);
  assert.match(panel, /not-a-photo\.jpg was not measured: the file cannot be read as a photo/);
  assert.doesNotMatch(panel, /appears here when it is measured/);
  assert.doesNotMatch(panel, PREFIX);
  const buttons = await page.$$eval('.photo .row-actions button', (bs) => bs.filter((b) => !b.hidden).map((b) => b.textContent));
  assert.deepEqual(buttons, ['Remove']);
  assert.equal(await page.getAttribute('.photo', 'data-state'), 'error');
  await shot(page, '17-failed-photo', { fullPage: true });
  assert.deepEqual(errors, []);
  await context.close();
});

test('3: a zero-byte file gets a row with one sentence', async () => {
  const empty = write('empty.jpg', Buffer.alloc(0));
  const { context, page } = await open();
  await dropFiles(page, [empty]);
  await page.waitForSelector('.photo', { timeout: 5000 });
  assert.match(await rowState(page), /^Not measured: the file is empty \(0 bytes\)\.$/);
  assert.equal(await page.evaluate(() => document.body.dataset.status), 'error');
  await context.close();
});

test('4: a 1 x 1 photo is too small to measure', async () => {
  const dot = write('dot.png', png(1, 1));
  const { context, page } = await open();
  await page.click('input[name=pitch-mode][value=sensor]');
  await dropFiles(page, [dot]);
  assert.equal(await waitStatus(page, ['done', 'error']), 'error');
  assert.equal(await rowState(page), 'Not measured: the photo is 1 x 1 px, too small to measure (each side needs at least 32 px).');
  await context.close();
});

test('5: a 60,000-character lens name does not widen the page', async () => {
  const base = fs.readFileSync(testPhoto('lens-base.jpg', ['-w', '900', '-h', '600']));
  const long = 'L'.repeat(60000);
  const photo = write('long-lens.jpg', withExif(base, exifBlock({ lens: long })));
  const { context, page, errors } = await open();
  await dropFiles(page, [photo]);
  assert.equal(await waitStatus(page, ['done', 'error']), 'done');
  // The core's Exif reader keeps the first 256 characters of a text.
  assert.ok((await page.evaluate(() => window.sagitta.results.images[0].exif.lens_model)).length >= 200);
  await page.waitForTimeout(300);
  const [scroll, inner] = await page.evaluate(() => [document.documentElement.scrollWidth, window.innerWidth]);
  assert.ok(scroll <= inner, `page ${scroll} px wide in a ${inner} px window`);
  await shot(page, '17-long-lens', { fullPage: false });
  await shot(page.locator('.about'), '17-long-lens-about');
  assert.deepEqual(errors, []);
  await context.close();
});

test('6: status is "done" when some photos were measured and one failed; each row has its state', async () => {
  const bad = write('text.jpg', Buffer.from('this is not a photo\n'));
  const { context, page } = await open();
  await dropFiles(page, [bad, demoPhoto(4)]);
  await page.waitForFunction(() => window.sagitta.results.images.length === 1 && document.body.dataset.status !== 'working', null, { timeout: 120000 });
  assert.equal(await page.evaluate(() => document.body.dataset.status), 'done');
  assert.deepEqual(await page.$$eval('.photo', (ls) => ls.map((l) => l.dataset.state)), ['error', 'done']);
  await context.close();
});

test('7: large photos are admitted within a pixel budget: never two 120 MP photos at once', async () => {
  const files = [1, 2, 3].map((i) => {
    const f = path.join(WORK, `flat-120mp-${i}.png`);
    if (!fs.existsSync(f)) fs.copyFileSync(bigFlatPNG('flat-120mp.png', 10000, 11990), f);
    return f;
  });
  const { context, page, errors } = await open();
  await page.evaluate(() => {
    window.mostAtOnce = 0;
    new MutationObserver(() => {
      const n = [...document.querySelectorAll('.photo .state')].filter((s) => /Reading|Finding|Measuring|Summarising/.test(s.textContent)).length;
      window.mostAtOnce = Math.max(window.mostAtOnce, n);
    }).observe(document.getElementById('photo-list'), { subtree: true, childList: true, characterData: true });
  });
  const rss = sampleRSS();
  const t0 = Date.now();
  await dropFiles(page, files);
  await waitStatus(page, ['done', 'error'], 600000);
  const peak = rss.stop();
  console.log(`# 3 PNGs of 119.9 MP (${fs.statSync(files[0]).size} bytes each): ${((Date.now() - t0) / 1000).toFixed(1)} s, browser peak ${(peak / 2 ** 30).toFixed(2)} GB`);
  assert.equal(await page.evaluate(() => window.mostAtOnce), 1, 'two 120 MP photos were measured at once');
  assert.ok(peak < 2 * 2.87 * 2 ** 30, 'README quotes a peak of 2.87 GB');
  const states = await page.$$eval('.photo .state', (ss) => ss.map((s) => s.textContent));
  for (const s of states) assert.match(s, /^Not measured: no measurable edge found/);
  assert.deepEqual(errors, []);
  await context.close();
});
