// A small pool of measuring workers, each holding one instance of the core.
// Jobs wait in one queue; quick calls (CSV, plots, the chart) go ahead of
// photos. Workers start lazily, run one job at a time, and stop after a
// while without work so that their memory (which WebAssembly never gives
// back) returns to the system.
//
// Memory is bounded two ways. Photos are admitted in order only while the
// pixels being measured at once (each photo's size read from its header)
// stay within a budget; a photo larger than the budget runs alone. A worker
// whose WebAssembly memory grew past a limit (after a large photo) is
// replaced once its job is done. The messages are described in protocol.js.

import { FROM_WORKER, TO_WORKER, analyzeMessage, callMessage } from './protocol.js';
import { declaredSize } from './header.js';

/**
 * PIXEL_BUDGET is the most pixels measured at once across workers: two
 * 50 MP photos, or one photo of any size the core accepts. MEMORY_LIMIT is
 * the WebAssembly memory (bytes) past which a worker is replaced after its
 * job. CORE_MAX_PIXELS is the core's own limit (core/decode
 * DefaultMaxPixels): a larger photo is refused before any pixel is
 * allocated, so it costs nothing here.
 */
const PIXEL_BUDGET = 128e6;
const MEMORY_LIMIT = 1536 * 2 ** 20;
const CORE_MAX_PIXELS = 120e6;

/** photoPixels is what a photo counts against the budget: its declared pixels. */
function photoPixels(bytes) {
  const d = declaredSize(new Uint8Array(bytes)); // a view, not a copy (a TIFF's IFD may sit at the end)
  if (!d) return 0; // not a photo the core can read: refused at once
  const px = d.width * d.height;
  return px > CORE_MAX_PIXELS ? 0 : px;
}

/** AbortError is the rejection of a cancelled job. */
export class AbortError extends Error {
  constructor() {
    super('cancelled');
    this.name = 'AbortError';
  }
}

let nextId = 1;

export class Pool {
  /**
   * @param {object} o
   * @param {WebAssembly.Module} o.module the compiled core, shared by all workers
   * @param {() => Worker} o.spawn starts a new worker
   * @param {number} o.size largest number of workers
   * @param {number} [o.idleMs] stop a worker after this long without work
   * @param {number} [o.pixelBudget] most pixels measured at once
   * @param {number} [o.memoryLimit] replace a worker whose memory passed this, bytes
   */
  constructor({ module, spawn, size, idleMs = 30000, pixelBudget = PIXEL_BUDGET, memoryLimit = MEMORY_LIMIT }) {
    this.module = module;
    this.spawn = spawn;
    this.size = Math.max(1, size | 0);
    this.idleMs = idleMs;
    this.pixelBudget = pixelBudget;
    this.memoryLimit = memoryLimit;
    this.recycled = 0; // workers replaced for their memory, for tests and diagnostics
    this.queue = [];
    this.slots = [];
    this.started = 0; // workers started, for tests and diagnostics
    this.functions = new Set(); // core functions reachable by call()
  }

  /**
   * analyze queues one photo. onProgress(stage, fraction) reports progress.
   * Returns {id, promise, cancel}; the promise gives {result, preview} or
   * rejects with an Error (AbortError when cancelled).
   */
  analyze(name, bytes, settings, previewSide, onProgress) {
    const id = nextId++;
    const pixels = photoPixels(bytes);
    const { message, transfer } = analyzeMessage(id, name, bytes, settings, previewSide);
    return this.enqueue({ id, message, transfer, onProgress, urgent: false, pixels });
  }

  /** call runs one of the core's quick functions; resolves with its result. */
  call(fn, args = []) {
    const id = nextId++;
    const { message, transfer } = callMessage(id, fn, args);
    return this.enqueue({ id, message, transfer, urgent: true }).promise.then((r) => r.result);
  }

  /**
   * warm starts one worker ahead of the first job, so that the first photo
   * does not wait for it, and resolves with the set of call names the core
   * offers (see CALLS in protocol.js).
   */
  async warm() {
    const slot = this.slots[0] || this.startWorker();
    await slot.ready;
    if (!slot.job && this.idleMs > 0) {
      clearTimeout(slot.idleTimer);
      slot.idleTimer = setTimeout(() => {
        if (!slot.job) this.retire(slot);
      }, this.idleMs);
    }
    return this.functions;
  }

  /** busy reports whether any job is queued or running. */
  get busy() {
    return this.queue.length > 0 || this.slots.some((s) => s.job);
  }

  enqueue(job) {
    const promise = new Promise((resolve, reject) => {
      job.resolve = resolve;
      job.reject = reject;
    });
    if (job.urgent) {
      const i = this.queue.findIndex((j) => !j.urgent);
      this.queue.splice(i < 0 ? this.queue.length : i, 0, job);
    } else {
      this.queue.push(job);
    }
    this.pump();
    return { id: job.id, promise, cancel: () => this.cancel(job.id) };
  }

  /** cancel stops a job: dropped from the queue, or its worker replaced. */
  cancel(id) {
    const q = this.queue.findIndex((j) => j.id === id);
    if (q >= 0) {
      const [job] = this.queue.splice(q, 1);
      job.reject(new AbortError());
      return;
    }
    const slot = this.slots.find((s) => s.job && s.job.id === id);
    if (!slot) return;
    const job = slot.job;
    this.retire(slot); // a running WebAssembly call cannot be interrupted
    job.reject(new AbortError());
    this.pump();
  }

  /** cancelAll cancels every queued and running job. */
  cancelAll() {
    for (const job of this.queue.splice(0)) job.reject(new AbortError());
    for (const slot of [...this.slots]) if (slot.job) this.cancel(slot.job.id);
  }

  /** pixelsInFlight is the sum of the declared pixels of the photos being measured. */
  get pixelsInFlight() {
    return this.slots.reduce((n, s) => n + (s.job && s.job.pixels ? s.job.pixels : 0), 0);
  }

  pump() {
    while (this.queue.length > 0) {
      let slot = this.slots.find((s) => !s.job);
      if (!slot && this.slots.length >= this.size) return;
      // Photos in order, each only while the budget allows (or alone).
      const next = this.queue[0];
      const inFlight = this.pixelsInFlight;
      if (next.pixels && inFlight > 0 && inFlight + next.pixels > this.pixelBudget) return;
      if (!slot) slot = this.startWorker();
      const job = this.queue.shift();
      clearTimeout(slot.idleTimer);
      slot.job = job;
      slot.ready.then(
        () => {
          if (slot.job === job) slot.worker.postMessage(job.message, job.transfer);
        },
        (err) => this.fail(slot, job, err.message),
      );
    }
  }

  startWorker() {
    const worker = this.spawn();
    this.started++;
    const slot = { worker, job: null, idleTimer: 0 };
    slot.ready = new Promise((resolve, reject) => {
      slot.resolveReady = resolve;
      slot.rejectReady = reject;
    });
    slot.ready.catch(() => {}); // handled through the job that waits on it
    worker.onmessage = (ev) => this.receive(slot, ev.data);
    worker.onerror = (ev) => {
      ev.preventDefault();
      const message = ev.message || 'the measuring worker stopped';
      slot.rejectReady(new Error(message));
      if (slot.job) this.fail(slot, slot.job, message);
      else this.retire(slot);
    };
    worker.postMessage({ type: TO_WORKER.init, module: this.module });
    this.slots.push(slot);
    return slot;
  }

  receive(slot, msg) {
    if (msg.type === FROM_WORKER.ready) {
      this.functions = new Set(msg.functions || []);
      slot.resolveReady();
      return;
    }
    if (msg.type === FROM_WORKER.error && msg.id === 0) {
      slot.rejectReady(new Error(msg.message));
      return;
    }
    const job = slot.job;
    if (!job || msg.id !== job.id) return; // stale reply of a cancelled job
    switch (msg.type) {
      case FROM_WORKER.progress:
        if (job.onProgress) job.onProgress(msg.stage, msg.fraction);
        break;
      case FROM_WORKER.result:
        this.finish(slot, msg.memory);
        job.resolve({ result: msg.result, preview: msg.preview });
        break;
      case FROM_WORKER.error:
        if (msg.fatal) this.fail(slot, job, msg.message);
        else {
          this.finish(slot, msg.memory);
          const err = new Error(msg.message);
          err.fileFault = msg.fileFault === true; // measuring it again cannot help
          job.reject(err);
        }
        break;
    }
  }

  // finish frees a slot after a job and schedules the next one; a worker
  // whose memory (bytes, as it reported) passed the limit is replaced.
  finish(slot, memory = 0) {
    slot.job = null;
    if (memory > this.memoryLimit) {
      this.recycled++;
      this.retire(slot);
      this.pump();
      return;
    }
    this.pump();
    if (!slot.job && this.idleMs > 0) {
      slot.idleTimer = setTimeout(() => {
        if (!slot.job) this.retire(slot);
      }, this.idleMs);
    }
  }

  // fail rejects the job of a dead worker, replaces the worker and goes on.
  fail(slot, job, message) {
    this.retire(slot);
    job.reject(new Error(`the measuring engine stopped (${message}); a fresh one is ready`));
    this.pump();
  }

  retire(slot) {
    clearTimeout(slot.idleTimer);
    slot.worker.terminate();
    slot.job = null;
    this.slots = this.slots.filter((s) => s !== slot);
  }
}

/**
 * poolSize chooses how many workers to run: one per core up to 4 (leaving a
 * core to the page on machines with more than two), fewer when the device
 * reports little memory, since each instance may hold ~110 MB (24 MP) or
 * more for bigger photos, and a quarter of the memory is a polite share.
 * (The pixel budget above bounds what large photos hold together.)
 */
export function poolSize(cores = navigator.hardwareConcurrency || 2, memoryGB = navigator.deviceMemory || 4) {
  const byCores = cores <= 2 ? cores : Math.min(cores - 1, 4);
  const byMemory = Math.max(1, Math.floor((memoryGB * 1024) / 4 / 110));
  return Math.max(1, Math.min(byCores, byMemory));
}
