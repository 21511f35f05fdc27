// Benchmark of `loopclose sweep`: 1,000 points of per-pass conversion on the methanol demo
// (equilibrium condenser), serial with and without continuation, and on 2 worker threads.
// Each case runs the built CLI (node build.mjs first) several times, the cases taking turns;
// the median and best wall times are shown, and the median minus the CLI's start-up (a
// 2-point sweep).
// Usage: node bench/sweep.mjs [--points 1000] [--repeat 3]
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { cpus, tmpdir } from 'node:os';
import { join, resolve } from 'node:path';

const root = resolve(import.meta.dirname, '..');
const bin = join(root, 'bin', 'loopclose.js');
const arg = (name, dflt) => {
  const k = process.argv.indexOf(name);
  return k > 0 ? Number(process.argv[k + 1]) : dflt;
};
const points = arg('--points', 1000);
const repeat = arg('--repeat', 3);
const dir = mkdtempSync(join(tmpdir(), 'loopclose-bench-'));
const file = join(root, 'flowsheets', 'methanol-pilot.yaml');
const report = 'streams.purge.flows.H2[kmol/h],streams.recycle.fractions.N2,loop.recycle-ratio,reactor.conversion.CO2';

function once(n, extra) {
  const out = join(dir, 'out.csv');
  const args = [bin, 'sweep', file, '--grid', `reactor.reactions.0.conversion=0.15:0.35:${n}`, '--report', report, '--out', out, '--overwrite', ...extra];
  const t0 = process.hrtime.bigint();
  const r = spawnSync(process.execPath, args, { encoding: 'utf8' });
  const s = Number(process.hrtime.bigint() - t0) / 1e9;
  if (r.status !== 0) throw new Error(`sweep failed (${r.status}): ${r.stderr}`);
  return { s, text: readFileSync(out, 'utf8') };
}

const median = (xs) => {
  const a = [...xs].sort((x, y) => x - y);
  return a.length % 2 ? a[(a.length - 1) / 2] : (a[a.length / 2 - 1] + a[a.length / 2]) / 2;
};

const cases = [
  { name: 'serial, continuation', extra: [] },
  { name: 'serial, every point cold (--no-continuation)', extra: ['--no-continuation'] },
  { name: '--jobs 2, continuation', extra: ['--jobs', '2'] },
  { name: 'start-up of the CLI (2-point sweep)', extra: [], n: 2 },
];
for (const c of cases) c.times = [];
// The cases take turns, so that a change in the machine's load falls on all of them alike.
once(2, []);
for (let k = 0; k < repeat; k++) {
  for (const c of cases) {
    const r = once(c.n ?? points, c.extra);
    c.times.push(r.s);
    c.text = r.text;
  }
}
const [serial, cold, par, start] = cases.map((c) => ({ ...c, med: median(c.times), best: Math.min(...c.times) }));
console.log(`loopclose sweep: ${points} points, methanol-pilot.yaml (equilibrium condenser), conversion 0.15 to 0.35; ${repeat} runs each, taking turns; ${cpus().length} CPUs (${cpus()[0]?.model ?? 'unknown'})`);
console.log(`${'case'.padEnd(46)} ${'median'.padStart(8)} ${'best'.padStart(8)}   median after start-up`);
for (const c of [serial, cold, par, start]) {
  console.log(`${c.name.padEnd(46)} ${c.med.toFixed(3).padStart(7)}s ${c.best.toFixed(3).padStart(7)}s   ${c === start ? '' : `${(c.med - start.med).toFixed(3)} s`}`);
}
console.log(`continuation: ${(cold.med / serial.med).toFixed(2)}x faster than every point cold (${((cold.med - start.med) / (serial.med - start.med)).toFixed(2)}x after start-up)`);
console.log(`--jobs 2: ${(serial.med / par.med).toFixed(2)}x the speed of serial (${((serial.med - start.med) / (par.med - start.med)).toFixed(2)}x after start-up)`);
console.log(`serial and --jobs 2 outputs identical: ${serial.text === par.text}`);
rmSync(dir, { recursive: true, force: true });
