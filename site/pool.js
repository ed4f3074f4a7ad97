// A small pool of measuring workers, each holding one instance of the core.
// Jobs wait in one queue; quick calls (CSV, plots, the chart) go ahead of
// photos. Workers start lazily, run one job at a time, and stop after a
// while without work so that their memory (about 110 MB for a 24 MP photo,
// which WebAssembly never gives back) returns to the system. The messages
// are described in protocol.js.

import { FROM_WORKER, TO_WORKER, analyzeMessage, callMessage } from './protocol.js';

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
   */
  constructor({ module, spawn, size, idleMs = 30000 }) {
    this.module = module;
    this.spawn = spawn;
    this.size = Math.max(1, size | 0);
    this.idleMs = idleMs;
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
    const { message, transfer } = analyzeMessage(id, name, bytes, settings, previewSide);
    return this.enqueue({ id, message, transfer, onProgress, urgent: false });
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

  pump() {
    while (this.queue.length > 0) {
      let slot = this.slots.find((s) => !s.job);
      if (!slot) {
        if (this.slots.length >= this.size) return;
        slot = this.startWorker();
      }
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
        this.finish(slot);
        job.resolve({ result: msg.result, preview: msg.preview });
        break;
      case FROM_WORKER.error:
        if (msg.fatal) this.fail(slot, job, msg.message);
        else {
          this.finish(slot);
          job.reject(new Error(msg.message));
        }
        break;
    }
  }

  // finish frees a slot after a job and schedules the next one.
  finish(slot) {
    slot.job = null;
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
 */
export function poolSize(cores = navigator.hardwareConcurrency || 2, memoryGB = navigator.deviceMemory || 4) {
  const byCores = cores <= 2 ? cores : Math.min(cores - 1, 4);
  const byMemory = Math.max(1, Math.floor((memoryGB * 1024) / 4 / 110));
  return Math.max(1, Math.min(byCores, byMemory));
}
