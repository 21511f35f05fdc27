#!/usr/bin/env node
// Before/after of two builds through their command line, whole process, runs interleaved
// (A, B, A, B...) so that both see the same load: the 1,000-point sweep of the methanol demo
// (serial, continuation), one target solve, and the ammonia demo's year of hourly rows through
// `loopclose reconcile` (serial); each with its CPU time (user + system, bench/cli-cpu.mjs).
//   node bench/compare-cli.mjs DIR_A DIR_B [--repeat 5] [--points 1000] [--only TEXT]
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const [dirA, dirB] = process.argv.slice(2, 4).map((d) => resolve(d));
const arg = (name, dflt) => {
  const k = process.argv.indexOf(name);
  return k > 0 ? Number(process.argv[k + 1]) : dflt;
};
const repeat = arg('--repeat', 5);
const points = arg('--points', 1000);
const only = process.argv.includes('--only') ? process.argv[process.argv.indexOf('--only') + 1] : '';
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
  ['reconcile, 8760 rows, serial', (dir) => ['reconcile', join(dir, 'flowsheets', 'ammonia-loop.yaml'), '--readings', join(dir, 'flowsheets', 'data', 'ammonia-loop-year.csv'), '--out', join(tmp, 'r.csv'), '--overwrite']],
];
const cpuScript = join(dirname(fileURLToPath(import.meta.url)), 'cli-cpu.mjs');
const cpu = [];
const run = (dir, args) => {
  const t0 = process.hrtime.bigint();
  const r = spawnSync(process.execPath, [cpuScript, join(dir, 'bin', 'loopclose.js'), ...args], { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`${dir}: ${args.join(' ')} exited ${r.status}: ${r.stderr}`);
  cpu.push(Number(/cpu-ms ([\d.]+)/.exec(r.stderr)?.[1]));
  return Number(process.hrtime.bigint() - t0) / 1e6;
};
console.log(`A = ${dirA}\nB = ${dirB}\nwhole-process ms (wall, and CPU of the process), medians of ${repeat} interleaved runs`);
for (const [label, make] of cases) {
  if (!label.includes(only)) continue;
  run(dirA, make(dirA));
  run(dirB, make(dirB));
  const a = [];
  const b = [];
  const ratio = [];
  const ca = [];
  const cb = [];
  const cratio = [];
  for (let k = 0; k < repeat; k++) {
    const x = run(dirA, make(dirA));
    const y = run(dirB, make(dirB));
    const [cx, cy] = cpu.splice(-2);
    a.push(x);
    b.push(y);
    ratio.push(x / y);
    ca.push(cx);
    cb.push(cy);
    cratio.push(cx / cy);
  }
  console.log(`${label.padEnd(34)} wall A ${median(a).toFixed(0).padStart(6)}  B ${median(b).toFixed(0).padStart(6)}  A/B ${median(ratio).toFixed(2)}   cpu A ${median(ca).toFixed(0).padStart(6)}  B ${median(cb).toFixed(0).padStart(6)}  A/B ${median(cratio).toFixed(2)}`);
}
rmSync(tmp, { recursive: true, force: true });
