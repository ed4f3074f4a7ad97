// Browser test of colour fringes: the demo photo (whose invented lens
// images red 0.03 % larger and blue 0.04 % smaller than green) measured in
// the page shows the core's lateral_ca, the same as the command-line tool's,
// in "Across the frame" (verdict, the core's figure and its table) and in
// Compare.

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { demoPhoto, cli, dropFiles, waitStatus, waitEngine, shot, diff, useServedPage } from './helpers.mjs';

const env = useServedPage();

test('colour fringes: the tool\'s lateral_ca, shown with its verdict, plot and table', async () => {
  const file = demoPhoto(4); // 1500 x 1000 px, JPEG 4:2:0
  const context = await env.browser.newContext({ viewport: { width: 1400, height: 1000 } });
  const page = await context.newPage();
  const errors = [];
  page.on('pageerror', (e) => errors.push(e.message));
  await page.goto(env.server.url);
  await waitEngine(page);
  await dropFiles(page, [file]);
  assert.equal(await waitStatus(page, ['done', 'error']), 'done');
  const got = await page.evaluate(() => window.sagitta.results.images[0]);
  const want = JSON.parse(cli(['--json'], [file])).images[0];
  assert.ok(want.lateral_ca, 'the tool measured no colour fringes');
  assert.equal(diff(got.lateral_ca, want.lateral_ca, 1e-6), '');
  assert.ok(got.warning_codes.includes('chroma-subsampled'));

  const sec = page.locator('section.fringes');
  await sec.locator('svg.plot').waitFor({ timeout: 60000 });
  const text = await sec.textContent();
  assert.ok(text.includes(want.lateral_ca.text), 'the verdict sentence is not shown');
  assert.ok(text.includes(want.lateral_ca.selection), 'the edges used are not said');
  assert.equal(await sec.locator('.card').getAttribute('data-code'), want.lateral_ca.code);
  const rows = await sec.locator('table tbody tr').count();
  assert.ok(rows >= want.lateral_ca.points.length, `data table of ${rows} rows`);
  await sec.scrollIntoViewIfNeeded();
  await shot(sec, '60-colour-fringes');

  await page.click('#tab-compare');
  const cmp = page.locator('#place-compare section.fringes, section.fringes').last();
  await cmp.locator('svg.plot').waitFor({ timeout: 60000 });
  await shot(cmp, '61-colour-fringes-compare');
  assert.deepEqual(errors, []);
  await context.close();
});
