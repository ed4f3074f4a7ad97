// The messages between the page (main thread) and its measuring workers.
//
// Each worker holds one instance of Sagitta's Go core compiled to
// WebAssembly (wasm/main.go) and runs one job at a time. The page keeps a
// small pool of workers (pool.js) and spreads photos over them. This file is
// the one description of the protocol; worker.js (a classic script, which
// cannot import modules) uses the same type strings literally.
//
// Page -> worker
//
//   {type: "init", module}
//       module: a compiled WebAssembly.Module of the core. Sent once, first.
//       The worker instantiates it and answers {type: "ready", functions}
//       (functions: the names in CALLS that this build of the core has), or
//       {type: "error", id: 0, message, fatal: true} if it cannot.
//
//   {type: "analyze", id, name, bytes, settings, previewSide, decoder}
//       Find the targets of one photo (the first of its stages). bytes: the
//       file's ArrayBuffer, transferred (never copied); settings: the
//       analysis settings as a JSON string (the Go type analyze.Settings);
//       previewSide: 0, or the largest side in px of a grey preview to
//       return with the result (for TIFF, which browsers cannot display).
//       With decoder "browser" the worker decodes a JPEG or 8-bit PNG with
//       the browser's decoder when the core allows it (else the core decodes
//       it, silently); with "core" the core decodes every file. It finds
//       the targets, keeps the photo and answers "found".
//   {type: "prepare", id, name, bytes, settings, decoder}
//       Help measure a photo another worker finds: decode it (as the finder
//       does) and answer "prepared".
//   {type: "measure", id, lo, hi, plan}
//       Measure the targets lo..hi-1 of a photo found or prepared here;
//       plan (the finder's, a JSON string) comes with a helper's first
//       range. Answer "measured".
//   {type: "finish", id, parts}
//       To the finder, once every target is measured: parts, the JSON array
//       of every range's parts; the worker merges them in the photo's order,
//       summarises once and answers "result".
//   {type: "release", id}
//       Drop a photo this worker helped with (no answer).
//
//   One photo: analyze -> progress* -> found; then measure -> measured to
//   the finder and to every helper (prepare -> prepared first), range by
//   range, until all are in; then finish -> result. The JSON is the same
//   whichever worker measured which range (core/analyze, Find, Measure,
//   Finish).
//
//   {type: "call", id, fn, args}
//       Run one of the core's other functions (fn: one of CALLS below, the
//       core's list in wasm/functions.go); args: an array of strings,
//       numbers or plain objects. Quick jobs, queued ahead of photos. "resummarise" takes
//       a photo's analysis and new settings (both JSON strings) and gives
//       {image} (the analysis for those settings, without measuring again)
//       or {remeasure: reason} when the settings need the photo measured
//       again (sagittaResummarise in wasm/main.go).
//
// Worker -> page
//
//   {type: "ready", functions}                   after init
//   {type: "found", id, targets, plan, width, height, orientation,
//    decodedBy, memory}
//                                                targets: how many to
//                                                measure (edges, then sine
//                                                patterns); plan: for helpers;
//                                                the photo's size, px, and
//                                                Exif orientation (0: none);
//                                                decodedBy: "browser" or
//                                                "core"
//   {type: "prepared", id, decodedBy, memory}
//   {type: "measured", id, lo, hi, parts, memory}
//                                                parts: JSON array of the
//                                                range's outcomes
//                                                (analyze.Part): an edge's
//                                                record or reason, a sine
//                                                star's or grating's
//                                                measurement
//   {type: "progress", id, stage, fraction}      stage in words ("reading",
//                                                "finding targets",
//                                                "measuring", "summarising"),
//                                                fraction of the job, 0..1
//   {type: "result", id, result | resultJSON, preview, decodedBy, memory}
//                                                resultJSON: for "analyze"
//                                                the photo's analysis as JSON
//                                                text (one entry of the JSON
//                                                contract's "images", parsed
//                                                by the page); result: for
//                                                "call" the function's
//                                                value; preview:
//                                                null or {width, height,
//                                                factor, pixels (Uint8Array,
//                                                grey)}, transferred;
//                                                memory: the worker's
//                                                WebAssembly memory, bytes
//   {type: "error", id, message, fatal, fileFault, memory}
//                                                message: one plain line for
//                                                a person (no package
//                                                prefix); fatal: the Go
//                                                instance is dead and the
//                                                worker must be replaced;
//                                                fileFault: the file itself
//                                                cannot be measured (not an
//                                                image, damaged, too small,
//                                                too large), so measuring it
//                                                again cannot help
//
// Rules
//   - Every reply carries the id of its job; the page drops replies whose id
//     is not the job it is waiting for (a stale reply from a cancelled job).
//   - A Go panic never kills a worker silently: the core turns it into an
//     error message; if the Go program itself has stopped, the error is
//     fatal and the pool replaces the worker.
//   - Cancelling a running job terminates its worker (a running WebAssembly
//     call cannot be interrupted) and starts a fresh one.

/** Message types, page -> worker. */
export const TO_WORKER = Object.freeze({
  init: 'init',
  analyze: 'analyze',
  prepare: 'prepare',
  measure: 'measure',
  finish: 'finish',
  release: 'release',
  call: 'call',
});

/** Message types, worker -> page. */
export const FROM_WORKER = Object.freeze({
  ready: 'ready',
  progress: 'progress',
  found: 'found',
  prepared: 'prepared',
  measured: 'measured',
  result: 'result',
  error: 'error',
});

/** Stage words of the progress the pool reports itself (the core's, core/analyze). */
export const STAGE_MEASURING = 'measuring';
export const STAGE_SUMMING = 'summarising';

/**
 * Functions a "call" message may name: the call names of the core's one
 * list (wasm/functions.go, exported by the core as sagittaFunctions);
 * TestFunctionsMatchPage in wasm/ checks this list and worker.js against it.
 */
export const CALLS = Object.freeze(['csv', 'json', 'plot', 'palette', 'chart', 'plan', 'demo', 'resummarise', 'reference', 'series', 'decoders']);

/**
 * analyzeMessage builds an "analyze" message and its transfer list.
 * @param {number} id
 * @param {string} name file name
 * @param {ArrayBuffer} bytes the file, transferred
 * @param {object} settings analysis settings (see settingsForCore in settings.js)
 * @param {number} previewSide 0 or the largest side of a preview, px
 * @param {string} decoder "browser" or "core" (see Pool)
 */
export function analyzeMessage(id, name, bytes, settings, previewSide, decoder = 'core') {
  return {
    message: { type: TO_WORKER.analyze, id, name, bytes, settings: JSON.stringify(settings), previewSide, decoder },
    transfer: [bytes],
  };
}

/**
 * callMessage builds a "call" message.
 * @param {number} id
 * @param {string} fn one of CALLS
 * @param {Array<string|number>} args
 */
export function callMessage(id, fn, args) {
  if (!CALLS.includes(fn)) throw new Error(`unknown core function "${fn}"`);
  return { message: { type: TO_WORKER.call, id, fn, args }, transfer: [] };
}
