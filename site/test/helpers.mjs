// Helpers of the page's browser tests: files made with the project's own
// tools, the local server, Chromium, simulated drops, and comparisons.

import { spawn, execFileSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import readline from 'node:readline';
import { chromium } from 'playwright-core';
import { before, after } from 'node:test';

export const ROOT = process.env.SAGITTA_ROOT || path.resolve(import.meta.dirname, '../..');
export const BIN = path.join(ROOT, 'bin');
export const OUT = path.join(ROOT, 'site/test/out'); // screenshots, git-ignored
export const WORK = path.join(BIN, 'test'); // generated inputs
fs.mkdirSync(OUT, { recursive: true });
fs.mkdirSync(WORK, { recursive: true });

/** run executes one of the project's commands and returns its stdout. */
export function run(cmd, args) {
  return execFileSync(cmd, args, { cwd: ROOT, encoding: 'utf8', maxBuffer: 256 << 20 });
}

// fresh reports whether file exists and is newer than the program that makes it.
function fresh(file, program) {
  return fs.existsSync(file) && fs.statSync(file).mtimeMs > fs.statSync(program).mtimeMs;
}

/** demoPhoto writes the built-in demo photo (`sagitta demo`), reduced by the factor. */
export function demoPhoto(reduce, name = `demo-${reduce}.jpg`) {
  const file = path.join(WORK, name);
  const prog = path.join(BIN, 'sagitta');
  if (!fresh(file, prog)) run(prog, ['demo', '-reduce', String(reduce), '-o', file]);
  return file;
}

/** testPhoto writes a simulated chart photo with site/testphoto. */
export function testPhoto(name, args) {
  const file = path.join(WORK, name);
  const prog = path.join(BIN, 'testphoto');
  if (!fresh(file, prog)) run(prog, [...args, '-o', file]);
  return file;
}

/** cli runs `sagitta analyze` on files and returns its stdout. */
export function cli(args, files) {
  return run(path.join(BIN, 'sagitta'), ['analyze', ...args, ...files]);
}

/** startServer starts site/serve on a free loopback port; resolves {url, stop}. */
export async function startServer() {
  const proc = spawn(path.join(BIN, 'serve'), ['-addr', '127.0.0.1:0', '-site', 'site', '-gen', 'bin/web', '-dist', 'dist'], { cwd: ROOT, stdio: ['ignore', 'pipe', 'inherit'] });
  const rl = readline.createInterface({ input: proc.stdout });
  const url = await new Promise((resolve, reject) => {
    rl.once('line', resolve);
    proc.once('exit', (c) => reject(new Error('server exited with ' + c)));
  });
  return { url, stop: () => proc.kill('SIGTERM') };
}

/** launch starts Debian's Chromium headless, without any background traffic. */
export function launch() {
  return chromium.launch({
    executablePath: '/usr/bin/chromium',
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking',
      '--disable-component-update', '--disable-sync', '--disable-default-apps', '--disable-extensions'],
  });
}

/**
 * recordRequests records every request of a context; network() returns those
 * whose scheme reaches a network (not blob:, data: or file:).
 */
export function recordRequests(context) {
  const all = [];
  context.on('request', (r) => all.push({ url: r.url(), t: Date.now() }));
  return {
    all,
    network: (since = 0) => all.filter((r) => r.t >= since && !/^(blob|data|file):/.test(r.url)),
  };
}

/** dropFiles drops files on the drop zone as a user would: dragenter, dragover, drop with a DataTransfer. */
export async function dropFiles(page, files) {
  const payload = files.map((f) => ({ name: path.basename(f), type: mime(f), b64: fs.readFileSync(f).toString('base64') }));
  await page.evaluate((items) => {
    const dt = new DataTransfer();
    for (const it of items) {
      const bin = atob(it.b64);
      const u8 = new Uint8Array(bin.length);
      for (let i = 0; i < bin.length; i++) u8[i] = bin.charCodeAt(i);
      dt.items.add(new File([u8], it.name, { type: it.type }));
    }
    const dz = document.getElementById('dropzone');
    for (const type of ['dragenter', 'dragover', 'drop']) dz.dispatchEvent(new DragEvent(type, { dataTransfer: dt, bubbles: true, cancelable: true }));
  }, payload);
}

function mime(f) {
  return { '.jpg': 'image/jpeg', '.jpeg': 'image/jpeg', '.png': 'image/png', '.tif': 'image/tiff', '.tiff': 'image/tiff', '.dng': 'image/x-adobe-dng' }[path.extname(f).toLowerCase()] || 'application/octet-stream';
}

/** waitStatus waits until document.body.dataset.status is one of the given values. */
export async function waitStatus(page, wanted, timeout = 180000) {
  await page.waitForFunction((w) => w.includes(document.body.dataset.status), wanted, { timeout, polling: 50 });
  return page.evaluate(() => document.body.dataset.status);
}

/** waitEngine waits until the page's measuring engine has started. */
export function waitEngine(page) {
  return page.waitForFunction(() => document.body.dataset.engine === 'ready', null, { timeout: 60000 });
}

/**
 * diff compares two JSON values; numbers may differ by tol. It returns the
 * first difference as "path: a != b", or "" when they agree.
 */
export function diff(a, b, tol, at = '$') {
  if (typeof a === 'number' && typeof b === 'number') return Math.abs(a - b) <= tol ? '' : `${at}: ${a} != ${b}`;
  if (a === null || b === null || typeof a !== 'object' || typeof b !== 'object') return a === b ? '' : `${at}: ${JSON.stringify(a)} != ${JSON.stringify(b)}`;
  if (Array.isArray(a) !== Array.isArray(b)) return `${at}: array and object`;
  const ka = Object.keys(a);
  const kb = Object.keys(b);
  if (ka.length !== kb.length || ka.some((k, i) => k !== kb[i])) return `${at}: keys ${ka} != ${kb}`;
  for (const k of ka) {
    const d = diff(a[k], b[k], tol, `${at}.${k}`);
    if (d) return d;
  }
  return '';
}

/** shot saves a screenshot under site/test/out. */
export function shot(target, name, opts = {}) {
  return target.screenshot({ path: path.join(OUT, name + '.png'), ...opts });
}

/** download clicks an element and returns the downloaded file's text. */
export async function download(page, click) {
  const [d] = await Promise.all([page.waitForEvent('download'), click()]);
  const p = await d.path();
  return { name: d.suggestedFilename(), text: fs.readFileSync(p, 'utf8'), bytes: fs.readFileSync(p) };
}

// useServedPage registers hooks that start the local server and a browser
// before a test file's tests and stop both after them; the returned object
// holds them (env.server, env.browser) once the tests run.
export function useServedPage() {
  const env = {};
  before(async () => {
    env.server = await startServer();
    env.browser = await launch();
  });
  after(async () => {
    await env.browser?.close();
    env.server?.stop();
  });
  return env;
}

/**
 * sampleRSS samples, every 250 ms, the resident memory (VmRSS from /proc) of
 * the processes this test process started (the browser and its renderers,
 * GPU-less helpers and workers), summed. now() gives the current sum,
 * stop() ends sampling and gives the peak, in bytes.
 */
export function sampleRSS(rootPid = process.pid) {
  let peak = 0;
  const tree = () => {
    const kids = new Map();
    for (const d of fs.readdirSync('/proc')) {
      if (!/^\d+$/.test(d)) continue;
      try {
        const st = fs.readFileSync(`/proc/${d}/stat`, 'utf8');
        const ppid = +st.slice(st.lastIndexOf(')') + 2).split(' ')[1];
        if (!kids.has(ppid)) kids.set(ppid, []);
        kids.get(ppid).push(+d);
      } catch {
        // a process that just ended
      }
    }
    const all = [];
    const walk = (p) => {
      all.push(p);
      for (const k of kids.get(p) || []) walk(k);
    };
    walk(rootPid);
    return all.filter((p) => {
      if (p === rootPid) return false;
      try {
        return fs.readFileSync(`/proc/${p}/comm`, 'utf8').trim() !== 'serve'; // the page's server is not the browser
      } catch {
        return false;
      }
    });
  };
  const rss = () => {
    let sum = 0;
    for (const p of tree()) {
      try {
        const m = /VmRSS:\s+(\d+) kB/.exec(fs.readFileSync(`/proc/${p}/status`, 'utf8'));
        if (m) sum += +m[1] * 1024;
      } catch {
        // a process that just ended
      }
    }
    return sum;
  };
  const timer = setInterval(() => (peak = Math.max(peak, rss())), 250);
  return { now: rss, stop: () => (clearInterval(timer), (peak = Math.max(peak, rss())), peak) };
}
