#!/usr/bin/env node
// loopclose against the script an engineer writes today: the 50-point sweep of the ammonia demo
// loop (purge fraction 0.015 to 0.04; equilibrium condenser with SRK) by `loopclose sweep` and by
// bench/scipy/ammonia_sweep.py (NumPy, SciPy: SRK root for the makeup's standard volume, flash by
// successive substitution with Rachford-Rice, fsolve on the recycle). Both run as whole processes,
// taking turns, several times; the figures are medians of wall time and of CPU time (user +
// system of the child). Then the answers are compared point by point: the largest relative
// difference of the purge flow and of the liquid product over the 50 points.
// Runs only where `python3 -c "import numpy, scipy"` succeeds; otherwise it says so and exits 0.
//   node bench/scipy/compare.mjs [--root DIR] [--repeat 5] [--json]
// It is a benchmark, not a test.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { cpus, tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const here = dirname(fileURLToPath(import.meta.url));
const args = process.argv.slice(2);
const value = (f, d) => {
  const k = args.indexOf(f);
  return k >= 0 && k + 1 < args.length ? args[k + 1] : d;
};
const root = resolve(value('--root', join(here, '..', '..')));
const repeat = Number(value('--repeat', '5'));
const json = args.includes('--json');
const AIM = 30;
const POINTS = 50;

const median = (xs) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
};

// The interpreter behind `python3` (a version manager's shim would add its own start-up).
const probe = spawnSync('python3', ['-c', 'import sys, numpy, scipy; print(sys.executable); print(numpy.__version__, scipy.__version__)'], { encoding: 'utf8' });
if (probe.status !== 0) {
  const msg = 'SciPy side by side: not measured (python3 with numpy and scipy is not available here)';
  process.stdout.write(json ? `${JSON.stringify({ skipped: msg })}\n` : `${msg}\n`);
  process.exit(0);
}
const [python, versions] = probe.stdout.trim().split('\n');

/** CPU time (s) of this process's waited-for children, from /proc (Linux); undefined elsewhere. */
function childrenCpu() {
  try {
    const f = readFileSync('/proc/self/stat', 'utf8');
    const fields = f.slice(f.lastIndexOf(')') + 2).split(' ');
    // Fields 16 and 17 of stat (cutime, cstime), counted from 1; fields[0] here is field 3.
    return (Number(fields[13]) + Number(fields[14])) / 100; // USER_HZ is 100 on Linux
  } catch {
    return undefined;
  }
}

function run(cmd, argv) {
  const c0 = childrenCpu();
  const t0 = process.hrtime.bigint();
  const r = spawnSync(cmd, argv, { encoding: 'utf8', maxBuffer: 1 << 24 });
  const wall = Number(process.hrtime.bigint() - t0) / 1e9;
  const c1 = childrenCpu();
  if (r.status !== 0) throw new Error(`${cmd} ${argv.join(' ')} failed (${r.status}): ${r.stderr}`);
  return { wall, cpu: c0 === undefined || c1 === undefined ? NaN : c1 - c0, stdout: r.stdout };
}

const dir = mkdtempSync(join(tmpdir(), 'loopclose-scipy-'));
const out = join(dir, 'sweep.csv');
const bin = join(root, 'bin', 'loopclose.js');
const flowsheet = join(root, 'flowsheets', 'ammonia-loop.yaml');
if (!existsSync(bin) || !existsSync(flowsheet)) {
  process.stderr.write(`compare: ${bin} or ${flowsheet} is missing\n`);
  process.exit(2);
}
const loopclose = () => run(process.execPath, [bin, 'sweep', flowsheet, '--grid', `purge-split.out.purge=0.015:0.04:${POINTS}`,
  '--report', 'streams.purge.total[mol/s],streams.liquid-ammonia.total[mol/s]', '--out', out, '--overwrite']);
const script = () => run(python, [join(here, 'ammonia_sweep.py')]);

// One of each first (files cached, bytecode compiled), then the two take turns.
loopclose();
script();
const lc = [];
const py = [];
let pyText = '';
for (let k = 0; k < repeat; k++) {
  lc.push(loopclose());
  const p = script();
  py.push(p);
  pyText = p.stdout;
}
const lcText = readFileSync(out, 'utf8');
rmSync(dir, { recursive: true, force: true });

// Answers: loopclose's CSV (comment lines, a header, then point,purge,status,purge flow,product) and
// the script's (purge fraction, purge flow, product, NH3, fsolve flag).
const lcRows = lcText.split('\n').filter((l) => l && !l.startsWith('#') && !l.startsWith('point')).map((l) => l.split(','));
const pyRows = pyText.trim().split('\n').slice(1).map((l) => l.split(','));
if (lcRows.length !== POINTS || pyRows.length !== POINTS) throw new Error(`expected ${POINTS} points each, got ${lcRows.length} and ${pyRows.length}`);
let dPurge = 0;
let dProduct = 0;
let notConverged = 0;
for (let k = 0; k < POINTS; k++) {
  const [, frac, status, purge, product] = lcRows[k];
  const [pfrac, ppurge, pproduct, , ier] = pyRows[k];
  if (Math.abs(Number(frac) - Number(pfrac)) > 1e-12) throw new Error(`point ${k + 1}: purge fractions differ (${frac}, ${pfrac})`);
  if (status !== 'converged' || ier !== '1') notConverged++;
  dPurge = Math.max(dPurge, Math.abs(Number(purge) - Number(ppurge)) / Math.abs(Number(ppurge)));
  dProduct = Math.max(dProduct, Math.abs(Number(product) - Number(pproduct)) / Math.abs(Number(pproduct)));
}

const med = (rs, f) => median(rs.map((r) => r[f]));
const res = {
  machine: `${cpus().length} x ${cpus()[0]?.model ?? '?'}`, python: `${python} (numpy, scipy ${versions})`, node: process.version, runs: repeat,
  loopcloseWallS: med(lc, 'wall'), scriptWallS: med(py, 'wall'), loopcloseCpuS: med(lc, 'cpu'), scriptCpuS: med(py, 'cpu'),
  ratioWall: median(lc.map((r, k) => py[k].wall / r.wall)), ratioCpu: median(lc.map((r, k) => py[k].cpu / r.cpu)),
  maxRelDiffPurge: dPurge, maxRelDiffProduct: dProduct, notConverged, aim: AIM,
};
if (json) {
  process.stdout.write(`${JSON.stringify(res)}\n`);
} else {
  const f = (x) => x.toFixed(3);
  console.log(`SciPy side by side: ${POINTS}-point sweep of flowsheets/ammonia-loop.yaml (purge fraction 0.015 to 0.04, equilibrium condenser, SRK); whole process, ${repeat} runs each taking turns; ${res.machine}; ${res.python}`);
  console.log(`  loopclose sweep          wall ${f(res.loopcloseWallS)} s   cpu ${f(res.loopcloseCpuS)} s`);
  console.log(`  bench/scipy script       wall ${f(res.scriptWallS)} s   cpu ${f(res.scriptCpuS)} s`);
  console.log(`  script / loopclose       wall ${res.ratioWall.toFixed(2)}x   cpu ${res.ratioCpu.toFixed(2)}x   (median of the pairs' ratios)`);
  console.log(`  answers: largest relative difference over ${POINTS} points: purge flow ${dPurge.toExponential(2)}, liquid product ${dProduct.toExponential(2)}; points not converged: ${notConverged}`);
  console.log(`  aim: >= ${AIM}x faster, whole process: ${res.ratioWall >= AIM ? 'met' : `not met (gap ${(AIM / res.ratioWall).toFixed(1)}x)`}`);
}
