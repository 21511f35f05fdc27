#!/usr/bin/env node
// Bytes allocated per pass of a solve, measured with no garbage collection in between.
//
// The process runs with a young generation far larger than what is measured
// (--min-semi-space-size = --max-semi-space-size = 512 MB, re-spawned with those flags when
// started without them), so that nothing is collected while the passes run: the growth of the
// young generation (v8.getHeapSpaceStatistics(): new space and new large-object space) over N
// passes is then every byte those passes allocated (the compiler's code and feedback, which
// land in the old spaces as functions warm up, are left out). A PerformanceObserver('gc') checks that no collection ran during a measurement
// (a case where one did is shown as such, not as a figure). The harness's own cost (the
// statistics objects, the loop) is measured the same way with no work and subtracted.
//
// Cases, on each demo flowsheet (this tree's src/, bundled with esbuild, so that the tear
// problem is reachable; --root DIR measures another tree, e.g. a `git archive` of main):
//   pass         one evaluation of the tear function g(x) near the solution (x alternating
//                between the solution and a point 1e-6 off, as an iteration moves it), the
//                passes of an iteration (Wegstein's, direct substitution's, Newton's columns)
//   solve/pass   a whole continued solve (Newton from the previous point's solution and tear
//                Jacobian, as a sweep's next point starts), divided by its passes: the result's
//                assembly included
//
//   node bench/alloc.mjs [--root DIR] [--passes 2000] [--json] [--where CASE [--depth 4]]
// --where CASE prints the functions that allocate most in that case (V8's sampling heap
// profiler, which with no collection sees every sampled allocation), by their stack's top
// --depth frames.
import { build } from 'esbuild';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { PerformanceObserver } from 'node:perf_hooks';
import v8 from 'node:v8';

const SEMI_MB = 512;
const here = dirname(fileURLToPath(import.meta.url));
const args = process.argv.slice(2);
const value = (f, d) => (args.includes(f) ? args[args.indexOf(f) + 1] : d);

if (!process.execArgv.some((a) => a.startsWith('--max-semi-space-size'))) {
  const r = spawnSync(process.execPath, [`--min-semi-space-size=${SEMI_MB}`, `--max-semi-space-size=${SEMI_MB}`, '--expose-gc', fileURLToPath(import.meta.url), ...args], { stdio: 'inherit' });
  process.exit(r.status ?? 1);
}

const root = resolve(value('--root', join(here, '..')));
const N = Number(value('--passes', 2000));
const json = args.includes('--json');
const where = value('--where', undefined);
const depth = Number(value('--depth', 4));

// The tree's own modules, bundled: createRuntime, the tear problem, the solve, the parameter layer.
const tmp = mkdtempSync(join(tmpdir(), 'loopclose-alloc-'));
const entry = join(tmp, 'entry.ts');
writeFileSync(entry, [
  `export { loadFlowsheet } from ${JSON.stringify(join(root, 'src/flowsheet/load.ts'))};`,
  `export { createRuntime } from ${JSON.stringify(join(root, 'src/flowsheet/runtime.ts'))};`,
  `export { tearProblem, freshFeed } from ${JSON.stringify(join(root, 'src/flowsheet/tear-problem.ts'))};`,
  `export { solveFlowsheet } from ${JSON.stringify(join(root, 'src/flowsheet/solve.ts'))};`,
  `export { parameter, withValues } from ${JSON.stringify(join(root, 'src/study/parameters.ts'))};`,
].join('\n'));
const outfile = join(tmp, 'lib.mjs');
const banner = { js: "import { createRequire as __r } from 'node:module'; const require = __r(import.meta.url);" };
await build({ entryPoints: [entry], bundle: true, platform: 'node', format: 'esm', target: 'node20', outfile, banner, logLevel: 'warning', nodePaths: [join(here, '..', 'node_modules')] });
const lib = await import(pathToFileURL(outfile).href);
rmSync(tmp, { recursive: true, force: true });

// Start times of the collections seen (performance.now() scale): a measurement checks that
// none fell inside its own interval.
const gcTimes = [];
const obs = new PerformanceObserver((list) => {
  for (const e of list.getEntries()) gcTimes.push(e.startTime);
});
obs.observe({ entryTypes: ['gc'] });
const settle = () => new Promise((r) => setImmediate(r));

/**
 * Bytes in the young generation (new space and its large-object space): where every object a
 * pass creates is put. The old spaces are left out: the compiler's code and feedback land
 * there as the functions warm up, which is not the passes' allocation.
 */
function young() {
  let b = 0;
  for (const s of v8.getHeapSpaceStatistics()) if (s.space_name === 'new_space' || s.space_name === 'new_large_object_space') b += s.space_used_size;
  return b;
}

/** Bytes allocated by `count` calls of fn, and whether a collection ran meanwhile. */
async function bytesOf(fn, count) {
  globalThis.gc();
  await settle();
  const t0 = performance.now();
  const h0 = young();
  for (let k = 0; k < count; k++) fn(k);
  const h1 = young();
  const t1 = performance.now();
  await new Promise((r) => setTimeout(r, 20));
  return { bytes: h1 - h0, collected: gcTimes.some((t) => t >= t0 && t <= t1) };
}
const harness = (await bytesOf(() => {}, N)).bytes;

/** Per call: median of five measurements of `count` calls, less the harness. */
async function perCall(fn, count) {
  const runs = [];
  let collected = false;
  for (let r = 0; r < 5; r++) {
    const m = await bytesOf(fn, count);
    collected ||= m.collected;
    runs.push((m.bytes - harness) / count);
  }
  runs.sort((a, b) => a - b);
  return { bytes: Math.max(0, runs[2]), collected };
}

// The studies of the demos: a parameter moved a little from point to point, as a sweep does.
const DEMOS = [
  { file: 'methanol-pilot.yaml', path: 'reactor.reactions.0.conversion', step: 1e-4 },
  { file: 'methanol-pilot-split.yaml', path: 'reactor.reactions.0.conversion', step: 1e-4 },
  { file: 'methanol-pilot-equilibrium.yaml', path: 'purge-split.out.purge', step: 1e-5 },
  { file: 'ammonia-loop.yaml', path: 'purge-split.out.purge', step: 1e-5 },
  { file: 'ammonia-loop-two-beds.yaml', path: 'purge-split.out.purge', step: 1e-5 },
  { file: 'benzene-hydrogenation.yaml', path: undefined, step: 0 },
];

const rows = [];
for (const d of DEMOS) {
  const { model } = lib.loadFlowsheet(join(root, 'flowsheets', d.file));
  const rt = lib.createRuntime(model);
  const base = lib.solveFlowsheet(model, { runtime: rt });
  if (base.status !== 'converged') {
    rows.push({ case: d.file, error: `does not converge (${base.status})` });
    continue;
  }
  const xs = Float64Array.from(base.x);
  const row = { case: d.file.replace('.yaml', ''), tears: xs.length };
  // pass: g at the solution and 1e-6 off it, alternately.
  if (xs.length > 0) {
    const problem = lib.tearProblem(rt, Float64Array.from(xs), lib.freshFeed(rt));
    const x1 = Float64Array.from(xs, (v) => v * (1 + 1e-6));
    const out = new Float64Array(xs.length);
    const g = (k) => problem.g(k & 1 ? x1 : xs, out);
    // warm: the compiler done with these functions (its own allocations are not the passes')
    for (let k = 0; k < 3000; k++) g(k);
    const m = await perCall(g, N);
    row.pass = m.collected ? 'gc ran' : m.bytes;
    if (where === row.case) await profile(g, N, row.case);
  }
  // solve/pass: continued solves along the study's parameter.
  if (d.path) {
    const p = lib.parameter(model, d.path);
    const models = Array.from({ length: 64 }, (_, k) => lib.withValues(model, [{ parameter: p, value: p.value + (k - 32) * d.step }]));
    // as a sweep goes: Newton from the neighbour's solution and its tear Jacobian, the
    // parameter walked up and down
    let start = xs;
    let jacobian;
    let passes = 0;
    const solveAt = (k) => {
      const j = k % 128;
      const r = lib.solveFlowsheet(models[j < 64 ? j : 127 - j], { runtime: rt, start, jacobian, method: 'newton' });
      passes += r.passes;
      if (r.status === 'converged') {
        start = r.x;
        jacobian = r.jacobian;
      }
    };
    for (let k = 0; k < 400; k++) solveAt(k);
    const count = Math.max(20, Math.round(N / 20));
    passes = 0;
    const m = await perCall(solveAt, count);
    const passesPerSolve = passes / (5 * count);
    row.passesPerSolve = passesPerSolve;
    row.solve = m.collected ? 'gc ran' : m.bytes;
    row.solvePerPass = m.collected ? 'gc ran' : m.bytes / passesPerSolve;
    if (where === `${row.case}/solve`) await profile(solveAt, count, `${row.case}/solve`);
  }
  rows.push(row);
}

async function profile(fn, count, label) {
  const { Session } = await import('node:inspector');
  const s = new Session();
  s.connect();
  const post = (m, p) => new Promise((res, rej) => s.post(m, p, (e, r) => (e ? rej(e) : res(r))));
  globalThis.gc();
  await post('HeapProfiler.startSampling', { samplingInterval: 128, includeObjectsCollectedByMajorGC: true, includeObjectsCollectedByMinorGC: true });
  for (let k = 0; k < count; k++) fn(k);
  const { profile: prof } = await post('HeapProfiler.stopSampling');
  s.disconnect();
  const self = new Map();
  const walk = (n, stack) => {
    const f = n.callFrame;
    const name = `${f.functionName || '(anonymous)'} ${f.url.split('/').pop()}:${f.lineNumber + 1}`;
    const here2 = [name, ...stack];
    if (n.selfSize > 0) {
      const key = here2.slice(0, depth).join(' < ');
      self.set(key, (self.get(key) ?? 0) + n.selfSize);
    }
    for (const c of n.children) walk(c, here2);
  };
  walk(prof.head, []);
  const top = [...self.entries()].sort((a, b) => b[1] - a[1]).slice(0, 25);
  process.stdout.write(`allocation sites of ${label} (sampled, bytes per call):\n`);
  for (const [k, v] of top) process.stdout.write(`${(v / count).toFixed(0).padStart(8)}  ${k}\n`);
}

const f = (v) => (typeof v === 'number' ? (v < 10 ? v.toFixed(1) : v.toFixed(0)) : v ?? '-');
if (json) process.stdout.write(`${JSON.stringify({ root, passes: N, semiSpaceMB: SEMI_MB, rows }, null, 1)}\n`);
else {
  process.stdout.write(`bytes allocated (${root}); no collection during a measurement (young generation ${SEMI_MB} MB); ${N} passes, medians of 5\n`);
  const head = ['flowsheet', 'tear vars', 'B per pass', 'passes/solve', 'B per solve', 'B per pass in a solve'];
  const body = rows.map((r) => (r.error ? [r.case, r.error, '', '', '', ''] : [r.case, r.tears, f(r.pass), f(r.passesPerSolve), f(r.solve), f(r.solvePerPass)]));
  const w = head.map((h, j) => Math.max(h.length, ...body.map((b) => String(b[j]).length)));
  const line = (r) => r.map((c, j) => (j === 0 ? String(c).padEnd(w[j]) : String(c).padStart(w[j]))).join('  ');
  process.stdout.write(`${line(head)}\n${w.map((x) => '-'.repeat(x)).join('  ')}\n${body.map(line).join('\n')}\n`);
}
obs.disconnect();
