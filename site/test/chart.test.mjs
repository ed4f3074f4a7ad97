// Browser test of the Print and plan place: the chart's PDF download has the
// chosen paper size (read back with poppler's pdfinfo), printing at actual
// size gives a page of the sheet's size, the ruler correction reaches the
// core, and the planner answers.

import { test } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import { BIN, OUT, waitEngine, waitStatus, shot, download, run, testPhoto, cli, diff, useServedPage } from './helpers.mjs';

const env = useServedPage();

// Page size in PDF points (1/72 in) of a sheet in mm: mm / 25.4 * 72.
const pt = (mm) => (mm / 25.4) * 72;

test('the chart downloads as a PDF of the chosen paper, prints at its size, and the planner answers', async () => {
  const context = await env.browser.newContext({ viewport: { width: 1400, height: 1000 }, acceptDownloads: true });
  const page = await context.newPage();
  const errors = [];
  page.on('pageerror', (e) => errors.push(e.message));
  await page.goto(env.server.url);
  await waitEngine(page);
  assert.equal(await page.isVisible('#tab-print'), true);
  await page.click('#tab-print');
  await page.waitForSelector('#chart-preview img');
  await page.waitForSelector('#plan-result .verdict');

  // A3, landscape: ISO 216 gives 297 x 420 mm.
  await page.selectOption('#chart-paper', 'A3');
  await page.waitForFunction(() => document.querySelector('#plan-result dd:nth-of-type(3)')?.textContent.includes('A3'));
  await shot(page, '30-print-and-plan', { fullPage: true });
  const pdf = await download(page, () => page.click('#chart-download-pdf'));
  assert.match(pdf.name, /A3.*landscape\.pdf$/);
  const file = path.join(OUT, 'chart-A3.pdf');
  fs.writeFileSync(file, pdf.bytes);
  const info = run('pdfinfo', [file]);
  const [, w, h] = /Page size:\s+([\d.]+) x ([\d.]+) pts/.exec(info);
  assert.ok(Math.abs(+w - pt(420)) < 0.5 && Math.abs(+h - pt(297)) < 0.5, `page ${w} x ${h} pt, want ${pt(420)} x ${pt(297)}`);
  assert.match(info, /Pages:\s+1\b/);

  // Letter, portrait (ANSI: 8.5 x 11 in = 612 x 792 pt).
  await page.selectOption('#chart-paper', 'Letter');
  await page.selectOption('#chart-orientation', 'portrait');
  const pdf2 = await download(page, () => page.click('#chart-download-pdf'));
  fs.writeFileSync(file, pdf2.bytes);
  const [, w2, h2] = /Page size:\s+([\d.]+) x ([\d.]+) pts/.exec(run('pdfinfo', [file]));
  assert.ok(Math.abs(+w2 - 612) < 0.5 && Math.abs(+h2 - 792) < 0.5, `page ${w2} x ${h2} pt`);

  // Printing at actual size: the browser's own PDF of the print has the sheet's size.
  await page.selectOption('#chart-paper', 'A4');
  await page.selectOption('#chart-orientation', 'landscape');
  await page.evaluate(() => { window.print = () => {}; });
  await page.click('#chart-print');
  await page.waitForSelector('.print-sheet svg', { state: 'attached' });
  const printed = path.join(OUT, 'chart-printed.pdf');
  await page.pdf({ path: printed, preferCSSPageSize: true, printBackground: true });
  const [, w3, h3] = /Page size:\s+([\d.]+) x ([\d.]+) pts/.exec(run('pdfinfo', [printed]));
  assert.ok(Math.abs(+w3 - pt(297)) < 1 && Math.abs(+h3 - pt(210)) < 1, `printed page ${w3} x ${h3} pt`);
  assert.match(run('pdfinfo', [printed]), /Pages:\s+1\b/);
  run('pdftoppm', ['-png', '-r', '30', '-singlefile', printed, path.join(OUT, '31-chart-printed')]);
  await page.evaluate(() => window.dispatchEvent(new Event('afterprint')));

  // The ruler: a print measured 2 % short makes the file's ruler 2 % longer.
  const svgOf = async () => (await download(page, () => page.click('#chart-download-svg'))).text;
  const before = await svgOf();
  await page.fill('#chart-ruler', '98');
  await page.press('#chart-ruler', 'Enter');
  await page.waitForTimeout(300);
  const after = await svgOf();
  assert.notEqual(before, after);

  // The planner: a longer lens stands farther away.
  const distance = async () => parseFloat(await page.textContent('#plan-result dd'));
  const d50 = await distance();
  await page.fill('#chart-focal', '100');
  await page.press('#chart-focal', 'Enter');
  await page.waitForFunction((d) => parseFloat(document.querySelector('#plan-result dd').textContent) > d, d50);
  assert.deepEqual(errors, []);
  await context.close();
});

test('a photo of the chart: recognised, its set-up checked, its marks shown', async () => {
  const photo = testPhoto('on-chart.jpg', ['-chart', '-w', '3000', '-h', '2000']);
  const context = await env.browser.newContext({ viewport: { width: 1400, height: 1000 } });
  const page = await context.newPage();
  const errors = [];
  page.on('pageerror', (e) => errors.push(e.message));
  await page.goto(env.server.url);
  await waitEngine(page);
  await page.setInputFiles('#file-input', photo);
  assert.equal(await waitStatus(page, ['done', 'error']), 'done');
  const got = await page.evaluate(() => window.sagitta.results);
  const want = JSON.parse(cli(['--json'], [photo]));
  assert.equal(diff(got, want, 1e-6), '');
  const c = got.images[0].chart;
  assert.ok(c, 'the chart was recognised');
  assert.match(await page.textContent('.chart-found'), new RegExp(`Sagitta chart ${c.code.replace(/[+]/g, '\\+')}: ${c.edges_identified} of its ${c.edges_expected} edges`));
  assert.equal(await page.locator('.chart-mark').count(), c.marks.length);
  // The simulated camera was turned 2 degrees away from square: the check says so.
  assert.ok(c.setup.warnings.length >= 1);
  assert.equal(await page.locator('.setup-warnings li').count(), c.setup.warnings.length);
  await page.waitForTimeout(300);
  await shot(page, '32-photo-of-the-chart', { fullPage: true });
  assert.deepEqual(errors, []);
  await context.close();
});

test('the chart across 2 x 2 sheets: a preview of each sheet, a PDF of four pages, printed as four pages, proposed by the planner', async () => {
  const context = await env.browser.newContext({ viewport: { width: 1400, height: 1000 }, acceptDownloads: true });
  const page = await context.newPage();
  const errors = [];
  page.on('pageerror', (e) => errors.push(e.message));
  await page.goto(env.server.url);
  await waitEngine(page);
  await page.click('#tab-print');
  await page.waitForSelector('#plan-result .verdict');
  // A 50 mm lens on full frame with one A4 sheet: the print limits the
  // measurement at 30 lp/mm and the planner proposes 2 x 2 sheets, with the
  // tool's figures.
  await page.fill('#chart-focal', '50');
  await page.press('#chart-focal', 'Enter');
  await page.waitForFunction(() => /Across sheets/.test(document.querySelector('#plan-result').textContent));
  const plan = JSON.parse(run(path.join(BIN, 'sagitta'), ['plan', '--focal-mm', '50', '--sensor', 'full-frame', '--pixels', '6000x4000', '--json']));
  assert.equal(plan.tiling.sheets, '2x2');
  assert.match(await page.textContent('#plan-result'), new RegExp(`2 × 2 sheets: ${Math.round(plan.tiling.chart_mm[0])} × ${Math.round(plan.tiling.chart_mm[1])} mm, ${(plan.tiling.object_distance_mm / 1000).toFixed(2)} m`));

  await page.selectOption('#chart-sheets', '2x2');
  await page.waitForFunction(() => document.querySelectorAll('#chart-preview img').length === 4);
  await page.waitForTimeout(300);
  await shot(page, '33-chart-sheets', { fullPage: true });
  const pdf = await download(page, () => page.click('#chart-download-pdf'));
  assert.match(pdf.name, /A4-landscape-2x2\.pdf$/);
  const file = path.join(OUT, 'chart-2x2.pdf');
  fs.writeFileSync(file, pdf.bytes);
  const info = run('pdfinfo', [file]);
  assert.match(info, /Pages:\s+4\b/);
  const [, w, h] = /Page size:\s+([\d.]+) x ([\d.]+) pts/.exec(info);
  assert.ok(Math.abs(+w - pt(297)) < 0.5 && Math.abs(+h - pt(210)) < 0.5, `page ${w} x ${h} pt`);
  // Each page names its sheet (poppler's pdftotext).
  const text = run('pdftotext', [file, '-']);
  for (const s of ['1-1', '1-2', '2-1', '2-2']) assert.match(text, new RegExp(`Sheet ${s} \\(row`));
  run('pdftoppm', ['-png', '-r', '20', file, path.join(OUT, '34-chart-sheet')]);

  await page.evaluate(() => { window.print = () => {}; });
  await page.click('#chart-print');
  await page.waitForFunction(() => document.querySelectorAll('.print-sheet svg').length === 4);
  const printed = path.join(OUT, 'chart-2x2-printed.pdf');
  await page.pdf({ path: printed, preferCSSPageSize: true, printBackground: true });
  assert.match(run('pdfinfo', [printed]), /Pages:\s+4\b/);
  await page.evaluate(() => window.dispatchEvent(new Event('afterprint')));
  assert.deepEqual(errors, []);
  await context.close();
});

test('a photo of the chart across 2 x 2 sheets: each sheet placed, the joins reported as the tool reports them', async () => {
  const photo = testPhoto('on-sheets.jpg', ['-chart', '-sheets', '-w', '3000', '-h', '2000']);
  const context = await env.browser.newContext({ viewport: { width: 1400, height: 1000 } });
  const page = await context.newPage();
  const errors = [];
  page.on('pageerror', (e) => errors.push(e.message));
  await page.goto(env.server.url);
  await waitEngine(page);
  await page.setInputFiles('#file-input', photo);
  assert.equal(await waitStatus(page, ['done', 'error']), 'done');
  const got = await page.evaluate(() => window.sagitta.results);
  const want = JSON.parse(cli(['--json'], [photo]));
  assert.equal(diff(got, want, 1e-6), '');
  const c = got.images[0].chart;
  assert.equal(c.code, 'S1-3:2-L-2x2');
  assert.equal(c.sheets.length, 4);
  assert.equal(c.edges_identified, c.edges_expected);
  const box = await page.textContent('.chart-found');
  assert.match(box, /4 sheets, 4 placed by their own marks/);
  for (const sm of c.seams) assert.ok(box.includes(`Sheets ${sm.sheet_a} and ${sm.sheet_b}`), `seam ${sm.sheet_a}|${sm.sheet_b} not shown`);
  assert.equal(await page.locator('.setup-warnings li').count(), c.setup.warnings.length);
  assert.ok(c.setup.warning_codes.includes('setup-sheets-misaligned'));
  await page.waitForTimeout(300);
  await shot(page.locator('.chart-found'), '35-photo-of-the-sheets');
  assert.deepEqual(errors, []);
  await context.close();
});
