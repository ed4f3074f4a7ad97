// Browser test of distortion and light fall-off: the demo photo (its
// invented lens has mild barrel distortion and vignetting) shows both in
// "Across the frame" with the core's figures and the command-line tool's
// numbers (and so in the printable report), and Compare overlays them for
// two photos.

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { demoPhoto, cli, dropFiles, waitStatus, waitEngine, shot, useServedPage } from './helpers.mjs';

const env = useServedPage();

test('distortion and light fall-off across the frame and in Compare', async () => {
  const a = demoPhoto(4);
  const b = demoPhoto(4, 'demo-4-copy.jpg');
  const context = await env.browser.newContext({ viewport: { width: 1400, height: 1000 } });
  const page = await context.newPage();
  const errors = [];
  page.on('pageerror', (e) => errors.push(e.message));
  await page.goto(env.server.url);
  await waitEngine(page);
  await dropFiles(page, [a, b]);
  assert.equal(await waitStatus(page, ['done', 'error']), 'done');
  const want = JSON.parse(cli(['--json'], [a])).images[0];
  assert.equal(want.distortion.kind, 'barrel');
  assert.ok(want.falloff.measured);

  // Across the frame: both figures drawn by the core, and the cards give
  // the tool's corner values.
  const sec = page.locator('section.geometry');
  await sec.waitFor();
  await page.waitForFunction(() => ['distortion', 'falloff'].every((k) => document.querySelector(`section.geometry .core-figure[data-kind="${k}"] svg`)));
  const text = await sec.innerText();
  const signed = (v) => (v > 0 ? '+' : '') + v.toFixed(2);
  assert.match(text, new RegExp(`Distortion: barrel`));
  assert.ok(text.includes(`${signed(want.distortion.corner_pct)} %`), `corner ${signed(want.distortion.corner_pct)} % in ${text}`);
  assert.ok(text.includes(`${signed(want.falloff.corner_ev)} EV`), `corner ${signed(want.falloff.corner_ev)} EV in ${text}`);
  await sec.scrollIntoViewIfNeeded();
  await shot(sec, '40-geometry');
  // The printable report (the print stylesheet) keeps the section.
  await page.emulateMedia({ media: 'print' });
  assert.ok(await sec.isVisible(), 'distortion and fall-off in the printed report');
  await shot(page, '42-geometry-print', { fullPage: true });
  await page.emulateMedia({ media: 'screen' });

  // Compare: one curve per photo in each figure.
  await page.click('#tab-compare');
  await page.waitForFunction(() => ['distortion', 'falloff'].every((k) => document.querySelector(`#place-compare .core-figure[data-kind="${k}"] svg`)));
  const curves = await page.$$eval('#place-compare .core-figure[data-kind="distortion"] svg g[aria-label]', (gs) => gs.map((g) => g.getAttribute('aria-label')));
  assert.equal(curves.filter((l) => /^f\/2\.8/.test(l)).length, 2, `curves ${curves}`); // labelled from Exif
  await shot(page, '41-geometry-compare', { fullPage: true });
  assert.deepEqual(errors, []);
  await context.close();
});
