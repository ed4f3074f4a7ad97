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

import { FROM_WORKER, TO_WORKER, STAGE_MEASURING, STAGE_SUMMING, analyzeMessage, callMessage } from './protocol.js';
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

/**
 * DECODER is who decodes JPEG and 8-bit PNG photos by default (see the
 * Pool's decoder option): the core. The browser's decoder gives the very
 * same pixels (the core decodes JPEG as libjpeg-turbo does, the browsers'
 * decoder; site/test/decoders.test.mjs checks it) but in the page it is
 * slower and larger: the bitmap, its copy out of a canvas and the core's
 * conversion of RGBA to luminance took 1.5 s of a 24 MP photo against 0.9 s
 * for the core's own decoding, and the RGBA bytes are kept at 4 bytes a
 * pixel against the JPEG's 1.5 (README, "Speed in the page").
 * `?decoder=browser` chooses it.
 */
const DECODER = 'core';

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

/** FIRST_RANGE is the length of each worker's first range of targets. */
const FIRST_RANGE = 8;

/**
 * measureRanges shares a photo's targets out in ranges [lo, hi) for the
 * workers: first one short range of edges per worker, so that targets show
 * soon; then each sine pattern alone (the targets after the edges: one costs
 * as much as tens of edges, and measured last they kept one worker busy
 * for a second while the others waited); then the rest of the edges in
 * ranges that shrink as they run out (what is left over twice the workers,
 * 8 to 48 targets), so that the workers end together.
 */
export function measureRanges(targets, edges, workers) {
  const w = Math.max(1, workers);
  const e = Math.max(0, Math.min(edges, targets));
  const out = [];
  let lo = 0;
  for (let k = 0; k < w && lo < e; k++) {
    const hi = Math.min(e, lo + FIRST_RANGE);
    out.push([lo, hi]);
    lo = hi;
  }
  for (let i = e; i < targets; i++) out.push([i, i + 1]);
  while (lo < e) {
    const hi = Math.min(e, lo + Math.max(FIRST_RANGE, Math.min(48, Math.ceil((e - lo) / (2 * w)))));
    out.push([lo, hi]);
    lo = hi;
  }
  return out;
}

export class Pool {
  /**
   * @param {object} o
   * @param {WebAssembly.Module} o.module the compiled core, shared by all workers
   * @param {() => Worker} o.spawn starts a new worker
   * @param {number} o.size largest number of workers
   * @param {number} [o.idleMs] stop a worker after this long without work
   * @param {number} [o.pixelBudget] most pixels measured at once
   * @param {number} [o.memoryLimit] replace a worker whose memory passed this, bytes
   * @param {string} [o.decoder] "browser": JPEG and 8-bit PNG decoded by the
   *   browser where the core allows it; "core": every file by the core
   */
  constructor({ module, spawn, size, idleMs = 30000, pixelBudget = PIXEL_BUDGET, memoryLimit = MEMORY_LIMIT, decoder = DECODER }) {
    this.decoder = decoder;
    this.module = module;
    this.spawn = spawn;
    this.size = Math.max(1, size | 0);
    this.idleMs = idleMs;
    this.pixelBudget = pixelBudget;
    this.memoryLimit = memoryLimit;
    this.recycled = 0; // workers replaced for their memory, for tests and diagnostics
    this.queue = [];
    this.slots = [];
    this.running = []; // photos being found, measured or finished
    this.started = 0; // workers started, for tests and diagnostics
    this.functions = new Set(); // core functions reachable by call()
  }

  /**
   * analyze queues one photo. onProgress(stage, fraction) reports progress;
   * onParts(parts, {measured, targets, decodedBy, frame, plan}) gives each
   * range's parts as they come (the core's analyze.Part: {index, record},
   * {index, rejected}, a sine pattern's {index, star} or {index, grating};
   * records not yet placed in the field; frame: the photo's {width, height,
   * orientation}), and first, once the targets are found, no parts and the
   * plan (the core's analyze.Plan: where each target lies). One
   * worker finds the photo's targets; every free worker then measures a
   * share of them (each decodes the photo itself) and the finder merges and
   * summarises them. Returns {id, promise, cancel}; the promise gives
   * {result, preview, decodedBy} or rejects with an Error (AbortError when
   * cancelled).
   */
  analyze(name, bytes, settings, previewSide, onProgress, onParts) {
    const id = nextId++;
    const pixels = photoPixels(bytes);
    const photo = { name, bytes, settings, previewSide, pixels };
    return this.enqueue({ id, photo, onProgress, onParts, urgent: false, pixels });
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

  /** memory is the WebAssembly memory of the running workers as they last reported it, bytes. */
  get memory() {
    return this.slots.reduce((n, s) => n + (s.memory || 0), 0);
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

  /** cancel stops a job: dropped from the queue, or its workers replaced. */
  cancel(id) {
    const q = this.queue.findIndex((j) => j.id === id);
    if (q >= 0) {
      const [job] = this.queue.splice(q, 1);
      job.reject(new AbortError());
      return;
    }
    const slots = this.slots.filter((s) => s.job && s.job.id === id);
    if (slots.length === 0) return;
    const job = slots[0].job;
    for (const slot of slots) this.retire(slot);
    if (job.photo) this.end(job); // a running WebAssembly call cannot be interrupted
    job.reject(new AbortError());
    this.pump();
  }

  /** cancelAll cancels every queued and running job. */
  cancelAll() {
    for (const job of this.queue.splice(0)) job.reject(new AbortError());
    for (const slot of [...this.slots]) if (slot.job) this.cancel(slot.job.id);
  }

  /** pixelsInFlight is the sum of the declared pixels of the photos each worker holds. */
  get pixelsInFlight() {
    return this.slots.reduce((n, s) => n + (s.job && s.job.pixels ? s.job.pixels : 0), 0);
  }

  pump() {
    for (;;) {
      let slot = this.slots.find((s) => !s.job);
      if (!slot && this.slots.length >= this.size) return;
      const inFlight = this.pixelsInFlight;
      // A waiting job first: calls, then photos in order, each only while
      // the budget allows (or alone).
      const next = this.queue[0];
      if (next && !(next.pixels && inFlight > 0 && inFlight + next.pixels > this.pixelBudget)) {
        if (!slot) slot = this.startWorker();
        this.queue.shift();
        this.begin(slot, next);
        continue;
      }
      // Else help a running photo with targets still to measure.
      const photo = this.running.find((j) => this.wantsHelp(j) && inFlight + j.pixels <= this.pixelBudget);
      if (!photo) return;
      if (!slot) slot = this.startWorker();
      this.help(slot, photo);
    }
  }

  // begin sends a job to a worker: a call, or a photo to find (the worker
  // becomes the photo's finder).
  begin(slot, job) {
    clearTimeout(slot.idleTimer);
    slot.job = job;
    if (job.photo) {
      const p = job.photo;
      job.finder = slot;
      job.helpers = new Set();
      job.state = 'finding';
      this.running.push(job);
      // The finder gets the photo's bytes; a copy stays for helpers.
      const bytes = p.bytes;
      p.bytes = bytes.byteLength > 0 ? bytes.slice(0) : bytes;
      const { message, transfer } = analyzeMessage(job.id, p.name, bytes, p.settings, p.previewSide, this.decoder);
      job.message = message;
      this.send(slot, job, message, transfer);
    } else {
      this.send(slot, job, job.message, job.transfer);
    }
  }

  // wantsHelp reports whether a photo could use one more worker.
  wantsHelp(job) {
    if (!(job.pixels > 0) || job.helpers.size + 1 >= this.size) return false;
    if (job.state === 'finding') return true;
    return job.state === 'measuring' && job.pending.length > 1;
  }

  // help makes a worker a helper of a running photo: it decodes the photo
  // now and measures ranges of its targets once they are found.
  help(slot, job) {
    clearTimeout(slot.idleTimer);
    slot.job = job;
    slot.prepared = false;
    slot.planned = false;
    job.helpers.add(slot);
    const p = job.photo;
    const bytes = p.bytes.slice(0);
    this.send(slot, job, { type: TO_WORKER.prepare, id: job.id, name: p.name, bytes, settings: JSON.stringify(p.settings), decoder: this.decoder }, [bytes]);
  }

  // send posts a message once the worker is ready; a worker that failed
  // to start fails the job.
  send(slot, job, message, transfer = []) {
    slot.working = true;
    slot.ready.then(
      () => {
        if (slot.job === job) slot.worker.postMessage(message, transfer);
      },
      (err) => this.fail(slot, job, err.message),
    );
  }

  startWorker() {
    const worker = this.spawn();
    this.started++;
    const slot = { worker, job: null, idleTimer: 0, memory: 0 };
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
    if (msg.memory) slot.memory = msg.memory;
    slot.working = false;
    if (job.photo && job.finder !== slot) return this.fromHelper(slot, job, msg);
    switch (msg.type) {
      case FROM_WORKER.progress:
        slot.working = true;
        if (job.onProgress && job.state === 'finding') job.onProgress(msg.stage, msg.fraction);
        break;
      case FROM_WORKER.found:
        this.found(job, msg);
        break;
      case FROM_WORKER.measured:
        this.measured(slot, job, msg);
        break;
      case FROM_WORKER.result:
        if (job.photo) this.end(job);
        this.finish(slot, msg.memory);
        job.resolve({ result: typeof msg.resultJSON === 'string' ? JSON.parse(msg.resultJSON) : msg.result, preview: msg.preview, decodedBy: msg.decodedBy });
        break;
      case FROM_WORKER.error:
        if (job.photo) this.end(job);
        if (msg.fatal) this.fail(slot, job, msg.message);
        else {
          this.finish(slot, msg.memory);
          const err = new Error(msg.message);
          err.fileFault = msg.fileFault === true; // measuring it again cannot help
          job.reject(err);
        }
        break;
    }
    this.pump();
  }

  // found starts the measuring of a photo's targets, in ranges shared out
  // to its finder and its helpers.
  found(job, msg) {
    job.state = 'measuring';
    job.targets = msg.targets;
    job.plan = msg.plan;
    job.decodedBy = msg.decodedBy;
    job.frame = { width: msg.width, height: msg.height, orientation: msg.orientation || 0 };
    job.parts = [];
    job.measured = 0;
    let plan = null;
    try {
      plan = JSON.parse(msg.plan);
    } catch {
      // a plan this page cannot read: every target is measured as an edge would be
    }
    const edges = plan && Array.isArray(plan.regions) ? plan.regions.length : msg.targets;
    job.pending = measureRanges(msg.targets, edges, this.size);
    job.outstanding = 0;
    if (job.onProgress) job.onProgress(STAGE_MEASURING, 0.3);
    if (job.onParts && plan) {
      try {
        // The targets found, before any is measured.
        job.onParts([], { measured: 0, targets: job.targets, decodedBy: job.decodedBy, frame: job.frame, plan });
      } catch {
        // showing the targets early is a courtesy; the result does not depend on it
      }
    }
    this.dispatch(job);
  }

  // dispatch gives a range of targets to every idle worker of a photo, and
  // asks the finder to finish once all are measured.
  dispatch(job) {
    if (job.state !== 'measuring') return;
    const callWaits = this.queue.some((j) => j.urgent);
    for (const slot of [job.finder, ...job.helpers]) {
      if (slot.working || (slot !== job.finder && !slot.prepared)) continue;
      if (slot !== job.finder && callWaits && job.pending.length > 0) {
        this.release(slot, job); // a quick call waits: the helper takes it instead of the next range
        continue;
      }
      const range = job.pending.shift();
      if (!range) break;
      job.outstanding++;
      const message = { type: TO_WORKER.measure, id: job.id, lo: range[0], hi: range[1] };
      if (slot !== job.finder && !slot.planned) {
        message.plan = job.plan;
        slot.planned = true;
      }
      slot.range = range;
      this.send(slot, job, message);
    }
    for (const slot of [...job.helpers]) if (!slot.working && job.pending.length === 0) this.release(slot, job);
    if (job.pending.length === 0 && job.outstanding === 0) {
      job.state = 'finishing';
      if (job.onProgress) job.onProgress(STAGE_SUMMING, 0.9);
      const parts = '[' + job.parts.filter((t) => t.length > 2).map((t) => t.slice(1, -1)).join(',') + ']';
      job.parts = null;
      job.photo.bytes = null;
      this.send(job.finder, job, { type: TO_WORKER.finish, id: job.id, parts });
    }
  }

  // measured takes a range's parts and hands out the next range.
  measured(slot, job, msg) {
    job.outstanding--;
    if (slot !== job.finder) job.parts.push(msg.parts); // the finder keeps its own (wasm/stages.go)
    job.measured += msg.hi - msg.lo;
    if (job.onParts) {
      try {
        job.onParts(JSON.parse(msg.parts), { measured: job.measured, targets: job.targets, decodedBy: job.decodedBy, frame: job.frame });
      } catch {
        // showing early targets is a courtesy; the result does not depend on it
      }
    }
    if (job.onProgress) job.onProgress(STAGE_MEASURING, 0.3 + (0.6 * job.measured) / Math.max(1, job.targets));
    this.dispatch(job);
  }

  // fromHelper handles the replies of a worker helping with a photo. A
  // helper that fails is let go and its range measured by another.
  fromHelper(slot, job, msg) {
    if (job.state === 'done' && (msg.type === FROM_WORKER.prepared || msg.type === FROM_WORKER.measured)) {
      this.release(slot, job); // the photo ended meanwhile
      return;
    }
    switch (msg.type) {
      case FROM_WORKER.prepared:
        slot.prepared = true;
        if (job.state === 'measuring' && job.pending.length > 0) this.dispatch(job);
        else if (job.state !== 'finding') this.release(slot, job);
        break;
      case FROM_WORKER.measured:
        slot.range = null;
        this.measured(slot, job, msg);
        break;
      case FROM_WORKER.error:
        job.helpers.delete(slot);
        if (slot.range) {
          job.pending.unshift(slot.range);
          job.outstanding--;
          slot.range = null;
        }
        if (msg.fatal) this.retire(slot);
        else this.finish(slot, msg.memory);
        this.dispatch(job);
        break;
      default:
        slot.working = true; // progress of a helper: not shown
    }
    this.pump();
  }

  // release lets a helper go: it drops the photo (the worker runs its
  // messages in order, so the slot is free at once).
  release(slot, job) {
    job.helpers.delete(slot);
    slot.ready.then(() => slot.worker.postMessage({ type: TO_WORKER.release, id: job.id }), () => {});
    this.finish(slot, slot.memory);
  }

  // end takes a photo off the running list and lets its helpers go.
  end(job) {
    this.running = this.running.filter((j) => j !== job);
    job.state = 'done';
    job.photo.bytes = null;
    for (const slot of [...(job.helpers || [])]) this.release(slot, job);
  }

  // finish frees a slot after a job and schedules the next one; a worker
  // whose memory (bytes, as it reported) passed the limit is replaced.
  finish(slot, memory = 0) {
    slot.job = null;
    slot.working = false;
    slot.range = null;
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
    if (job.photo && job.finder !== slot) {
      // a helper that died: its range goes back to the others
      this.fromHelper(slot, job, { type: FROM_WORKER.error, id: job.id, fatal: true });
      return;
    }
    if (job.photo) this.end(job);
    this.retire(slot);
    job.reject(new Error(`the measuring engine stopped (${message}); a fresh one is ready`));
    this.pump();
  }

  retire(slot) {
    clearTimeout(slot.idleTimer);
    slot.worker.terminate();
    if (slot.job && slot.job.helpers) slot.job.helpers.delete(slot);
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
