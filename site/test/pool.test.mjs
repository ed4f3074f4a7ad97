// Unit tests of the worker pool (site/pool.js) with stand-in workers that
// follow the protocol of site/protocol.js, so the scheduling rules can be
// checked without a browser: one job per worker, stale replies dropped,
// cancel by replacing the worker, dead workers replaced, quick calls first.

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { Pool, AbortError, poolSize } from '../pool.js';

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
