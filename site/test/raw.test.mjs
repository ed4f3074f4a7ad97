// A raw DNG dropped on the page: read by the core in the worker, each edge
// measured on the mosaic's colour planes, the same numbers as the
// command-line tool on the same file, and a picture from the worker's
// preview (browsers cannot show DNG).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import { WORK, testPhoto, cli, recordRequests, dropFiles, waitStatus, waitEngine, diff, shot, useServedPage } from './helpers.mjs';

const env = useServedPage();

test('a dropped DNG is measured on its mosaic planes, as the tool measures it', async () => {
  const dng = testPhoto('chart-raw.dng', ['-w', '1800', '-h', '1200', '-f', '5.6']);
  const context = await env.browser.newContext({ viewport: { width: 1400, height: 1000 } });
  const requests = recordRequests(context);
  const page = await context.newPage();
  const errors = [];
  page.on('pageerror', (e) => errors.push(e.message));
  await page.goto(env.server.url);
  await waitEngine(page);
  const loaded = Date.now();
  await dropFiles(page, [dng]);
  assert.equal(await waitStatus(page, ['done', 'error']), 'done');
  const r = await page.evaluate(() => window.sagitta.results.images[0]);
  assert.equal(r.format, 'dng');
  assert.equal(r.tone, 'linear');
  assert.equal(r.raw.code, 'raw-mosaic-planes');
  assert.equal(r.raw.text, 'raw: mosaic planes, no demosaicing');
  assert.ok(r.measurements.length > 50, `${r.measurements.length} measurements`);
  assert.equal(r.measurements[0].channels.length, 3);
  // The pitch came from the DNG's Exif, as the tool reads it.
  assert.equal(r.pitch_source, 'Exif focal-plane resolution');
  assert.equal(diff({ images: [r] }, JSON.parse(cli(['--json'], [dng])), 1e-6), '');
  // The page says how the raw file was measured, and shows the picture.
  const facts = await page.locator('#result .facts').first().textContent();
  assert.match(facts, /raw: mosaic planes, no demosaicing/);
  await page.waitForTimeout(300);
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
  await shot(page, '20-raw-dng');
  // A target's detail lists MTF50 per colour plane.
  await page.click('button:has-text("Show the target nearest the optical centre")');
  const perColour = page.locator('dt:has-text("MTF50 by colour") + dd');
  await perColour.waitFor();
  assert.match(await perColour.textContent(), /^R .* · G .* · B /);
  await shot(page, '21-raw-dng-target');

  // A DNG whose header declares 60000 x 50000 px is refused in one line,
  // before anything is allocated, and the page goes on.
  const huge = hugeDNG(dng);
  await page.setInputFiles('#file-input', huge);
  await page.waitForFunction(() => document.querySelectorAll('.photo').length === 2 && /Not measured/.test(document.querySelector('.photo:nth-child(2) .state').textContent));
  const msg = await page.textContent('.photo:nth-child(2) .state');
  assert.match(msg, /more than the 120 MP this tool measures/);
  assert.deepEqual(requests.network(loaded), []);
  assert.deepEqual(errors, []);
  await context.close();
});

// hugeDNG writes a copy of a little-endian DNG whose raw IFD (IFD0 in the
// files testphoto writes) declares 60000 x 50000 px (TIFF 6.0 section 2:
// the IFD offset at byte 4, 12-byte entries, LONG values in place).
function hugeDNG(file) {
  const b = Buffer.from(fs.readFileSync(file));
  const ifd = b.readUInt32LE(4);
  const n = b.readUInt16LE(ifd);
  for (let i = 0; i < n; i++) {
    const e = ifd + 2 + 12 * i;
    const tag = b.readUInt16LE(e);
    if (tag === 256) b.writeUInt32LE(60000, e + 8);
    if (tag === 257) b.writeUInt32LE(50000, e + 8);
  }
  const out = path.join(WORK, 'huge.dng');
  fs.writeFileSync(out, b);
  return out;
}
