// The browser's decoding against the core's (issue 15): the same JPEGs
// (baseline 4:2:0, progressive, 4:4:4, grey, with an ICC profile; made from
// the demo photo with ImageMagick, the Debian package imagemagick, tinted
// yellow but for the grey one) decoded
// by Chromium in the page's worker and by the core. The test prints the
// largest luminance difference (linear, full scale 1) and the largest MTF
// difference up to Nyquist between the page's records (browser decoding,
// ?decoder=browser) and the command-line tool's (Go's decoder), record by
// record, and holds them to at most twice README's figures ("Speed", the
// page; the same as core/analyze's TestPixelsFromOutsideDecoder finds with
// ImageMagick's libjpeg). They exceed the 0.002 MTF that would make the two
// decoders interchangeable, so the page decodes with the core by default.

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
// [name, ImageMagick's options, README's largest luminance and MTF differences]
const VARIANTS = [
  ['baseline-420', [...TINT, '-sampling-factor', '2x2'], 0.0155, 0.037],
  ['progressive', [...TINT, '-sampling-factor', '2x2', '-interlace', 'JPEG'], 0.0155, 0.037],
  ['444', [...TINT, '-sampling-factor', '1x1'], 0.0147, 0.053],
  ['grey', ['-colorspace', 'Gray'], 0.0078, 0.018],
  ['icc', [...TINT, '-sampling-factor', '2x2', '-profile', ICC], 0.0155, 0.037],
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
  await page.goto(env.server.url + '?decoder=browser');
  await waitEngine(page);
  for (const [name, args, lumMax, mtfMax] of VARIANTS) {
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
      if (w.kind !== 'edge') continue; // README quotes the same edge's MTF
      const j = counterpart(got.r.measurements, used, w);
      if (j < 0) {
        missing++;
        continue;
      }
      used[j] = true;
      const g = got.r.measurements[j];
      w.freq_cy_px.forEach((f, k) => {
        if (f <= 0.5) worst = Math.max(worst, Math.abs(g.mtf[k] - w.mtf[k]));
      });
    }
    assert.ok(lum.max_diff <= 2 * lumMax, `${name}: luminance differs by ${lum.max_diff}, more than twice ${lumMax}`);
    assert.ok(worst <= 2 * mtfMax, `${name}: MTF differs by ${worst}, more than twice ${mtfMax}`);
    assert.ok(missing <= want.measurements.length / 50, `${name}: ${missing} records found with the core's decoding only`);
    console.log(`# ${name}: luminance differs by at most ${lum.max_diff.toFixed(5)} (mean ${lum.mean_diff.toExponential(2)}); MTF up to Nyquist by at most ${worst.toFixed(4)} over ${want.measurements.length - missing} records (${missing} without a counterpart, ${got.r.measurements.length} records in the page)`);
  }
  await context.close();
});
