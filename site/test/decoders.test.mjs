// The browser's decoding against the core's (issue 15): the same JPEGs
// (baseline 4:2:0, progressive, 4:2:2, 4:4:4, grey, with an ICC profile;
// made from the demo photo with ImageMagick, the Debian package
// imagemagick, tinted yellow but for the grey one) decoded by Chromium in
// the page's worker and by the core. The core decodes JPEG as libjpeg-turbo
// does with its defaults (core/decode/jpegdec), and Chromium decodes with
// libjpeg-turbo, so the luminance must be the same bit for bit (README,
// "Speed in the page", says 0) and the page's records (browser decoding,
// the page's default) must have the command-line tool's MTF up to Nyquist
// within 0.002, record by record, every kind (edges, gratings, stars).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { WORK, demoPhoto, cli, dropFiles, waitStatus, waitEngine, useServedPage } from './helpers.mjs';

const env = useServedPage();

// imageMagick returns ImageMagick's convert, or '' when it is missing.
function imageMagick() {
  for (const c of ['convert-im6.q16', 'convert']) {
    try {
      if (/ImageMagick/.test(execFileSync(c, ['-version'], { encoding: 'utf8' }))) return c;
    } catch {
      // not this one
    }
  }
  return '';
}

const ICC = '/usr/share/color/icc/ghostscript/a98.icc';
const TINT = ['-type', 'TrueColor', '-channel', 'B', '-evaluate', 'multiply', '0.8', '+channel'];
// [name, ImageMagick's options]
const VARIANTS = [
  ['baseline-420', [...TINT, '-sampling-factor', '2x2']],
  ['progressive', [...TINT, '-sampling-factor', '2x2', '-interlace', 'JPEG']],
  ['422', [...TINT, '-sampling-factor', '2x1']],
  ['444', [...TINT, '-sampling-factor', '1x1']],
  ['grey', ['-colorspace', 'Gray']],
  ['icc', [...TINT, '-sampling-factor', '2x2', '-profile', ICC]],
];

// counterpart finds the record of rs at the same place and direction as w.
function counterpart(rs, used, w) {
  return rs.findIndex((g, j) => !used[j] && g.kind === w.kind && g.mtf.length === w.mtf.length && Math.hypot(g.x_px - w.x_px, g.y_px - w.y_px) <= 0.5 && Math.abs(g.normal_deg - w.normal_deg) <= 1);
}

test('browser and core decode the same JPEGs to the same luminance and measurements', async (t) => {
  const im = imageMagick();
  if (!im) return t.skip('ImageMagick is not installed (make browser-deps installs it)');
  const src = demoPhoto(4);
  const context = await env.browser.newContext();
  const page = await context.newPage();
  await page.goto(env.server.url + '?decoder=browser'); // the core decodes by default
  await waitEngine(page);
  for (const [name, args] of VARIANTS) {
    if (name === 'icc' && !fs.existsSync(ICC)) {
      console.log(`# ${name}: no ICC profile at ${ICC}, skipped`);
      continue;
    }
    const file = path.join(WORK, `decoders-${name}.jpg`);
    execFileSync(im, [src, '-quality', '95', ...args, file]);
    const b64 = fs.readFileSync(file).toString('base64');
    const lum = await page.evaluate(async (b64) => {
      const { engine } = await import('./engine.js');
      const bin = atob(b64);
      const u8 = new Uint8Array(bin.length);
      for (let i = 0; i < bin.length; i++) u8[i] = bin.charCodeAt(i);
      return (await engine()).call('decoders', [u8.buffer]);
    }, b64);
    assert.ok(lum, `${name}: the core did not let the browser decode it`);

    await page.evaluate(() => document.querySelectorAll('.photo .row-actions button').forEach((b) => b.textContent === 'Remove' && b.click()));
    await dropFiles(page, [file]);
    assert.equal(await waitStatus(page, ['done', 'error']), 'done');
    const got = await page.evaluate(() => ({ r: window.sagitta.results.images[0], by: window.sagitta.decodedBy[0] }));
    assert.equal(got.by, 'browser');
    const want = JSON.parse(cli(['--json'], [file])).images[0];
    const used = [];
    let worst = 0;
    let missing = 0;
    for (const w of want.measurements) {
      const j = counterpart(got.r.measurements, used, w);
      if (j < 0) {
        missing++;
        continue;
      }
      used[j] = true;
      const g = got.r.measurements[j];
      (w.freq_cy_px || []).forEach((f, k) => {
        if (f <= 0.5) worst = Math.max(worst, Math.abs(g.mtf[k] - w.mtf[k]));
      });
    }
    assert.equal(lum.max_diff, 0, `${name}: luminance differs by ${lum.max_diff}; README says the browser's pixels are the core's`);
    assert.ok(worst <= 0.002, `${name}: MTF differs by ${worst}, more than 0.002`);
    assert.equal(missing, 0, `${name}: ${missing} records found with the core's decoding only`);
    console.log(`# ${name}: luminance differs by at most ${lum.max_diff.toFixed(5)} (mean ${lum.mean_diff.toExponential(2)}); MTF up to Nyquist by at most ${worst.toFixed(4)} over ${want.measurements.length - missing} records (${missing} without a counterpart, ${got.r.measurements.length} records in the page)`);
  }
  await context.close();
});
