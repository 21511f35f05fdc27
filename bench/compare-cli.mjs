#!/usr/bin/env node
// Before/after of two builds through their command line, whole process, runs interleaved
// (A, B, A, B...) so that both see the same load: the 1,000-point sweep of the methanol demo
// (serial, continuation) and one target solve.
//   node bench/compare-cli.mjs DIR_A DIR_B [--repeat 5] [--points 1000]
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';

const [dirA, dirB] = process.argv.slice(2, 4).map((d) => resolve(d));
const arg = (name, dflt) => {
  const k = process.argv.indexOf(name);
  return k > 0 ? Number(process.argv[k + 1]) : dflt;
};
const repeat = arg('--repeat', 5);
const points = arg('--points', 1000);
const tmp = mkdtempSync(join(tmpdir(), 'loopclose-cmp-'));
const median = (xs) => {
  const a = [...xs].sort((x, y) => x - y);
  return a.length % 2 ? a[(a.length - 1) / 2] : (a[a.length / 2 - 1] + a[a.length / 2]) / 2;
};
const cases = [
  ['sweep, 1000 points, serial', (dir) => ['sweep', join(dir, 'flowsheets', 'methanol-pilot.yaml'), '--grid', `reactor.reactions.0.conversion=0.15:0.35:${points}`,
    '--report', 'streams.purge.flows.H2[kmol/h],streams.recycle.fractions.N2,loop.recycle-ratio,reactor.conversion.CO2', '--out', join(tmp, 'o.csv'), '--overwrite']],
  ['solve with one target', (dir) => ['solve', join(dir, 'flowsheets', 'methanol-pilot.yaml'), '--target', 'streams.recycle.fractions.N2 = 0.10', '--by', 'purge-split.out.recycle', '--within', '0.8:0.999']],
  ['solve (start-up and one solve)', (dir) => ['solve', join(dir, 'flowsheets', 'methanol-pilot.yaml')]],
];
const run = (dir, args) => {
  const t0 = process.hrtime.bigint();
  const r = spawnSync(process.execPath, [join(dir, 'bin', 'loopclose.js'), ...args], { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`${dir}: ${args.join(' ')} exited ${r.status}: ${r.stderr}`);
  return Number(process.hrtime.bigint() - t0) / 1e6;
};
console.log(`A = ${dirA}\nB = ${dirB}\nwhole-process ms, medians of ${repeat} interleaved runs`);
for (const [label, make] of cases) {
  run(dirA, make(dirA));
  run(dirB, make(dirB));
  const a = [];
  const b = [];
  const ratio = [];
  for (let k = 0; k < repeat; k++) {
    const x = run(dirA, make(dirA));
    const y = run(dirB, make(dirB));
    a.push(x);
    b.push(y);
    ratio.push(x / y);
  }
  console.log(`${label.padEnd(34)} A ${median(a).toFixed(0).padStart(6)}  B ${median(b).toFixed(0).padStart(6)}  A/B ${median(ratio).toFixed(2)}`);
}
rmSync(tmp, { recursive: true, force: true });
