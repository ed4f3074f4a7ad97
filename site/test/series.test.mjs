// Browser test of a user's session with an aperture series: three photos
// dropped at once, read in Compare (sorted by f-number, renamed), and the
// printable report.

import { test } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import { OUT, testPhoto, cli, dropFiles, waitStatus, waitEngine, shot, run, useServedPage } from './helpers.mjs';

const env = useServedPage();

test('an aperture series: compare sorted by f-number, rename, printable report', async () => {
  // Dropped out of order on purpose.
  const files = ['11', '2.8', '5.6'].map((f) => testPhoto(`series-f${f}.jpg`, ['-w', '1800', '-h', '1200', '-f', f, '-seed', f.length]));
  const context = await env.browser.newContext({ viewport: { width: 1400, height: 1000 } });
  const page = await context.newPage();
  const errors = [];
  page.on('pageerror', (e) => errors.push(e.message));
  await page.goto(env.server.url);
  await waitEngine(page);
  await dropFiles(page, files);
  await page.waitForFunction(() => document.querySelectorAll('.photo').length === 3);
  await shot(page, '20-series-working');
  assert.equal(await waitStatus(page, ['done', 'error']), 'done');
  assert.equal(await page.evaluate(() => window.sagitta.results.images.length), 3);
  await shot(page.locator('#photo-list'), '21-series-list');

  await page.click('#tab-compare');
  const rows = await page.$$eval('#compare-table tbody th', (ths) => ths.map((t) => t.textContent));
  assert.deepEqual(rows, ['f/2.8, 35 mm', 'f/5.6, 35 mm', 'f/11, 35 mm']);
  // The invented lens of site/testphoto is sharpest at f/5.6: its corner
  // numbers must say so (a check of the table against the simulation's
  // design, not a fixed value).
  const corner30 = await page.$$eval('#compare-table tbody tr', (trs) => trs.map((tr) => parseFloat(tr.cells[8].textContent)));
  assert.ok(corner30[1] > corner30[0] && corner30[1] > corner30[2], `corner MTF at 30 lp/mm by aperture: ${corner30}`);

  // Every number of the table is the command-line tool's (its JSON's
  // summary.zones, astigmatism and balance), as shown to two decimals; the
  // zone numbers follow the orientations shown.
  const want = new Map(JSON.parse(cli(['--json'], files)).images.map((im) => [path.basename(im.file), im.summary]));
  const order = ['series-f2.8.jpg', 'series-f5.6.jpg', 'series-f11.jpg'];
  const near = (cell, v, what, half = 0.005) => assert.ok(v == null ? cell === 'n/a' : Math.abs(parseFloat(cell) - v) <= half + 1e-9, `${what}: page ${cell}, tool ${v}`);
  for (const [orient, key] of [['both', 'all'], ['sagittal', 'sagittal'], ['tangential', 'tangential']]) {
    await page.selectOption('#compare-orient', orient);
    const cells = await page.$$eval('#compare-table tbody tr', (trs) => trs.map((tr) => [...tr.cells].map((c) => c.textContent)));
    cells.forEach((row, i) => {
      const s = want.get(order[i]);
      let c = 3;
      s.freqs_lp_mm.forEach((f, k) => s.zones.forEach((z) => near(row[c++], z[key][k], `${order[i]}, ${z.name}, ${key}, ${f} lp/mm`)));
      const last = s.freqs_lp_mm[s.freqs_lp_mm.length - 1];
      const a = s.astigmatism.find((x) => x.freq_lp_mm === last);
      const gap = row[c++].match(/^([+-]\d+\.\d+) ± (<?\d+\.\d+) at (\d+\.\d) mm$/);
      assert.ok(gap, `gap cell ${row[c - 1]}`);
      near(gap[1], a.max_gap, 'sagittal - tangential');
      near(gap[3], a.max_gap_height_mm, 'where', 0.05);
      const halves = s.balance.pairs.filter((p) => ['left', 'top'].includes(p.a)).map((p) => p.by_freq.find((d) => d.freq_lp_mm === last)).filter((d) => d.notable);
      assert.equal(row[c] === 'balanced', s.balance.verdict !== 'not enough measurements' && halves.length === 0, `balance ${row[c]}`);
    });
  }
  await page.selectOption('#compare-orient', 'both');

  const label = page.locator('.pick li:nth-child(1) input[type=text]');
  await label.fill('wide open');
  await label.press('Enter');
  // The core's figure (core/plot Compare) names the photos in its legend:
  // a grid of one panel per field frequency and orientation.
  await page.waitForFunction(() => [...document.querySelectorAll('#place-compare .core-figure svg text')].some((t) => t.textContent === 'wide open'));
  const panels = await page.$$eval('#place-compare .core-figure svg text', (ts) => ts.map((t) => t.textContent).filter((t) => / lp\/mm · (sagittal|tangential)$/.test(t)));
  assert.deepEqual(panels, ['10 lp/mm · sagittal', '10 lp/mm · tangential', '30 lp/mm · sagittal', '30 lp/mm · tangential']);
  await shot(page, '22-compare', { fullPage: true });

  // The sharpest stop, from the core (core/series): the same words as the
  // command-line tool's --series answer; the lens of site/testphoto is
  // made sharpest at f/5.6 in the corners.
  const seriesText = JSON.parse(cli(['--json', '--series'], files)).series.text;
  assert.match(seriesText, /In the corners the lens is sharpest at f\/5\.6/);
  await page.waitForFunction(() => document.querySelector('#series-aperture .verdict'));
  assert.equal(await page.textContent('#series-aperture .verdict'), seriesText);
  await page.waitForFunction(() => [...document.querySelectorAll('#series-aperture .core-figure svg text')].some((t) => t.textContent === 'Sharpness at each f-number'));
  await shot(page.locator('#compare-series'), '22b-compare-series');
  // Two photos at different stops are not a turned pair: the page says why.
  await page.uncheck('.pick li:nth-child(3) input[type=checkbox]');
  await page.selectOption('#series-turn', '180');
  await page.waitForFunction(() => /Not a turned pair: .*one stop/.test(document.querySelector('#series-turned')?.textContent || ''));
  await page.check('.pick li:nth-child(3) input[type=checkbox]');

  // The printable report of the selected photo, as the browser prints it,
  // with the series of the photos ticked in Compare after it: the core's
  // aperture-series figure and the same sharpest-stop words as the tool's.
  await page.click('#tab-measure');
  await page.click('.photo:nth-child(2) .open');
  await page.waitForFunction(() => document.getElementById('result-title')?.textContent === 'f/2.8, 35 mm' || document.getElementById('result-title')?.textContent === 'wide open');
  await page.evaluate(() => {
    window.print = () => {}; // the test prints through page.pdf below
  });
  await page.click('#export-menu summary');
  await page.click('#export-report');
  await page.waitForFunction(() => document.querySelector('#report-series svg'));
  assert.equal(await page.textContent('#report-series-aperture'), seriesText);
  assert.ok(await page.$eval('#report-series svg', (s) => [...s.querySelectorAll('text')].some((t) => t.textContent === 'Sharpness at each f-number')));
  assert.equal(await page.isVisible('#report-series'), false, 'the series is for the printed report only');
  await page.emulateMedia({ media: 'print' });
  assert.equal(await page.isVisible('#report-series'), true, 'the printed report shows the series');
  await shot(page, '23-report-print-media', { fullPage: true });
  const pdf = path.join(OUT, 'report.pdf');
  await page.pdf({ path: pdf, format: 'A4', printBackground: true });
  assert.ok(fs.statSync(pdf).size > 10000);
  const info = run('pdfinfo', [pdf]);
  const pages = +/Pages:\s+(\d+)/.exec(info)[1];
  assert.ok(pages >= 1 && pages <= 6, `report has ${pages} pages`);
  for (const f of fs.readdirSync(OUT)) if (f.startsWith('24-report-page')) fs.rmSync(path.join(OUT, f));
  run('pdftoppm', ['-png', '-r', '50', pdf, path.join(OUT, '24-report-page')]);
  // The PDF's text holds the series (poppler's pdftotext).
  const text = run('pdftotext', [pdf, '-']).replace(/\s+/g, ' ');
  assert.ok(text.includes('Sharpest aperture') && text.includes(seriesText.replace(/\s+/g, ' ').slice(0, 60)), 'the report PDF lacks the series');
  assert.deepEqual(errors, []);
  await context.close();
});

test('a turned pair in the printable report: the split into lens and set-up', async () => {
  // Two photos of one set-up at one stop (different noise): a pair the
  // core splits (whatever its verdict; the words are the tool's).
  const files = ['1', '2'].map((k) => testPhoto(`pair-${k}.jpg`, ['-w', '1500', '-h', '1000', '-f', '5.6', '-seed', k]));
  const context = await env.browser.newContext({ viewport: { width: 1400, height: 1000 } });
  const page = await context.newPage();
  const errors = [];
  page.on('pageerror', (e) => errors.push(e.message));
  await page.goto(env.server.url);
  await waitEngine(page);
  await dropFiles(page, files);
  assert.equal(await waitStatus(page, ['done', 'error']), 'done');
  await page.click('#tab-compare');
  await page.selectOption('#series-turn', '180');
  await page.waitForFunction(() => document.querySelector('#series-turned .verdict'));
  const want = JSON.parse(cli(['--json', '--turned', '180'], files)).turned_pair;
  assert.equal(await page.textContent('#series-turned .verdict'), want.text);
  await page.click('#tab-measure');
  await page.evaluate(() => {
    window.print = () => {};
  });
  await page.click('#export-menu summary');
  await page.click('#export-report');
  await page.waitForFunction(() => document.querySelector('#report-series-split'));
  assert.equal(await page.textContent('#report-series-turned'), want.text);
  // One row per field frequency, the lens and set-up parts as the tool
  // gives them, to two decimals.
  const rows = await page.$$eval('#report-series-split tbody tr', (trs) => trs.map((tr) => [...tr.cells].map((c) => c.textContent)));
  assert.equal(rows.length, want.by_freq.length);
  want.by_freq.forEach((b, i) => {
    assert.equal(rows[i][0], `${b.freq_lp_mm} lp/mm`);
    [b.lens_left_right, b.lens_top_bottom, b.setup_left_right, b.setup_top_bottom].forEach((q, k) => {
      const cell = rows[i][k + 1];
      if (q.diff == null) assert.equal(cell, 'n/a');
      else assert.ok(Math.abs(parseFloat(cell) - q.diff) <= 0.005 + 1e-9, `${b.freq_lp_mm} lp/mm part ${k}: page ${cell}, tool ${q.diff}`);
    });
  });
  await page.emulateMedia({ media: 'print' });
  await shot(page, '25-report-turned-pair', { fullPage: true });
  assert.deepEqual(errors, []);
  await context.close();
});
