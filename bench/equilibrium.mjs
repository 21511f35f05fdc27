#!/usr/bin/env node
// Speed of the chemical-equilibrium solver (src/thermo/equilibrium.ts) as a reactor calls it on
// every flowsheet pass: microseconds per solve, warm-started from the last extents, with the inlet
// moved a little on every call, into one result object; the same cold (built-in start); and the
// adiabatic converter (equilibrium-adiabatic.ts) warm-started from the last outlet temperature.
//
//   node bench/equilibrium.mjs [--json] [--quick]
//
// The script uses the library build (dist/index.mjs; `node build.mjs` first). Every figure is the
// median of repeated batches after a warm-up (bench/timing.mjs). The aim (an equilibrium reactor
// adds at most 2x to the time per pass of the same loop at fixed conversion) is measured on whole
// loops by `node bench/run.mjs --only equilibrium`, which also prints these figures.
import { existsSync } from 'node:fs';
import { cpus, loadavg } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { fmt, measure, table } from './timing.mjs';

const here = dirname(fileURLToPath(import.meta.url));

/** Figures with `lib` (exports findComponent, makeEos, prepareEquilibrium, solveAdiabaticEquilibrium, phaseEnthalpy). */
export function measureEquilibrium(lib, { quick = false } = {}) {
  const reps = quick ? { warmupMs: 50, batchMs: 20, batches: 3 } : { warmupMs: 400, batchMs: 100, batches: 9 };
  const prep = (eosName, ids, reactions) => {
    const eos = lib.makeEos(eosName, ids.map((id) => lib.findComponent(id)));
    const p = lib.prepareEquilibrium(eos, reactions);
    if (p.status !== 'ok') throw new Error(p.problems.map((q) => q.message).join('; '));
    return { eos, solver: p.solver };
  };
  const nh3Ids = ['N2', 'H2', 'NH3', 'CH4', 'Ar'];
  const nh3 = { nu: [-1, -3, 2, 0, 0] };
  const meohIds = ['H2', 'CO', 'CO2', 'H2O', 'CH3OH', 'N2', 'CH4'];
  const synth = { nu: [-3, 0, -1, 1, 1, 0, 0] };
  const shift = { nu: [-1, 1, -1, 1, 0, 0, 0] };
  const cases = [
    { label: 'ammonia, SRK, 5 comp., 723 K, 300 atm', eos: 'SRK', ids: nh3Ids, rx: [nh3], T: 723.15, P: 300 * 101325, flows: [0.22, 0.66, 0.03, 0.06, 0.03] },
    { label: 'ammonia, ideal gas, 723 K, 300 atm', eos: 'ideal', ids: nh3Ids, rx: [nh3], T: 723.15, P: 300 * 101325, flows: [0.22, 0.66, 0.03, 0.06, 0.03] },
    { label: 'methanol + shift, SRK, 7 comp., 523 K, 80 bar', eos: 'SRK', ids: meohIds, rx: [synth, shift], T: 523.15, P: 80e5, flows: [0.6, 0.08, 0.08, 0.002, 0.005, 0.05, 0.1] },
    { label: 'the same, approaches 10 K (two temperatures)', eos: 'SRK', ids: meohIds, rx: [{ ...synth, approach: 10 }, { ...shift, approach: 10 }], T: 523.15, P: 80e5, flows: [0.6, 0.08, 0.08, 0.002, 0.005, 0.05, 0.1] },
  ];
  const out = [];
  const rows = [];
  for (const c of cases) {
    const { solver } = prep(c.eos, c.ids, c.rx);
    const result = solver.newResult();
    const flows = Float64Array.from(c.flows);
    const state = { T: c.T, P: c.P, flows, start: new Float64Array(c.rx.length) };
    solver.solve({ T: c.T, P: c.P, flows }, result);
    if (result.status !== 'converged') throw new Error(`${c.label}: ${result.status} ${result.message}`);
    state.start.set(result.extents);
    // Warm: the inlet's first flow moves by up to 0.1 % on every call, as between two passes of a loop.
    let k = 0;
    let evals = 0;
    let calls = 0;
    const warm = measure(() => {
      k = (k + 1) & 15;
      flows[0] = c.flows[0] * (1 + 1e-4 * (k - 8));
      solver.solve(state, result);
      state.start.set(result.extents);
      evals += result.evaluations;
      calls++;
      return result.extents[0];
    }, reps);
    const cold = measure(() => {
      k = (k + 1) & 15;
      flows[0] = c.flows[0] * (1 + 1e-4 * (k - 8));
      return solver.solve({ T: c.T, P: c.P, flows }, result).extents[0];
    }, reps);
    const coldEvals = result.evaluations;
    out.push({ case: c.label, usWarm: warm.ms * 1000, evaluationsWarm: evals / calls, usCold: cold.ms * 1000, evaluationsCold: coldEvals });
    rows.push([c.label, fmt(warm.ms * 1000), (evals / calls).toFixed(1), fmt(cold.ms * 1000), coldEvals]);
  }
  // Adiabatic ammonia converter, warm-started from the last outlet temperature and extents.
  {
    const P = 200e5;
    const Tin = 673.15;
    const inlet = Float64Array.from([0.22, 0.66, 0.03, 0.06, 0.03]);
    const { eos, solver } = prep('SRK', nh3Ids, [nh3]);
    const y = new Float64Array(5);
    const H = (T, f) => {
      let N = 0;
      for (let i = 0; i < 5; i++) N += f[i];
      for (let i = 0; i < 5; i++) y[i] = f[i] / N;
      const v = lib.phaseEnthalpy(eos, T, P, y, 'vapor');
      return v.value * N;
    };
    let Hin = H(Tin, inlet);
    const energy = (T, f) => H(T, f) - Hin;
    const res = lib.newAdiabaticResult(solver);
    const start = new Float64Array(1);
    lib.solveAdiabaticEquilibrium(solver, { P, flows: inlet }, energy, { Tmin: 500, Tmax: 1100, T0: Tin }, res);
    if (res.status !== 'converged') throw new Error(`adiabatic: ${res.message}`);
    let T0 = res.T;
    start.set(res.equilibrium.extents);
    let k = 0;
    let evals = 0;
    let calls = 0;
    const warm = measure(() => {
      k = (k + 1) & 15;
      inlet[0] = 0.22 * (1 + 1e-4 * (k - 8));
      Hin = H(Tin, inlet);
      lib.solveAdiabaticEquilibrium(solver, { P, flows: inlet, start }, energy, { Tmin: 500, Tmax: 1100, T0 }, res);
      T0 = res.T;
      start.set(res.equilibrium.extents);
      evals += res.evaluations;
      calls++;
      return res.T;
    }, reps);
    const label = 'adiabatic ammonia converter, SRK, 200 bar';
    out.push({ case: label, usWarm: warm.ms * 1000, equilibriumSolvesWarm: evals / calls });
    rows.push([label, fmt(warm.ms * 1000), `${(evals / calls).toFixed(1)} solves`, '', '']);
  }
  return { cases: out, rows };
}

export const EQUILIBRIUM_HEADER = ['case', 'us/solve warm', 'evals warm', 'us/solve cold', 'evals cold'];

if (process.argv[1] && fileURLToPath(import.meta.url) === resolve(process.argv[1])) {
  const args = process.argv.slice(2);
  const json = args.includes('--json');
  const quick = args.includes('--quick');
  const libPath = join(here, '..', 'dist', 'index.mjs');
  if (!existsSync(libPath)) {
    process.stderr.write(`bench: ${libPath} is missing; run \`node build.mjs\` first\n`);
    process.exit(2);
  }
  const lib = await import(pathToFileURL(libPath).href);
  const measured = measureEquilibrium(lib, { quick });
  const out = { machine: { node: process.version, cpus: cpus().length, cpu: cpus()[0]?.model ?? '?' }, quick, cases: measured.cases };
  if (json) {
    process.stdout.write(`${JSON.stringify(out, null, 2)}\n`);
  } else {
    process.stdout.write(`Chemical equilibrium, node ${process.version}, ${out.machine.cpus} x ${out.machine.cpu}\n`);
    process.stdout.write(`medians of repeated batches after warm-up${quick ? ' (--quick: few samples, not for figures)' : ''}; load average ${loadavg().map((v) => v.toFixed(1)).join(' ')}\n\n`);
    process.stdout.write(`${table(EQUILIBRIUM_HEADER, measured.rows)}\n`);
  }
}
