#!/usr/bin/env node
// Reconciliation speed on one plant-sized problem (bench/reconcile-problem.ts: a methanol loop,
// 36 variables, 21 balances, 19 readings; an invented scenario with seeded noise).
//
//   node bench/reconcile.mjs [--json] [--quick] [--root DIR]
//
// Figures (median of repeated batches after a warm-up):
//   snapshot        prepared.solve() of one snapshot (analytic Jacobian; and by differences)
//   prepare+solve   reconcile(problem) with its set-up
//   serial          serialElimination on a snapshot with one meter reading 6 % high
//   8760 rows       one prepared problem over a year of hourly snapshots (total), started cold
//                   and started from the previous row's solution
//   demo row        the ammonia demo (DIR/flowsheets/ammonia-loop.yaml) through the plant layer:
//                   one row of its year of data (conversions, reconciliation, serial elimination,
//                   figures), rows in blocks of 100 with warm starts, per row
// The engine is bundled from DIR/src/plant (default: this checkout) with esbuild, so the figure
// does not depend on what the library entry exports.
import { build } from 'esbuild';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { cpus, loadavg, tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { fmt, measure, table } from './timing.mjs';


const here = dirname(fileURLToPath(import.meta.url));
const args = process.argv.slice(2);
const flag = (f) => args.includes(f);
const value = (f, d) => {
  const k = args.indexOf(f);
  return k >= 0 && k + 1 < args.length ? args[k + 1] : d;
};
const json = flag('--json');
const quick = flag('--quick');
const root = resolve(value('--root', join(here, '..')));

const dir = mkdtempSync(join(tmpdir(), 'loopclose-bench-'));
const outfile = join(dir, 'plant.mjs');
const banner = { js: "import { createRequire as __r } from 'node:module'; const require = __r(import.meta.url);" };
// One bundle of the engine and the problem generator (bench/reconcile-problem.ts, also used by
// the tests); the engine comes from DIR/src/plant, the generator from this checkout.
const entry = join(dir, 'entry.ts');
writeFileSync(entry, `export * as plant from ${JSON.stringify(join(root, 'src/plant/index.ts'))};\nexport { prepareRows, rowsOfBlock } from ${JSON.stringify(join(root, 'src/plant/rows.ts'))};\nexport * from ${JSON.stringify(join(here, 'reconcile-problem.ts'))};\n`);
await build({ entryPoints: [entry], bundle: true, platform: 'node', format: 'esm', target: 'node20', outfile, banner, logLevel: 'warning', nodePaths: [join(here, '..', 'node_modules')] });
const { plant, F, problem, steadyState, prepareRows, rowsOfBlock } = await import(pathToFileURL(outfile).href);
rmSync(dir, { recursive: true, force: true });

// ------------------------------------------------------------------ measurements
const state = steadyState();
const reps = quick ? { warmupMs: 50, batchMs: 20, batches: 3 } : { warmupMs: 400, batchMs: 100, batches: 9 };
const p = problem(state, 7);
const prepared = plant.prepareReconciliation(p);
const check = prepared.solve();
const preparedFd = plant.prepareReconciliation(problem(state, 7, { analytic: false }));
const biased = plant.prepareReconciliation(problem(state, 7, { biased: F.makeup }));

// CPU time per call beside the wall-time median: on a shared machine the wall time grows with
// the other processes' load, the process's own CPU time much less.
function cpuPerCall(fn, ms) {
  const c0 = process.cpuUsage();
  const t0 = performance.now();
  let calls = 0;
  while (performance.now() - t0 < ms) {
    fn();
    calls++;
  }
  const c = process.cpuUsage(c0);
  return (c.user + c.system) / 1000 / calls;
}
const cpuMs = quick ? 100 : 1000;
const timed = (fn) => ({ ...measure(fn, reps), cpu: cpuPerCall(fn, cpuMs) });
const snapshot = timed(() => prepared.solve());
const snapshotFd = timed(() => preparedFd.solve());
const fresh = timed(() => plant.reconcile(p));
const serial = timed(() => plant.serialElimination(biased));

// A year of hourly rows: readings re-drawn per row (the same seeded noise every run).
const rows = quick ? 876 : 8760;
const values = [];
for (let r = 0; r < rows; r++) {
  const q = problem(state, 1000 + r);
  values.push(Float64Array.from(q.variables, (v) => (v.measured ? v.measured.value : NaN)));
}
const statuses = {};
const c0 = process.cpuUsage();
const t0 = performance.now();
for (let r = 0; r < rows; r++) {
  const res = prepared.solve({ values: values[r] });
  statuses[res.status] = (statuses[res.status] ?? 0) + 1;
}
const yearMs = performance.now() - t0;
const yearCpu = process.cpuUsage(c0);
const yearCpuMs = (yearCpu.user + yearCpu.system) / 1000;
// The same rows, each started from the previous row's solution.
let previous;
const c1 = process.cpuUsage();
const t1 = performance.now();
for (let r = 0; r < rows; r++) previous = prepared.solve({ values: values[r], start: previous }).x;
const warmMs = performance.now() - t1;
const warmCpu = process.cpuUsage(c1);
const warmCpuMs = (warmCpu.user + warmCpu.system) / 1000;

// The ammonia demo's rows through the plant layer (blocks of 100, warm starts), per row.
const demoFile = join(root, 'flowsheets', 'ammonia-loop.yaml');
const yearFile = join(root, 'flowsheets', 'data', 'ammonia-loop-year.csv');
let demo;
if (existsSync(demoFile) && existsSync(yearFile)) {
  const spec = { file: demoFile, text: readFileSync(demoFile, 'utf8'), readingsFile: yearFile, readingsText: readFileSync(yearFile, 'utf8'), block: 100, frozen: 6, format: 'csv' };
  const ctx = prepareRows(spec);
  // Iterations per solve of the engine over the rows measured (a figure that load does not move).
  let solves = 0;
  let iterations = 0;
  const prep = ctx.plant.prepared;
  const solveOnce = prep.solve.bind(prep);
  prep.solve = (snapshot) => {
    const r = solveOnce(snapshot);
    solves++;
    iterations += r.iterations;
    return r;
  };
  let b = 0;
  const block = () => {
    let n = 0;
    for (const _ of rowsOfBlock(ctx, b)) n++;
    b = (b + 1) % ctx.blocks.length;
    return n;
  };
  const m = measure(block, { ...reps, batchMs: 0 });
  demo = { variables: ctx.plant.network.variables.length, rowMs: m.ms / 100, rowCpuMs: cpuPerCall(block, quick ? 300 : 2000) / 100, iterationsPerSolve: iterations / solves };
}

const out = {
  problem: { variables: p.variables.length, balances: p.constraints.count, readings: p.variables.filter((v) => v.measured).length },
  check: { status: check.status, redundancy: check.redundancy, iterations: check.iterations, globalTest: check.globalTest?.status },
  snapshotMs: snapshot.ms,
  snapshotCpuMs: snapshot.cpu,
  snapshotFdMs: snapshotFd.ms,
  snapshotFdCpuMs: snapshotFd.cpu,
  prepareAndSolveMs: fresh.ms,
  prepareAndSolveCpuMs: fresh.cpu,
  serialMs: serial.ms,
  serialCpuMs: serial.cpu,
  serialFound: serial.last.suspects.map((s) => s.name),
  rows,
  rowsMs: yearMs,
  rowsCpuMs: yearCpuMs,
  rowsWarmMs: warmMs,
  rowsWarmCpuMs: warmCpuMs,
  loadAverage: loadavg()[0],
  rowStatuses: statuses,
  ...(demo ? { demoVariables: demo.variables, demoRowMs: demo.rowMs, demoRowCpuMs: demo.rowCpuMs, demoIterationsPerSolve: demo.iterationsPerSolve } : {}),
};
if (json) {
  process.stdout.write(JSON.stringify(out, null, 2) + '\n');
} else {
  process.stdout.write(`Reconciliation: ${out.problem.variables} variables, ${out.problem.balances} balances, ${out.problem.readings} readings; ` +
    `one snapshot: ${check.status}, redundancy ${check.redundancy}, ${check.iterations} iterations\n`);
  process.stdout.write(
    table(
      ['case', 'wall ms (median)', 'cpu ms'],
      [
        ['snapshot, prepared, analytic Jacobian', fmt(snapshot.ms, 3), fmt(snapshot.cpu, 3)],
        ['snapshot, prepared, differences', fmt(snapshotFd.ms, 3), fmt(snapshotFd.cpu, 3)],
        ['reconcile() with its set-up', fmt(fresh.ms, 3), fmt(fresh.cpu, 3)],
        [`serial elimination, makeup 6 % high (found: ${out.serialFound.join(', ') || 'none'})`, fmt(serial.ms, 3), fmt(serial.cpu, 3)],
        [`${rows} hourly rows, prepared (total)`, fmt(yearMs, 4), fmt(yearCpuMs, 4)],
        [`${rows} hourly rows, each started from the previous (total)`, fmt(warmMs, 4), fmt(warmCpuMs, 4)],
        ...(demo ? [[`ammonia demo through the plant layer (${demo.variables} variables), per row of its year (${demo.iterationsPerSolve.toFixed(2)} iterations per solve)`, fmt(demo.rowMs, 3), fmt(demo.rowCpuMs, 3)]] : []),
      ],
    ) + '\n',
  );
  process.stdout.write(`row statuses: ${JSON.stringify(statuses)}; load average ${loadavg()[0].toFixed(1)} on ${cpus().length} cores\n`);
}
