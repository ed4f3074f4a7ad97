// One photo over the whole pool, and results as they come (issue 15): the
// same photo measured by one worker and by two (one finds the targets, both
// measure ranges of them, the finder merges and summarises) gives the
// command-line tool's JSON either way; as soon as the targets are found
// the photo is shown with their outlines, then, while the ranges come in,
// with the targets measured so far, and its row counts them.

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { testPhoto, cli, dropFiles, waitStatus, waitEngine, diff, shot, useServedPage } from './helpers.mjs';

const env = useServedPage();

// open loads the page with the pool sized for the given number of cores.
async function open(cores) {
  const context = await env.browser.newContext({ viewport: { width: 1400, height: 1000 } });
  await context.addInitScript((n) => Object.defineProperty(navigator, 'hardwareConcurrency', { get: () => n }), cores);
  const page = await context.newPage();
  const errors = [];
  page.on('pageerror', (e) => errors.push(e.message));
  await page.goto(env.server.url);
  await waitEngine(page);
  return { context, page, errors };
}

test('one worker and two give the tool\'s JSON; the photo fills in as its targets are measured', async () => {
  const photo = testPhoto('split-chart.jpg', ['-chart', '-w', '3000', '-h', '2000']);
  const want = JSON.parse(cli(['--json'], [photo]));
  for (const cores of [1, 2]) {
    const { context, page, errors } = await open(cores);
    await page.evaluate(() => {
      // Record what the page shows while it measures.
      window.seen = [];
      window.outlines = 0; // most outlines of targets found, not yet measured, shown at once
      new MutationObserver(() => {
        const n = Number(document.body.dataset.shownTargets || 0);
        const outlines = document.querySelectorAll('#result .found').length;
        if (document.body.dataset.status === 'working') window.outlines = Math.max(window.outlines, outlines);
        const row = document.querySelector('.photo .state');
        if (n > 0 && document.body.dataset.status === 'working') window.seen.push({ n, polys: document.querySelectorAll('#result .target').length, row: row && row.textContent });
      }).observe(document.body, { attributes: true, childList: true, subtree: true });
    });
    await dropFiles(page, [photo]);
    if (cores === 2) {
      await page.waitForFunction(() => document.querySelectorAll('#result .found').length > 0 && document.body.dataset.status === 'working', null, { timeout: 180000, polling: 50 });
      await shot(page, 'split-00-found');
      await page.waitForFunction(() => Number(document.body.dataset.shownTargets || 0) > 0 && document.body.dataset.status === 'working', null, { timeout: 180000, polling: 50 });
      await shot(page, 'split-01-filling-in');
    }
    assert.equal(await waitStatus(page, ['done', 'error']), 'done');
    await shot(page, `split-0${cores + 1}-done-${cores}-workers`);
    const got = await page.evaluate(() => window.sagitta.results);
    assert.equal(diff(got, want, 1e-6), '', `${cores} worker(s)`);
    const seen = await page.evaluate(() => window.seen);
    assert.ok(seen.length > 0, `${cores} worker(s): no targets were shown before the result`);
    const outlines = await page.evaluate(() => window.outlines);
    assert.ok(outlines >= want.images[0].measurements.length / 2, `${cores} worker(s): at most ${outlines} targets outlined while waiting to be measured`);
    const first = seen[0];
    assert.equal(first.polys, first.n, 'the targets shown are those measured so far');
    assert.ok(first.n < want.images[0].measurements.length, 'the first targets came before the rest');
    assert.ok(seen.some((s) => /^Measuring edges: \d+ of \d+ targets$/.test(s.row)), 'the row counts the targets measured');
    const workers = await page.evaluate(() => document.querySelectorAll('.photo').length);
    assert.equal(workers, 1);
    assert.deepEqual(errors, []);
    await context.close();
  }
});
