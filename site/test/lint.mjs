// The page's static check (make lint-js): every script parses (node
// --check), and between the page's modules every import names a module and
// an export that exist, every imported name is used, and every export is
// imported somewhere (by a page module or a Node test). The modules keep to
// the small subset of the module syntax site/pack/modules.go accepts, so a
// few regular expressions read them exactly. No dependencies: plain Node.
//
//   node site/test/lint.mjs [site directory]

import fs from 'node:fs';
import path from 'node:path';
import { execFileSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';

const here = path.dirname(fileURLToPath(import.meta.url));
const site = path.resolve(process.argv[2] || path.join(here, '..'));
const testDir = path.join(site, 'test');

const importRe = /^import\s*\{([^}]*)\}\s*from\s*'([^']+)';/gm;
const exportRe = /^export\s+(?:async\s+)?(?:function\*?|class|const|let)\s+([A-Za-z_$][\w$]*)/gm;
// Entry points: loaded by the page itself, not imported.
const ENTRIES = new Set(['app.js']);
// Exports read by other tools rather than imported: protocol.js's CALLS is
// checked against the core's list of functions by wasm/functions_test.go.
const READ_ELSEWHERE = new Set(['protocol.js CALLS']);
// Classic scripts (not modules): checked for syntax only.
const CLASSIC = new Set(['worker.js']);

const problems = [];
const modules = fs.readdirSync(site).filter((f) => f.endsWith('.js')).sort();
const tests = fs.readdirSync(testDir).filter((f) => f.endsWith('.mjs')).sort();

// 1. Syntax.
for (const f of [...modules.map((m) => path.join(site, m)), ...tests.map((t) => path.join(testDir, t))]) {
  try {
    execFileSync(process.execPath, ['--check', f], { stdio: 'pipe' });
  } catch (e) {
    problems.push(`${path.relative(site, f)}: does not parse: ${String(e.stderr).trim().split('\n').slice(0, 4).join(' ')}`);
  }
}

// 2. Imports and exports.
function parse(file) {
  const text = fs.readFileSync(file, 'utf8');
  const imports = [];
  for (const m of text.matchAll(importRe)) {
    const names = m[1].split(',').map((s) => s.trim()).filter(Boolean).map((s) => {
      const [name, local] = s.split(/\s+as\s+/);
      return { name: name.trim(), local: (local || name).trim() };
    });
    imports.push({ from: m[2], names, stmt: m[0] });
  }
  const exports = [...text.matchAll(exportRe)].map((m) => m[1]);
  let body = text;
  for (const i of imports) body = body.replace(i.stmt, '');
  return { text, imports, exports, body: stripComments(body) };
}

// stripComments drops // and /* */ comments (outside strings, roughly: the
// modules write no "//" inside a string except in URLs of comments).
function stripComments(s) {
  return s.replace(/\/\*[\s\S]*?\*\//g, '').replace(/(^|[^:'"`\\])\/\/.*$/gm, '$1');
}

const parsed = new Map();
for (const m of modules) if (!CLASSIC.has(m)) parsed.set(m, parse(path.join(site, m)));
const used = new Map([...parsed.keys()].map((m) => [m, new Set()]));

const importers = [...[...parsed.entries()].map(([m, p]) => [m, p, site]), ...tests.map((t) => [path.join('test', t), parse(path.join(testDir, t)), testDir])];
for (const [name, p, dir] of importers) {
  for (const imp of p.imports) {
    if (!imp.from.startsWith('.')) continue; // node: modules and packages
    const target = path.relative(site, path.resolve(dir, imp.from));
    if (!parsed.has(target)) {
      if (!target.startsWith('..') && !target.startsWith('test' + path.sep)) problems.push(`${name}: imports ${imp.from}, which is not one of the page's modules`);
      continue;
    }
    const exp = parsed.get(target).exports;
    for (const n of imp.names) {
      if (!exp.includes(n.name)) problems.push(`${name}: imports ${n.name} from ${imp.from}, which does not export it`);
      else used.get(target).add(n.name);
      if (!new RegExp(`(^|[^\\w$.])${n.local.replace(/\$/g, '\\$')}(?![\\w$])`).test(p.body)) problems.push(`${name}: imports ${n.local} and never uses it`);
    }
  }
}
for (const [m, p] of parsed) {
  if (ENTRIES.has(m)) continue;
  for (const e of p.exports) {
    if (used.get(m).has(e) || READ_ELSEWHERE.has(`${m} ${e}`)) continue;
    // An export the module itself uses is a public helper of it, but still
    // one nothing imports: report it all the same.
    problems.push(`${m}: exports ${e}, which no module or test imports`);
  }
}

if (problems.length) {
  for (const p of problems) console.error('lint-js: ' + p);
  process.exit(1);
}
console.log(`lint-js: ${modules.length} scripts and ${tests.length} tests parse; imports and exports between modules agree`);
