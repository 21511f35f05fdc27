#!/usr/bin/env node
// Before/after comparison of two builds in one process, batches interleaved (A, B, A, B...) so
// that both see the same load on a shared machine; each figure is the median over the batches.
//   node bench/compare.mjs DIR_A DIR_B [FILTER]   (each DIR holds dist/index.mjs and flowsheets/;
//   FILTER keeps the cases whose label contains it)
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { median, measure, fmt, table } from './timing.mjs';
import { generateFlowsheet } from './generate.mjs';

const [dirA, dirB] = process.argv.slice(2, 4).map((d) => resolve(d));
const filter = process.argv[4] ?? '';
if (!dirA || !dirB) {
  process.stderr.write('usage: node bench/compare.mjs DIR_A DIR_B\n');
  process.exit(2);
}
const libs = [await import(pathToFileURL(join(dirA, 'dist', 'index.mjs')).href), await import(pathToFileURL(join(dirB, 'dist', 'index.mjs')).href)];
const ROUNDS = 9;

/** cases: [label, (lib) => () => work]; returns rows of [label, A ms, B ms, A/B]. */
function compare(label, make, batchMs = 60) {
  if (!label.includes(filter)) return undefined;
  const fns = libs.map(make);
  for (const f of fns) measure(f, { warmupMs: 1000, batchMs: 0, batches: 1 }); // warm both
  const a = [];
  const b = [];
  const ratios = [];
  for (let r = 0; r < ROUNDS; r++) {
    const ma = measure(fns[0], { warmupMs: 0, warmupCalls: 1, batchMs, batches: 1 }).ms;
    const mb = measure(fns[1], { warmupMs: 0, warmupCalls: 1, batchMs, batches: 1 }).ms;
    a.push(ma);
    b.push(mb);
    ratios.push(ma / mb);
  }
  return [label, fmt(median(a)), fmt(median(b)), fmt(median(ratios))];
}

const rows = [];
const gas = (lib, ids, x, T, P, flow) => {
  const eos = lib.makeEos('SRK', ids.map((id) => ({ ...lib.findComponent(id), id })));
  // A build with a meter EOS gets the runtime's one, made once; an earlier build takes two arguments.
  const meter = lib.makeMeterEos ? lib.makeMeterEos('SRK', eos) : undefined;
  const spec = feedSpec(x, flow, T, P);
  let k = 0;
  return () => {
    k = (k + 1) & 1023;
    spec.T = spec.basis.T = T + k * 1e-3;
    return lib.computeFeed(spec, eos, meter);
  };
};
const feedSpec = (x, flow, T, P) => ({ name: 'r', type: 'feed', inlets: [], outlets: ['r'], composition: Float64Array.from(x), basis: { kind: 'meter', flow, T, P }, T, P });
rows.push(compare('meter: pure gas (H2)', (lib) => gas(lib, ['H2'], [1], 308.15, 31.01325e5, 0.0035)));
rows.push(compare('meter: 5-component mixture', (lib) => gas(lib, ['CH4', 'C2H6', 'C3H8', 'N2', 'CO2'], [0.85, 0.07, 0.03, 0.03, 0.02], 298.15, 41.01325e5, 0.07)));
for (const f of ['methanol-pilot.yaml', 'methanol-pilot-split.yaml', 'ammonia-loop.yaml', 'benzene-hydrogenation.yaml']) {
  for (const method of ['wegstein', 'newton', 'auto']) {
    rows.push(compare(`${f.replace('.yaml', '')} ${method}`, (lib, i) => {
      const { model } = lib.loadFlowsheet(join(i === 0 ? dirA : dirB, 'flowsheets', f));
      return () => lib.solveFlowsheet(model, { method });
    }));
  }
}
// One target solve: the recycle share that holds 10 % N2 in the recycle of the methanol demo.
// The library entry changed with the parameter layer (a ParametricFlowsheet before, a frozen
// model and parameters after): each build is driven through its own.
rows.push(compare('target: methanol-pilot, N2 in recycle by the recycle share', (lib, i) => {
  const file = join(i === 0 ? dirA : dirB, 'flowsheets', 'methanol-pilot.yaml');
  const args = ['streams.recycle.fractions.N2 = 0.10', 'purge-split.out.recycle', '0.8:0.999'];
  if (lib.ParametricFlowsheet) {
    const p = new lib.ParametricFlowsheet(file);
    const t = lib.parseTarget(p, ...args);
    return () => lib.solvePoint(p, [], { targets: [t] });
  }
  const { model } = lib.loadFlowsheet(file);
  const t = lib.parseTarget(model, ...args);
  return () => lib.solvePoint(model, [], { targets: [t] });
}, 200));
for (const [N, C, condenser] of [[100, 5, 'equilibrium'], [100, 20, 'split'], [1000, 20, 'split']]) {
  const text = generateFlowsheet({ units: N, components: C, condenser }).text;
  rows.push(compare(`generated ${N} x ${C} ${condenser}`, (lib) => {
    const { model } = lib.validateText('g.yaml', text);
    return () => lib.solveFlowsheet(model);
  }, N >= 1000 ? 0 : 60));
}
process.stdout.write(`A = ${dirA}\nB = ${dirB}\nms per call, medians of ${ROUNDS} interleaved batches after warm-up\n`);
process.stdout.write(`${table(['case', 'A ms', 'B ms', 'A/B (median of ratios)'], rows.filter(Boolean))}\n`);
