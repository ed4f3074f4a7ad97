// Unit tests of the worker pool (site/pool.js) with stand-in workers that
// follow the protocol of site/protocol.js, so the scheduling rules can be
// checked without a browser: one job per worker, stale replies dropped,
// cancel by replacing the worker, dead workers replaced, quick calls first.

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { Pool, AbortError, poolSize, measureRanges } from '../pool.js';

// FakeWorker answers init at once and keeps other messages for the test to answer.
class FakeWorker {
  constructor(log) {
    this.log = log;
    this.inbox = [];
    this.terminated = false;
    log.push(this);
  }
  postMessage(msg) {
    if (msg.type === 'init') queueMicrotask(() => this.reply({ type: 'ready', functions: ['csv'] }));
    else this.inbox.push(msg);
  }
  reply(msg) {
    if (!this.terminated) this.onmessage({ data: msg });
  }
  terminate() {
    this.terminated = true;
  }
}

const tick = () => new Promise((r) => setTimeout(r, 0));

function pool(size) {
  const workers = [];
  const p = new Pool({ module: {}, spawn: () => new FakeWorker(workers), size, idleMs: 0 });
  return { p, workers };
}

test('one job per worker; the rest wait; results go to their jobs', async () => {
  const { p, workers } = pool(2);
  const jobs = [1, 2, 3].map((i) => p.analyze(`f${i}`, new ArrayBuffer(8), {}, 0));
  await tick();
  assert.equal(workers.length, 2);
  assert.deepEqual(workers.map((w) => w.inbox.length), [1, 1]);
  const [a, b] = workers;
  a.reply({ type: 'result', id: a.inbox[0].id, result: { file: 'f1' }, preview: null });
  assert.equal((await jobs[0].promise).result.file, 'f1');
  await tick();
  assert.equal(a.inbox.length, 2, 'the free worker takes the waiting job');
  b.reply({ type: 'result', id: b.inbox[0].id, result: { file: 'f2' }, preview: null });
  a.reply({ type: 'result', id: a.inbox[1].id, result: { file: 'f3' }, preview: null });
  assert.equal((await jobs[1].promise).result.file, 'f2');
  assert.equal((await jobs[2].promise).result.file, 'f3');
});

test('a stale reply is dropped; progress reaches its job', async () => {
  const { p, workers } = pool(1);
  const seen = [];
  const job = p.analyze('f', new ArrayBuffer(8), {}, 0, (stage, f) => seen.push([stage, f]));
  await tick();
  const w = workers[0];
  const id = w.inbox[0].id;
  w.reply({ type: 'result', id: id + 1000, result: { file: 'other' } });
  w.reply({ type: 'progress', id, stage: 'measuring', fraction: 0.5 });
  w.reply({ type: 'result', id, result: { file: 'f' } });
  assert.equal((await job.promise).result.file, 'f');
  assert.deepEqual(seen, [['measuring', 0.5]]);
});

test('cancelling a running job replaces its worker; a queued one is just dropped', async () => {
  const { p, workers } = pool(1);
  const a = p.analyze('a', new ArrayBuffer(8), {}, 0);
  const b = p.analyze('b', new ArrayBuffer(8), {}, 0);
  const c = p.analyze('c', new ArrayBuffer(8), {}, 0);
  await tick();
  c.cancel();
  await assert.rejects(c.promise, AbortError);
  a.cancel();
  await assert.rejects(a.promise, AbortError);
  assert.equal(workers[0].terminated, true);
  await tick();
  assert.equal(workers.length, 2, 'a fresh worker');
  assert.equal(workers[1].inbox[0].name, 'b');
  workers[1].reply({ type: 'result', id: workers[1].inbox[0].id, result: { file: 'b' } });
  assert.equal((await b.promise).result.file, 'b');
});

test('a fatal error rejects the job and replaces the worker; a plain error keeps it', async () => {
  const { p, workers } = pool(1);
  const a = p.analyze('a', new ArrayBuffer(8), {}, 0);
  const b = p.analyze('b', new ArrayBuffer(8), {}, 0);
  await tick();
  workers[0].reply({ type: 'error', id: workers[0].inbox[0].id, message: 'decode: not a PNG, JPEG or TIFF image', fatal: false });
  await assert.rejects(a.promise, /not a PNG/);
  await tick();
  assert.equal(workers.length, 1);
  workers[0].reply({ type: 'error', id: workers[0].inbox[1].id, message: 'Go program has already exited', fatal: true });
  await assert.rejects(b.promise, /already exited/);
  assert.equal(workers[0].terminated, true);
  const c = p.analyze('c', new ArrayBuffer(8), {}, 0);
  await tick();
  assert.equal(workers.length, 2);
  workers[1].reply({ type: 'result', id: workers[1].inbox[0].id, result: { file: 'c' } });
  assert.equal((await c.promise).result.file, 'c');
});

test('a worker that dies without a word fails its job and is replaced', async () => {
  const { p, workers } = pool(1);
  const a = p.analyze('a', new ArrayBuffer(8), {}, 0);
  await tick();
  workers[0].onerror({ message: 'out of memory', preventDefault() {} });
  await assert.rejects(a.promise, /out of memory/);
  assert.equal(workers[0].terminated, true);
  assert.equal(p.slots.length, 0);
});

test('quick calls go ahead of waiting photos', async () => {
  const { p, workers } = pool(1);
  p.analyze('a', new ArrayBuffer(8), {}, 0);
  p.analyze('b', new ArrayBuffer(8), {}, 0);
  const csv = p.call('csv', ['{}']);
  await tick();
  const w = workers[0];
  w.reply({ type: 'result', id: w.inbox[0].id, result: {} });
  await tick();
  assert.equal(w.inbox[1].type, 'call');
  w.reply({ type: 'result', id: w.inbox[1].id, result: 'file,id\n' });
  assert.equal(await csv, 'file,id\n');
  assert.throws(() => p.call('nothing'), /unknown core function/);
});

test('pool size follows cores and memory', () => {
  // {cores, memory GB} -> workers: one per core up to 4, a core left free
  // above two, at most a quarter of the memory at 110 MB each.
  const cases = [[1, 8, 1], [2, 8, 2], [4, 8, 3], [16, 8, 4], [8, 0.25, 1], [8, 0.5, 1]];
  for (const [c, m, want] of cases) assert.equal(poolSize(c, m), want, `cores ${c}, memory ${m} GB`);
});

// pngHeader is the start of a PNG declaring w x h px (ISO/IEC 15948, 11.2.2):
// enough for the pool to read its size.
function pngHeader(w, h) {
  const b = new Uint8Array(33);
  b.set([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52]);
  const v = new DataView(b.buffer);
  v.setUint32(16, w);
  v.setUint32(20, h);
  b[24] = 8;
  return b.buffer;
}

test('photos are admitted while their pixels fit the budget; a larger one runs alone', async () => {
  const workers = [];
  const p = new Pool({ module: {}, spawn: () => new FakeWorker(workers), size: 2, idleMs: 0, pixelBudget: 100e6 });
  const big1 = p.analyze('big1', pngHeader(10000, 9000), {}, 0); // 90 MP
  const big2 = p.analyze('big2', pngHeader(10000, 9000), {}, 0);
  const small = p.analyze('small', pngHeader(100, 100), {}, 0);
  await tick();
  assert.equal(workers.length, 1, 'the second 90 MP photo waits');
  assert.equal(p.pixelsInFlight, 90e6);
  const w = workers[0];
  w.reply({ type: 'result', id: w.inbox[0].id, result: { file: 'big1' } });
  await big1.promise;
  await tick();
  // In order: the second large photo, then the small one beside it.
  assert.deepEqual(workers.flatMap((x) => x.inbox.map((m) => m.name)), ['big1', 'big2', 'small']);
  assert.equal(p.pixelsInFlight, 90e6 + 1e4);
  for (const x of workers) for (const m of x.inbox.slice(-1)) if (m.name !== 'big1') x.reply({ type: 'result', id: m.id, result: { file: m.name } });
  await Promise.all([big2.promise, small.promise]);
  // One photo above the budget runs alone; a size beyond the core's limit is refused at once and costs nothing.
  assert.equal(p.pixelsInFlight, 0);
  const huge = p.analyze('huge', pngHeader(12000, 10000), {}, 0);
  const declared = p.analyze('declared', pngHeader(100000, 100000), {}, 0);
  await tick();
  assert.equal(p.pixelsInFlight, 120e6);
  assert.equal(workers.filter((x) => x.inbox.some((m) => m.name === 'declared')).length, 1, 'a file the core refuses at once needs no budget');
  for (const x of workers) for (const m of x.inbox) if (m.name === 'huge' || m.name === 'declared') x.reply({ type: 'result', id: m.id, result: {} });
  await Promise.all([huge.promise, declared.promise]);
});

test('a worker whose memory passed the limit is replaced after its job', async () => {
  const workers = [];
  const p = new Pool({ module: {}, spawn: () => new FakeWorker(workers), size: 1, idleMs: 0, memoryLimit: 1000 });
  const a = p.analyze('a', new ArrayBuffer(8), {}, 0);
  const b = p.analyze('b', new ArrayBuffer(8), {}, 0);
  await tick();
  workers[0].reply({ type: 'result', id: workers[0].inbox[0].id, result: {}, memory: 500 });
  await a.promise;
  await tick();
  assert.equal(workers.length, 1, 'under the limit: kept');
  workers[0].reply({ type: 'result', id: workers[0].inbox[1].id, result: {}, memory: 5000 });
  await b.promise;
  assert.equal(workers[0].terminated, true);
  assert.equal(p.recycled, 1);
  const c = p.analyze('c', new ArrayBuffer(8), {}, 0);
  await tick();
  assert.equal(workers.length, 2, 'a fresh worker takes the next photo');
  workers[1].reply({ type: 'error', id: workers[1].inbox[0].id, message: 'the file cannot be read as a photo (truncated JPEG)', fileFault: true });
  const err = await c.promise.catch((e) => e);
  assert.equal(err.fileFault, true);
});

test('declared sizes: JPEG frame header after other segments, TIFF with its IFD at the end', async () => {
  const { declaredSize } = await import('../header.js');
  // JPEG: SOI, an APP0 of 16 bytes, SOF0 with height 4000 and width 6000 (ITU-T T.81, B.2.2).
  const jpeg = new Uint8Array([0xff, 0xd8, 0xff, 0xe0, 0, 16, ...new Array(14).fill(0), 0xff, 0xc0, 0, 17, 8, 0x0f, 0xa0, 0x17, 0x70, 3, ...new Array(9).fill(0)]);
  assert.deepEqual(declaredSize(jpeg), { width: 6000, height: 4000 });
  // TIFF (little-endian) whose IFD 0 sits after 1000 bytes of strips: ImageWidth LONG 9000, ImageLength SHORT 7000.
  const tiff = new Uint8Array(1000 + 2 + 24 + 4);
  const v = new DataView(tiff.buffer);
  tiff.set([0x49, 0x49, 0x2a, 0]);
  v.setUint32(4, 1000, true);
  v.setUint16(1000, 2, true);
  v.setUint16(1002, 256, true);
  v.setUint16(1004, 4, true);
  v.setUint32(1006, 1, true);
  v.setUint32(1010, 9000, true);
  v.setUint16(1014, 257, true);
  v.setUint16(1016, 3, true);
  v.setUint32(1018, 1, true);
  v.setUint16(1022, 7000, true);
  assert.deepEqual(declaredSize(tiff), { width: 9000, height: 7000 });
  assert.equal(declaredSize(new TextEncoder().encode('not a photo')), null);
});

// partsOf is a range's parts as a worker gives them (JSON of analyze.Part).
const partsOf = (lo, hi) => JSON.stringify(Array.from({ length: hi - lo }, (_, k) => ({ index: lo + k, record: { kind: 'edge' } })));

test('one photo over the whole pool: found by one worker, ranges measured by all, finished by the finder', async () => {
  const { p, workers } = pool(2);
  const seen = [];
  const job = p.analyze('a', pngHeader(1000, 1000), {}, 0, null, (parts, count) => seen.push([parts.length, count.measured, count.targets]));
  await tick();
  const [f, h] = workers;
  assert.deepEqual([f.inbox[0].type, h.inbox[0].type], ['analyze', 'prepare'], 'the second worker decodes the photo while the first finds its targets');
  assert.ok(h.inbox[0].bytes.byteLength > 0 && f.inbox[0].bytes !== h.inbox[0].bytes, 'each worker has its own copy of the file');
  f.reply({ type: 'found', id: f.inbox[0].id, targets: 20, plan: 'PLAN', decodedBy: 'browser' });
  await tick();
  assert.deepEqual(f.inbox.slice(1).map((m) => [m.type, m.lo, m.hi]), [['measure', 0, 8]]);
  assert.equal(h.inbox.length, 1, 'a helper gets no range before it has decoded the photo');
  h.reply({ type: 'prepared', id: h.inbox[0].id });
  await tick();
  assert.deepEqual([h.inbox[1].type, h.inbox[1].lo, h.inbox[1].hi, h.inbox[1].plan], ['measure', 8, 16, 'PLAN']);
  f.reply({ type: 'measured', id: f.inbox[1].id, lo: 0, hi: 8, parts: partsOf(0, 8) });
  await tick();
  assert.deepEqual([f.inbox[2].lo, f.inbox[2].hi], [16, 20]);
  assert.equal(f.inbox[2].plan, undefined, 'the finder has its plan');
  f.reply({ type: 'measured', id: f.inbox[2].id, lo: 16, hi: 20, parts: partsOf(16, 20) });
  await tick();
  assert.equal(f.inbox.length, 3, 'no finish while a range is out');
  h.reply({ type: 'measured', id: h.inbox[1].id, lo: 8, hi: 16, parts: partsOf(8, 16) });
  await tick();
  assert.equal(h.inbox[2].type, 'release');
  const fin = f.inbox[3];
  assert.equal(fin.type, 'finish');
  assert.deepEqual(JSON.parse(fin.parts).map((x) => x.index).sort((a, b) => a - b), Array.from({ length: 8 }, (_, k) => 8 + k), "the helper's parts: the finder keeps its own");
  assert.deepEqual(seen, [[8, 8, 20], [4, 12, 20], [8, 20, 20]]);
  f.reply({ type: 'result', id: fin.id, result: { file: 'a' }, decodedBy: 'browser' });
  const r = await job.promise;
  assert.equal(r.result.file, 'a');
  assert.equal(r.decodedBy, 'browser');
  assert.equal(p.pixelsInFlight, 0);
});

test('a helper that fails gives its range back; the photo is still measured', async () => {
  const { p, workers } = pool(2);
  const job = p.analyze('a', pngHeader(1000, 1000), {}, 0);
  await tick();
  const [f, h] = workers;
  h.reply({ type: 'prepared', id: h.inbox[0].id });
  f.reply({ type: 'found', id: f.inbox[0].id, targets: 10, plan: 'PLAN' });
  await tick();
  assert.deepEqual([h.inbox[1].lo, h.inbox[1].hi], [8, 10]);
  h.reply({ type: 'error', id: h.inbox[1].id, message: 'out of memory', fatal: true });
  assert.equal(h.terminated, true);
  f.reply({ type: 'measured', id: f.inbox[1].id, lo: 0, hi: 8, parts: partsOf(0, 8) });
  await tick();
  assert.deepEqual([f.inbox[2].type, f.inbox[2].lo, f.inbox[2].hi], ['measure', 8, 10], 'the finder measures the lost range');
  f.reply({ type: 'measured', id: f.inbox[2].id, lo: 8, hi: 10, parts: partsOf(8, 10) });
  await tick();
  assert.equal(f.inbox[3].type, 'finish');
  f.reply({ type: 'result', id: f.inbox[3].id, result: { file: 'a' } });
  assert.equal((await job.promise).result.file, 'a');
});

test('cancelling a photo replaces its finder and its helpers', async () => {
  const { p, workers } = pool(2);
  const job = p.analyze('a', pngHeader(1000, 1000), {}, 0);
  await tick();
  job.cancel();
  await assert.rejects(job.promise, AbortError);
  assert.deepEqual(workers.map((w) => w.terminated), [true, true]);
  assert.equal(p.slots.length, 0);
});

test('a quick call does not wait for a photo spread over every worker: a helper takes it between ranges', async () => {
  const { p, workers } = pool(2);
  const job = p.analyze('a', pngHeader(1000, 1000), {}, 0);
  await tick();
  const [f, h] = workers;
  h.reply({ type: 'prepared', id: h.inbox[0].id });
  f.reply({ type: 'found', id: f.inbox[0].id, targets: 100, plan: 'PLAN' });
  await tick();
  const csv = p.call('csv', ['{}']);
  await tick();
  h.reply({ type: 'measured', id: h.inbox[1].id, lo: h.inbox[1].lo, hi: h.inbox[1].hi, parts: partsOf(h.inbox[1].lo, h.inbox[1].hi) });
  await tick();
  assert.deepEqual(h.inbox.slice(2).map((m) => m.type), ['release', 'call'], 'the helper lets the photo go and runs the call');
  h.reply({ type: 'result', id: h.inbox[3].id, result: 'file,id\n' });
  assert.equal(await csv, 'file,id\n');
  // The finder measures the rest; the freed worker may help again.
  for (let guard = 0; guard < 50; guard++) {
    await tick();
    for (const w of workers) {
      const m = w.inbox.at(-1);
      if (m && m.type === 'measure' && !m.done) {
        m.done = true;
        w.reply({ type: 'measured', id: m.id, lo: m.lo, hi: m.hi, parts: partsOf(m.lo, m.hi) });
      } else if (m && m.type === 'prepare' && !m.done) {
        m.done = true;
        w.reply({ type: 'prepared', id: m.id });
      }
    }
    const fin = f.inbox.find((m) => m.type === 'finish');
    if (fin) {
      const byHelper = h.inbox.filter((m) => m.type === 'measure').reduce((n, m) => n + m.hi - m.lo, 0);
      assert.equal(JSON.parse(fin.parts).length, byHelper, "the helper's parts: the finder keeps its own");
      f.reply({ type: 'result', id: fin.id, result: { file: 'a' } });
      break;
    }
  }
  assert.equal((await job.promise).result.file, 'a');
});

test('the targets are shared out: a short first range per worker, each sine pattern alone, then shrinking ranges of edges', () => {
  const r = measureRanges(300, 290, 2);
  assert.deepEqual(r.slice(0, 2), [[0, 8], [8, 16]]);
  assert.deepEqual(r.slice(2, 12), Array.from({ length: 10 }, (_, k) => [290 + k, 291 + k]), 'each pattern alone, before the rest of the edges');
  const rest = r.slice(12);
  assert.deepEqual(rest[0], [16, 16 + 48]);
  for (let k = 1; k < rest.length; k++) {
    assert.equal(rest[k][0], rest[k - 1][1], 'ranges follow each other');
    assert.ok(rest[k][1] - rest[k][0] <= rest[k - 1][1] - rest[k - 1][0] || rest[k][1] === 290, 'ranges shrink as the edges run out');
  }
  assert.equal(rest[rest.length - 1][1], 290);
  assert.deepEqual(measureRanges(20, 20, 2), [[0, 8], [8, 16], [16, 20]]);
  assert.deepEqual(measureRanges(3, 0, 2), [[0, 1], [1, 2], [2, 3]], 'a photo of patterns only');
});
