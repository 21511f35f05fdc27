#!/usr/bin/env node
// Before/after of two source trees' plant-data engine in one process, batches interleaved
// (A, B, A, B...) so that both see the same load (bench/compare.mjs does the same for the
// library's solves). Each tree's src/plant is bundled with esbuild, as bench/reconcile.mjs does.
//   node bench/compare-plant.mjs DIR_A DIR_B [--rounds 9]
// Cases (ms per call, medians of the rounds, and the median of the A/B ratios):
//   engine snapshot   prepared.solve() of bench/reconcile-problem.ts (methanol loop, 36 variables)
//   demo snapshot     preparePlant(ammonia demo).run(its readings): conversions, reconciliation,
//                     serial elimination, figures (49 variables, 41 balances)
//   demo rows         a block of 100 rows of the demo's year (flowsheets/data), warm starts, per row
import { build } from 'esbuild';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { fmt, measure, median, table } from './timing.mjs';

const here = dirname(fileURLToPath(import.meta.url));
const args = process.argv.slice(2);
const [dirA, dirB] = args.slice(0, 2).map((d) => resolve(d));
if (!dirA || !dirB) {
  process.stderr.write('usage: node bench/compare-plant.mjs DIR_A DIR_B [--rounds 9]\n');
  process.exit(2);
}
const rounds = args.includes('--rounds') ? Number(args[args.indexOf('--rounds') + 1]) : 9;
const banner = { js: "import { createRequire as __r } from 'node:module'; const require = __r(import.meta.url);" };
const tmp = mkdtempSync(join(tmpdir(), 'loopclose-cmp-plant-'));

async function load(dir, tag) {
  const entry = join(tmp, `entry-${tag}.ts`);
  writeFileSync(entry, [
    `export * as plant from ${JSON.stringify(join(dir, 'src/plant/index.ts'))};`,
    `export { prepareRows, rowsOfBlock } from ${JSON.stringify(join(dir, 'src/plant/rows.ts'))};`,
    `export { loadFlowsheet } from ${JSON.stringify(join(dir, 'src/flowsheet/validate.ts'))};`,
    `export * from ${JSON.stringify(join(here, 'reconcile-problem.ts'))};`,
  ].join('\n'));
  const outfile = join(tmp, `plant-${tag}.mjs`);
  await build({ entryPoints: [entry], bundle: true, platform: 'node', format: 'esm', target: 'node20', outfile, banner, logLevel: 'warning', nodePaths: [join(here, '..', 'node_modules')] });
  return import(pathToFileURL(outfile).href);
}
const libs = [await load(dirA, 'a'), await load(dirB, 'b')];
rmSync(tmp, { recursive: true, force: true });

const demo = (dir) => join(dir, 'flowsheets', 'ammonia-loop.yaml');
const year = (dir) => join(dir, 'flowsheets', 'data', 'ammonia-loop-year.csv');
const { readFileSync } = await import('node:fs');

const cases = [
  ['engine snapshot (methanol, 36 variables)', (lib) => {
    const prepared = lib.plant.prepareReconciliation(lib.problem(lib.steadyState(), 7));
    return () => prepared.solve();
  }, 60],
  ['demo snapshot (ammonia, 49 variables), whole row', (lib, dir) => {
    const { model } = lib.loadFlowsheet(demo(dir));
    const plantRun = lib.plant.preparePlant(model);
    const readings = new Map([...model.readings].map(([tag, r]) => [tag, { value: r.value, fractions: r.fractions, reference: r.reference }]));
    return () => plantRun.run({ readings });
  }, 60],
  ['demo rows (a block of 100 of the year), per row', (lib, dir) => {
    const spec = { file: demo(dir), text: readFileSync(demo(dir), 'utf8'), readingsFile: year(dir), readingsText: readFileSync(year(dir), 'utf8'), block: 100, frozen: 6, format: 'csv' };
    const ctx = lib.prepareRows(spec);
    let b = 0;
    return () => {
      let n = 0;
      for (const _ of lib.rowsOfBlock(ctx, b)) n++;
      b = (b + 1) % ctx.blocks.length;
      return n;
    };
  }, 0, 100],
];

const rows = [];
for (const [label, make, batchMs, perCall = 1] of cases) {
  const fns = [make(libs[0], dirA), make(libs[1], dirB)];
  for (const f of fns) measure(f, { warmupMs: 1000, batchMs: 0, batches: 1 });
  const a = [];
  const b = [];
  const ratios = [];
  for (let r = 0; r < rounds; r++) {
    const ma = measure(fns[0], { warmupMs: 0, warmupCalls: 1, batchMs, batches: 1 }).ms / perCall;
    const mb = measure(fns[1], { warmupMs: 0, warmupCalls: 1, batchMs, batches: 1 }).ms / perCall;
    a.push(ma);
    b.push(mb);
    ratios.push(ma / mb);
  }
  rows.push([label, fmt(median(a)), fmt(median(b)), fmt(median(ratios))]);
}
process.stdout.write(`A = ${dirA}\nB = ${dirB}\nms per call (per row for the block), medians of ${rounds} interleaved batches after warm-up; load average ${loadavg()[0].toFixed(1)}\n`);
process.stdout.write(`${table(['case', 'A ms', 'B ms', 'A/B (median of ratios)'], rows)}\n`);
