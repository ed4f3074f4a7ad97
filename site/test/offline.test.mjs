// Browser test of the single-file page (make dist): opened from disk with
// the network cut off, it makes the demo photo and measures it, and asks
// for nothing beyond its own file.

import { test } from 'node:test';
import assert from 'node:assert/strict';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { ROOT, launch, recordRequests, waitStatus, waitEngine, shot, cli, demoPhoto, diff } from './helpers.mjs';

test('the single file works from file:// with no network, and measures the demo photo', async () => {
  const browser = await launch();
  try {
    const context = await browser.newContext({ viewport: { width: 1400, height: 1000 }, offline: true });
    // Belt and braces: any request that is not for a local file fails.
    await context.route(/^(?!file:|blob:|data:)/, (route) => route.abort('internetdisconnected'));
    const requests = recordRequests(context);
    const page = await context.newPage();
    const errors = [];
    page.on('pageerror', (e) => errors.push(e.message));
    const csp = [];
    page.on('console', (m) => /Content Security Policy/.test(m.text()) && csp.push(m.text()));
    await page.goto(pathToFileURL(path.join(ROOT, 'dist/sagitta.html')).href);
    await waitEngine(page);
    assert.equal(await page.evaluate(() => document.documentElement.dataset.build), 'single-file');
    assert.equal(await page.isVisible('#offline-link'), false, 'no offline download inside the offline copy');
    assert.equal(await page.isVisible('#demo-button'), true);

    await page.click('#demo-button');
    assert.equal(await waitStatus(page, ['done', 'error']), 'done');
    const got = await page.evaluate(() => window.sagitta.results);
    assert.equal(got.images.length, 1);
    assert.equal(got.images[0].file, 'demo-chart.jpg');
    // The demo made in the page is the photo `sagitta demo -reduce 2` writes:
    // the same numbers from the native tool.
    const want = JSON.parse(cli(['--json'], [demoPhoto(2, 'demo-chart.jpg')]));
    assert.equal(diff(got, want, 1e-6), '');
    await page.waitForTimeout(300);
    await shot(page, '10-single-file-demo', { fullPage: true });

    assert.deepEqual(requests.network().map((r) => r.url), []);
    const policy = await page.evaluate(() => document.querySelector('meta[http-equiv="Content-Security-Policy"]').content);
    assert.match(policy, /connect-src 'none'/);
    assert.match(policy, /script-src 'sha256-/);
    assert.deepEqual(csp, [], 'no policy violation while working');
    assert.deepEqual(errors, []);
    await context.close();
  } finally {
    await browser.close();
  }
});
