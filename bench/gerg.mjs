#!/usr/bin/env node
// Speed of the GERG-2008 density solve: microseconds per model.density(T, P, x) call.
//
//   node bench/gerg.mjs [--json] [--quick]
//
// Run alone, this script bundles src/thermo/gerg2008/index.ts with esbuild into a temporary folder
// and imports that; `npm run bench` (bench/run.mjs) calls measureGerg() on the library bundle
// (dist/index.mjs exports makeGerg2008). Every figure
// is the median of repeated batches after a warm-up (bench/timing.mjs). On a shared machine the
// wall-clock figure counts time the process waited for a core; the "cpu" column divides this
// process's own CPU time (process.cpuUsage) over the same kind of batches and is the steadier one.
// Aim: one density of a 5-component gas in <= 20 microseconds.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir, cpus, loadavg } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { build } from 'esbuild';
import { fmt, measure, table } from './timing.mjs';

const here = dirname(fileURLToPath(import.meta.url));

const NATURAL_GAS = {
  CH4: 0.77824, N2: 0.02, CO2: 0.06, C2H6: 0.08, C3H8: 0.03, iC4H10: 0.0015, nC4H10: 0.003, iC5H12: 0.0005,
  nC5H12: 0.00165, nC6H14: 0.00215, nC7H16: 0.00088, nC8H18: 0.00024, nC9H20: 0.00015, nC10H22: 0.00009,
  H2: 0.004, O2: 0.005, CO: 0.002, H2O: 0.0001, H2S: 0.0025, He: 0.007, Ar: 0.001,
};
const LOOP_GAS = { H2: 0.7, N2: 0.23, CH4: 0.04, Ar: 0.02, CO: 0.01 };

const cases = [
  { label: '5-component loop gas, 313 K, 150 bar', gas: LOOP_GAS, T: 313.15, P: 150e5, aim: '<= 20' },
  { label: '21-component gas, 280 K, 70 bar', gas: NATURAL_GAS, T: 280, P: 70e5 },
  { label: '21-component gas, 400 K, 500 bar (dense)', gas: NATURAL_GAS, T: 400, P: 500e5 },
];

/** Median CPU time per call (microseconds) over `batches` batches of `calls` calls. */
function cpuMicros(fn, calls, batches) {
  const samples = [];
  for (let b = 0; b < batches; b++) {
    const u0 = process.cpuUsage();
    for (let k = 0; k < calls; k++) fn();
    const u = process.cpuUsage(u0);
    samples.push((u.user + u.system) / calls);
  }
  samples.sort((a, b) => a - b);
  return samples[samples.length >> 1];
}

/**
 * Figures of GERG-2008 density and properties calls with `lib` (anything exporting makeGerg2008):
 * { cases: [...], rows: [...] } for the table below.
 */
export function measureGerg(lib, { quick = false } = {}) {
  const reps = quick ? { warmupMs: 50, batchMs: 20, batches: 3 } : { warmupMs: 500, batchMs: 100, batches: 9 };
  const out = { cases: [] };
  const rows = [];
  for (const c of cases) {
    const ids = Object.keys(c.gas);
    const model = lib.makeGerg2008(ids);
    const x = Float64Array.from(ids, (id) => c.gas[id]);
    const result = model.density(c.T, c.P, x);
    if (result.status !== 'converged') throw new Error(`${c.label}: ${result.status} ${result.message}`);
    // Temperature changed a little on every call: the temperature-dependent sums are recomputed,
    // as for a meter reading that moved. The same object is reused for the result.
    let k = 0;
    const moving = measure(() => {
      k = (k + 1) & 1023;
      return model.density(c.T + k * 1e-3, c.P, x, undefined, result).D;
    }, reps);
    const cpu = cpuMicros(() => {
      k = (k + 1) & 1023;
      model.density(c.T + k * 1e-3, c.P, x, undefined, result);
    }, quick ? 2000 : 20000, quick ? 3 : 9);
    // Same temperature and composition on every call (a repeated state: the sums are kept).
    const fixed = measure(() => model.density(c.T, c.P, x, undefined, result).D, reps);
    // Properties at the converged density (the full set of derivatives and the ideal part).
    const D = model.density(c.T, c.P, x).D;
    const props = lib.makeGerg2008(ids).properties(c.T, D, x);
    const pOut = { ...props };
    let j = 0;
    const properties = measure(() => {
      j = (j + 1) & 1023;
      return model.properties(c.T + j * 1e-3, D, x, pOut).W;
    }, reps);
    const it = model.density(c.T, c.P, x);
    out.cases.push({
      case: c.label, components: ids.length, iterations: it.iterations, evaluations: it.evaluations, phase: it.phase,
      usPerDensity: moving.ms * 1000, cpuUsPerDensity: cpu, usPerDensityRepeatedState: fixed.ms * 1000, usPerProperties: properties.ms * 1000,
    });
    rows.push([c.label, ids.length, `${it.iterations}/${it.evaluations}`, it.phase, fmt(moving.ms * 1000), fmt(cpu), fmt(fixed.ms * 1000), fmt(properties.ms * 1000), c.aim ?? '']);
}
return { cases: out.cases, rows };
}

/** Column headers of the rows measureGerg returns. */
export const GERG_HEADER = ['case', 'n', 'steps/evals', 'phase', 'us/density', 'cpu us/density', 'us (same T)', 'us/properties', 'aim us'];

if (process.argv[1] && fileURLToPath(import.meta.url) === resolve(process.argv[1])) {
  const args = process.argv.slice(2);
  const json = args.includes('--json');
  const quick = args.includes('--quick');
  const dir = mkdtempSync(join(tmpdir(), 'loopclose-gerg-'));
  let lib;
  try {
    const outfile = join(dir, 'gerg.mjs');
    await build({
      entryPoints: [join(here, '..', 'src', 'thermo', 'gerg2008', 'index.ts')],
      outfile, bundle: true, platform: 'node', format: 'esm', target: 'node20', logLevel: 'warning',
    });
    lib = await import(pathToFileURL(outfile).href);
  } finally {
    rmSync(dir, { recursive: true, force: true });
}

const measured = measureGerg(lib, { quick });
const out = { machine: { node: process.version, cpus: cpus().length, cpu: cpus()[0]?.model ?? '?' }, quick, cases: measured.cases };
const rows = measured.rows;
if (json) {
  process.stdout.write(`${JSON.stringify(out, null, 2)}\n`);
} else {
  process.stdout.write(`GERG-2008 density, node ${process.version}, ${out.machine.cpus} x ${out.machine.cpu}\n`);
  process.stdout.write(`medians of repeated batches after warm-up${quick ? ' (--quick: few samples, not for figures)' : ''}; load average ${loadavg().map((v) => v.toFixed(1)).join(' ')}\n\n`);
  process.stdout.write(`${table(GERG_HEADER, rows)}\n`);
}
}
