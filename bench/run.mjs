#!/usr/bin/env node
// `npm run bench`: speed of loopclose on this machine. Every figure is the median of repeated
// runs after a warm-up; comparisons are ratios measured in the same run (absolute times on a
// shared machine drift from run to run).
//
//   node bench/run.mjs [--json] [--quick] [--root DIR] [--only meter,gerg,demos,energy,flash,equilibrium,scaling,sweep,alloc,cold,plant]
//
// --root DIR benchmarks another build of the project (DIR/dist/index.mjs, DIR/bin/loopclose.js,
// DIR/flowsheets), e.g. a copy of an earlier commit, so before and after come from one machine.
// --quick takes fewer samples (a smoke run, not for figures).
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { cpus, loadavg, tmpdir } from 'node:os';
import { fmt, interleaved, linearSlope, logLogSlope, measure, median, processTime, table } from './timing.mjs';
import { generateFlowsheet } from './generate.mjs';
import { GERG_HEADER, measureGerg } from './gerg.mjs';
import { EQUILIBRIUM_HEADER, measureEquilibrium } from './equilibrium.mjs';

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
const only = new Set((value('--only', 'meter,gerg,demos,energy,flash,equilibrium,scaling,sweep,alloc,cold,plant')).split(','));
const libPath = join(root, 'dist', 'index.mjs');
const cliPath = join(root, 'bin', 'loopclose.js');
if (!existsSync(libPath)) {
  process.stderr.write(`bench: ${libPath} is missing; run \`node build.mjs\` in ${root} first\n`);
  process.exit(2);
}
const lib = await import(pathToFileURL(libPath).href);
const flowsheetPath = (name) => join(root, 'flowsheets', name);

const reps = quick ? { warmupMs: 50, batchMs: 20, batches: 3 } : { warmupMs: 400, batchMs: 100, batches: 9 };
const out = { machine: { node: process.version, cpus: cpus().length, cpu: cpus()[0]?.model ?? '?' }, root, quick };
const text = [];
const say = (s = '') => {
  if (!json) process.stdout.write(`${s}\n`);
  text.push(s);
};

say(`loopclose benchmarks (${root}), node ${process.version}, ${out.machine.cpus} x ${out.machine.cpu}`);
say('medians of repeated runs after warm-up' + (quick ? ' (--quick: few samples, not for figures)' : ''));

// ---------------------------------------------------------------------------------------------
// 1. Meter conversions: reading (SI) -> molar flow with the real-gas EOS, through computeFeed.
// ---------------------------------------------------------------------------------------------
if (only.has('meter')) {
  const comp = (ids) => ids.map((id) => ({ ...lib.findComponent(id), id }));
  const cases = [
    { label: 'pure gas (H2, SRK)', ids: ['H2'], x: [1], T: 308.15, P: 31.01325e5, flow: 12.6 / 3600 },
    {
      label: '5-component mixture (SRK)', ids: ['CH4', 'C2H6', 'C3H8', 'N2', 'CO2'], x: [0.85, 0.07, 0.03, 0.03, 0.02],
      T: 298.15, P: 41.01325e5, flow: 250 / 3600,
    },
  ];
  // A 5-component loop gas through GERG-2008 (the meters' reference equation), where the build has it.
  if (lib.makeMeterEos) {
    cases.push({
      label: '5-component loop gas (GERG-2008)', ids: ['H2', 'N2', 'CH4', 'Ar', 'CO'], x: [0.7, 0.23, 0.04, 0.02, 0.01],
      T: 313.15, P: 151.01325e5, flow: 1200 / 3600, meterEos: 'GERG-2008',
    });
  }
  const rows = [];
  out.meter = [];
  for (const c of cases) {
    const eos = lib.makeEos('SRK', comp(c.ids));
    // The runtime's meter EOS, made once (builds before it have none: computeFeed takes two arguments).
    const meter = lib.makeMeterEos ? lib.makeMeterEos(c.meterEos ?? 'SRK', eos) : undefined;
    const composition = Float64Array.from(c.x);
    const spec = { name: 'reading', composition, basis: { kind: 'meter', flow: c.flow, T: c.T, P: c.P }, T: c.T, P: c.P };
    // Vary the reading a little between calls so nothing can be cached on identical input.
    let k = 0;
    const m = measure(() => {
      k = (k + 1) & 1023;
      spec.T = spec.basis.T = c.T + k * 1e-3;
      return lib.computeFeed(spec, eos, meter).molarFlow;
    }, reps);
    // With the three readings parsed from text as a file or the command line gives them.
    const readings = ['12.6 m3/h', '30 barg', '35 degC'];
    const mp = measure(() => {
      const flow = lib.parseQuantity(readings[0], 'volumeFlow').value;
      const P = lib.parseQuantity(readings[1], 'pressure').value;
      const T = lib.parseQuantity(readings[2], 'temperature').value;
      return lib.computeFeed({ name: 'r', composition, basis: { kind: 'meter', flow, T, P }, T, P }, eos, meter).molarFlow;
    }, reps);
    const perS = 1000 / m.ms;
    const perSParsed = 1000 / mp.ms;
    // Aims (issue 15): >= 1e6/s for a pure gas, >= 2e5/s for a 5-component gas, through SRK.
    const aim = c.meterEos ? undefined : c.ids.length === 1 ? 1e6 : 2e5;
    rows.push([c.label, fmt(perS), fmt(perSParsed), aim ? `>= ${aim.toExponential(0).replace('+', '')}` : '', aim ? (perS >= aim ? 'met' : `gap: x${fmt(aim / perS)} to go`) : '']);
    out.meter.push({ case: c.label, conversionsPerSecond: perS, withParsingPerSecond: perSParsed, usPerConversion: m.ms * 1000, aimPerSecond: aim, met: aim ? perS >= aim : undefined });
  }
  say('\n1. Meter conversions per second (one core)');
  say(table(['case', 'conversions/s', 'with 3 readings parsed', 'aim', 'met'], rows));
}

// ---------------------------------------------------------------------------------------------
// 1b. GERG-2008 density and properties calls (bench/gerg.mjs measureGerg on this build).
// ---------------------------------------------------------------------------------------------
if (only.has('gerg')) {
  say('\n1b. GERG-2008: microseconds per density(T, P, x) and properties(T, D, x) call');
  if (!lib.makeGerg2008) {
    out.gerg = { skipped: 'this build does not export makeGerg2008' };
    say('not measured: this build does not export makeGerg2008');
  } else {
    const g = measureGerg(lib, { quick });
    out.gerg = g.cases;
    say(table(GERG_HEADER, g.rows));
  }
}

// ---------------------------------------------------------------------------------------------
// 2. Demo flowsheets by method.
// ---------------------------------------------------------------------------------------------
if (only.has('demos')) {
  const demos = ['methanol-pilot.yaml', 'methanol-pilot-split.yaml', 'ammonia-loop.yaml', 'ammonia-loop-adiabatic.yaml', 'benzene-hydrogenation.yaml'];
  const methods = ['direct', 'wegstein', 'newton', 'auto'];
  const rows = [];
  out.demos = [];
  for (const d of demos) {
    const p = flowsheetPath(d);
    if (!existsSync(p)) continue;
    const { model } = lib.loadFlowsheet(p);
    const byMethod = {};
    for (const method of methods) {
      // A longer warm-up: a solve builds its runtime afresh, and V8 takes about a second of
      // such solves to settle.
      const m = measure(() => lib.solveFlowsheet(model, { method }), quick ? reps : { ...reps, warmupMs: 1000 });
      const r = m.last;
      byMethod[method] = { status: r.status, passes: r.passes, jacobians: r.jacobians, ms: m.ms, method: r.method };
      rows.push([d.replace('.yaml', ''), method, r.status, r.passes, r.jacobians, fmt(m.ms)]);
    }
    const ratio = (a, b) => byMethod[a].ms / byMethod[b].ms;
    out.demos.push({
      flowsheet: d, methods: byMethod,
      ratios: {
        passesDirectOverWegstein: byMethod.direct.passes / byMethod.wegstein.passes,
        timeDirectOverWegstein: ratio('direct', 'wegstein'),
        timeWegsteinOverNewton: ratio('wegstein', 'newton'),
      },
    });
  }
  say('\n2. Demo flowsheets: passes, Jacobians and time per solve (ms) by method');
  say(table(['flowsheet', 'method', 'status', 'passes', 'Jacobians', 'ms/solve'], rows));
  say(table(
    ['flowsheet', 'direct/Wegstein passes', 'direct/Wegstein time', 'Wegstein/Newton time'],
    out.demos.map((d) => [d.flowsheet.replace('.yaml', ''), fmt(d.ratios.passesDirectOverWegstein), fmt(d.ratios.timeDirectOverWegstein), fmt(d.ratios.timeWegsteinOverNewton)]),
  ));
  say('aims (methanol demo): Wegstein <= 20 passes, Newton <= 4 Jacobians; <= 0.05 ms/solve (split), <= 1 ms (equilibrium)');
}

// ---------------------------------------------------------------------------------------------
// 2d. What the energy balance costs: each demo solved as it is (energy balance on) against the
//     same loop without it, solved in the same run: the same model with the components' heat
//     capacities and formation enthalpies taken out, so that the runtime turns the energy
//     balance off as for a file without thermal data (an adiabatic mixer then stands at its
//     inlets' flow-weighted temperature, a compressor or valve at its inlet's; the flows are the
//     same). A loop whose flows depend on the energy balance (an equilibrium converter that
//     finds its own temperature) has no such twin: its row says so.
// ---------------------------------------------------------------------------------------------
if (only.has('energy') && lib.createRuntime) {
  const demos = ['methanol-pilot.yaml', 'methanol-pilot-split.yaml', 'methanol-pilot-equilibrium.yaml', 'ammonia-loop.yaml', 'ammonia-loop-adiabatic.yaml', 'ammonia-loop-two-beds.yaml', 'benzene-hydrogenation.yaml'];
  const rows = [];
  out.energy = [];
  for (const d of demos) {
    const p = flowsheetPath(d);
    if (!existsSync(p)) continue;
    const { model } = lib.loadFlowsheet(p);
    const twin = { ...model, components: model.components.map((c) => ({ ...c, cp: undefined, hf: undefined })) };
    // No twin where the flows depend on the energy balance, or where the loop cannot run
    // without the thermal data (an equilibrium constant K(T) needs cp and hf).
    let decoupled = lib.createRuntime(model).energyDecoupled;
    let why = 'flows depend on it';
    if (decoupled) {
      try {
        lib.createRuntime(twin);
      } catch {
        decoupled = false;
        why = 'K(T) needs cp, hf';
      }
    }
    const opts = quick ? reps : { ...reps, warmupMs: 1000 };
    const withIt = () => lib.solveFlowsheet(model, {});
    let r;
    let r0;
    let ms;
    let ms0 = Number.NaN;
    let ratio = Number.NaN;
    if (decoupled) {
      // interleaved batches: with, without, with, without...; the ratio the median of theirs
      const timed = interleaved(withIt, () => lib.solveFlowsheet(twin, {}), opts);
      ({ ms } = timed.a);
      r = timed.a.last;
      r0 = timed.b.last;
      ms0 = timed.b.ms;
      ratio = 1 / timed.ratio;
    } else {
      const w = measure(withIt, opts);
      ms = w.ms;
      r = w.last;
    }
    const same = decoupled && r0.status === r.status;
    out.energy.push({ flowsheet: d, status: r.status, passes: r.passes, ms, decoupled, without: decoupled ? { status: r0.status, passes: r0.passes, ms: ms0 } : undefined, ratio, met: decoupled ? ratio <= 3 && same : undefined });
    rows.push([d.replace('.yaml', ''), `${r.status} ${r.passes}`, fmt(ms), decoupled ? `${r0.status} ${r0.passes}` : '-', decoupled ? fmt(ms0) : '-',
      lib.createRuntime(model).energyDecoupled ? 'once, at the end' : 'every pass', decoupled ? `${fmt(ratio)} (${ratio <= 3 && same ? 'met' : 'not met'})` : `no loop without it (${why})`]);
  }
  say('\n2d. The energy balance: a solve with it against the same loop without it (ms per solve)');
  say(table(['flowsheet', 'with: status passes', 'ms/solve', 'without: status passes', 'ms/solve', 'energy balance', 'with / without'], rows));
  say('aim: the energy balance costs <= 3 x the passes-times-time of the same loop without it');
}

// ---------------------------------------------------------------------------------------------
// 2c. Reactions at equilibrium: the same loop with its converter at equilibrium and at the fixed
//     conversions that equilibrium reaches (so both loops settle on nearly the same state), time
//     per pass; and the equilibrium solver alone (bench/equilibrium.mjs).
// ---------------------------------------------------------------------------------------------
if (only.has('equilibrium') && lib.prepareEquilibrium) {
  const pairs = [
    { label: 'ammonia-loop (450 degC)', file: 'ammonia-loop.yaml', from: '{ equation: "N2 + 3 H2 -> 2 NH3", key: N2, conversion: 0.22 }', to: '{ equation: "N2 + 3 H2 -> 2 NH3", equilibrium: true, approach: 20 K }' },
    { label: 'ammonia-loop-adiabatic', file: 'ammonia-loop-adiabatic.yaml', from: '{ equation: "N2 + 3 H2 -> 2 NH3", key: N2, conversion: 0.22 }', to: '{ equation: "N2 + 3 H2 -> 2 NH3", equilibrium: true, approach: 20 K }' },
    { label: 'ammonia-loop-two-beds', file: 'ammonia-loop-two-beds.yaml' },
    { label: 'methanol-pilot-equilibrium', file: 'methanol-pilot-equilibrium.yaml' },
  ];
  const rows = [];
  out.equilibrium = { loops: [] };
  for (const pair of pairs) {
    const path = flowsheetPath(pair.file);
    if (!existsSync(path)) continue;
    const original = readFileSync(path, 'utf8');
    const eqText = pair.from ? original.replace(pair.from, pair.to) : original;
    if (!eqText.includes('equilibrium: true')) continue;
    const eqModel = lib.validateText(pair.file, eqText).model;
    const first = lib.solveFlowsheet(eqModel);
    if (first.status !== 'converged') throw new Error(`${pair.label}: ${first.status} ${first.message}`);
    // The fixed-conversion twin: every reaction at equilibrium replaced by its converged conversion.
    let fixedText = eqText;
    for (const [name, u] of first.units) {
      for (const rx of u.reactions ?? []) {
        if (!rx.equilibrium) continue;
        const re = new RegExp(`\\{ equation: "${rx.equation.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}", equilibrium: true[^}]*\\}`);
        const spot = fixedText.indexOf(`${name}:`);
        const head = fixedText.slice(0, spot);
        const tail = fixedText.slice(spot).replace(re, `{ equation: "${rx.equation}", key: ${rx.key}, conversion: ${rx.conversion} }`);
        fixedText = head + tail;
      }
    }
    const fixedModel = lib.validateText(pair.file, fixedText).model;
    // A converter at equilibrium that finds its own temperature carries the energy balance in
    // every pass; its fixed twin's flows do not depend on it, and by default it would be solved
    // once at the end. The twin then carries it in every pass too, so that the ratio is what
    // the equilibrium adds, not what the energy balance adds.
    const coupled = lib.createRuntime ? !lib.createRuntime(eqModel).energyDecoupled : false;
    // Interleaved batches (equilibrium, fixed, equilibrium, ...): the ratio is the median of the
    // per-batch ratios, so that the machine's drift cancels.
    const solveEq = () => lib.solveFlowsheet(eqModel);
    const solveFx = () => lib.solveFlowsheet(fixedModel, coupled ? { energyEveryPass: true } : {});
    const timed = interleaved(solveEq, solveFx, { ...reps, warmupMs: quick ? 50 : 1000 });
    const e = timed.a.last;
    const f = timed.b.last;
    const msEq = timed.a.ms;
    const msFx = timed.b.ms;
    // per pass, equilibrium over fixed: the passes are the same in every batch
    const ratio = (1 / timed.ratio) * (f.passes / e.passes);
    const perPassEq = (msEq * 1000) / e.passes;
    const perPassFx = (msFx * 1000) / f.passes;
    out.equilibrium.loops.push({ flowsheet: pair.label, equilibrium: { status: e.status, passes: e.passes, ms: msEq, usPerPass: perPassEq }, fixed: { status: f.status, passes: f.passes, ms: msFx, usPerPass: perPassFx }, perPassRatio: ratio });
    rows.push([pair.label, `${f.status} ${f.passes}`, fmt(msFx), fmt(perPassFx), `${e.status} ${e.passes}`, fmt(msEq), fmt(perPassEq), fmt(ratio)]);
  }
  say('\n2c. Converters at equilibrium against the same loop at the conversions equilibrium reaches (auto method; the fixed twin of a converter that finds its own temperature carries the energy balance in every pass, as the converter at equilibrium must)');
  say(table(['flowsheet', 'fixed: status passes', 'ms/solve', 'us/pass', 'equilibrium: status passes', 'ms/solve', 'us/pass', 'per pass eq/fixed'], rows));
  say('aim: an equilibrium reactor adds at most 2x to the time per pass');
  const eqSolver = measureEquilibrium(lib, { quick });
  out.equilibrium.solver = eqSolver.cases;
  say('the equilibrium solver alone, microseconds per solve (bench/equilibrium.mjs):');
  say(table(EQUILIBRIUM_HEADER, eqSolver.rows));
}

// ---------------------------------------------------------------------------------------------
// 2b. PH flash against TP flash on the same states, warm-started as a block in a loop starts
//     them, from the same neighbouring state (as if the last pass had left the stream 0.1 K
//     warmer): the TP flash from that state's K-values, the PH flash from its temperature and
//     K-values, so that the ratio is what an adiabatic unit pays over an isothermal one per pass.
// ---------------------------------------------------------------------------------------------
if (only.has('flash') && lib.flashPH) {
  const ids = ['H2', 'N2', 'Ar', 'CH4', 'NH3'];
  const eos = lib.makeEos('SRK', ids.map((id) => ({ ...lib.findComponent(id), id })));
  const cases = [
    { label: 'loop gas, one phase (276 K, 150 bar)', T: 275.9, P: 150e5, z: [0.678, 0.2185, 0.0193, 0.0521, 0.0321] },
    { label: 'converter effluent, two phases (263 K, 145 bar)', T: 263.15, P: 145e5, z: [0.5906, 0.1885, 0.0214, 0.0576, 0.1419] },
  ];
  const rows = [];
  out.flash = [];
  for (const c of cases) {
    const z = Float64Array.from(c.z);
    const st = lib.streamState(eos, c.T, c.P, z);
    const near = lib.streamState(eos, c.T + 0.1, c.P, z);
    const K0 = near.phase === 'two-phase' ? Float64Array.from(near.K) : undefined;
    let k = 0;
    const tpCall = () => {
      k = (k + 1) & 1023;
      return lib.flashTP(eos, c.T + k * 1e-6, c.P, z, { K0 });
    };
    const phCall = () => {
      k = (k + 1) & 1023;
      return lib.flashPH(eos, c.P, st.H + k * 1e-6, z, { T0: c.T + 0.1, K0, tol: 1e-10 });
    };
    // Interleaved batches (TP, PH, TP, ...): the ratio is the median of the per-batch ratios,
    // so that the load of a shared machine cancels.
    const timed = interleaved(tpCall, phCall, reps);
    const tpMs = timed.a.ms;
    const phMs = timed.b.ms;
    const ratio = timed.ratio;
    const r = timed.b.last;
    out.flash.push({ label: c.label, tpMs, phMs, ratio, flashes: r.flashes, iterations: r.iterations });
    rows.push([c.label, fmt(tpMs * 1000), fmt(phMs * 1000), fmt(ratio), r.flashes, r.iterations, Math.abs(r.T - c.T) < 1e-3 ? 'same T' : `T off by ${fmt(r.T - c.T)} K`]);
  }
  say('\n2b. PH flash against TP flash (µs per call; warm-started as in a loop; PH/TP the median of interleaved batches)');
  say(table(['state', 'TP µs', 'PH µs', 'PH/TP', 'PH flashes', 'PH T-steps', 'check'], rows));
  say('aim: PH <= 3 x TP');
}

// ---------------------------------------------------------------------------------------------
// 3. Scaling: generated flowsheets of N units and C components, nested recycle loops.
// ---------------------------------------------------------------------------------------------
if (only.has('scaling')) {
  // Each train is solved by Wegstein with the recycles into the mixers as tears (the method the
  // generated file names) and by the default method, auto, which takes Anderson acceleration for
  // a tear set above AUTO_ANDERSON_VARIABLES (src/flowsheet/solve.ts). A solve that takes over 2 s
  // is timed once (its first run), a shorter one as the median of repeated runs.
  const Ns = [10, 100, 1000];
  const Cs = [5, 20, 50];
  const rows = [];
  out.scaling = [];
  const models = new Map();
  const modelOf = (N, C, condenser) => {
    const key = `${N}/${C}/${condenser}`;
    if (!models.has(key)) {
      const g = generateFlowsheet({ units: N, components: C, condenser });
      const t0 = performance.now();
      const { model } = lib.validateText(`generated-${N}-${C}.yaml`, g.text);
      models.set(key, { g, model, loadMs: performance.now() - t0 });
    }
    return models.get(key);
  };
  const run = (N, C, condenser, method, { table: show = true } = {}) => {
    const { g, model, loadMs } = modelOf(N, C, condenser);
    const first = performance.now();
    let r = lib.solveFlowsheet(model, { method });
    const firstMs = performance.now() - first;
    let ms = firstMs;
    let runs = 1;
    if (firstMs <= 2000) {
      const big = { warmupMs: 0, warmupCalls: 0, batchMs: 0, batches: quick ? 1 : 3 };
      const m = measure(() => lib.solveFlowsheet(model, { method }), firstMs > 50 ? big : reps);
      r = m.last;
      ms = m.ms;
      runs = 0;
    }
    const e = {
      N: g.units, C, condenser, method, solvedBy: r.method, loops: g.loops, tears: r.tears.length, variables: r.x.length, status: r.status,
      passes: r.passes, ms, msPerPass: ms / r.passes, loadMs, timedOnce: runs === 1,
    };
    out.scaling.push(e);
    if (show) {
      rows.push([`${g.units} x ${C}${condenser === 'equilibrium' ? ' (flash)' : ''}`, g.loops, e.tears, e.variables, `${method} (${r.method})`, r.status, r.passes,
        `${fmt(e.ms)}${e.timedOnce ? '*' : ''}`, fmt(e.msPerPass * 1000), fmt(loadMs)]);
    }
    return e;
  };
  for (const C of Cs) {
    for (const N of Ns) {
      // Wegstein on 1000 x 50 takes minutes on a 2-core machine; auto shows that size.
      if (!(N === 1000 && C === 50)) run(N, C, 'split', 'wegstein');
      run(N, C, 'split', 'auto');
    }
  }
  run(100, 5, 'equilibrium', 'wegstein');
  run(100, 5, 'equilibrium', 'auto');
  say('\n3. Scaling: generated trains (condensers as fixed splits unless "flash"); N units x C components; * timed once');
  say(table(['N x C', 'loops', 'tears', 'unknowns', 'method (ran)', 'status', 'passes', 'ms/solve', 'us/pass', 'load ms'], rows));

  // Passes against N: more sizes at C = 5, both methods.
  const seriesN = [10, 30, 100, 300, 1000];
  const series = {};
  const seriesMethods = lib.AUTO_ANDERSON_VARIABLES ? ['wegstein', 'anderson', 'auto'] : ['wegstein', 'auto'];
  for (const method of seriesMethods) {
    series[method] = seriesN.map((N) => out.scaling.find((e) => e.N === N && e.C === 5 && e.method === method && e.condenser === 'split') ?? run(N, 5, 'split', method, { table: false }));
  }
  // passes = a + b ln N, least squares: b
  const fitLogN = (es) => linearSlope(es.map((e) => Math.log(e.N)), es.map((e) => e.passes));
  const passRows = [];
  out.scalingPasses = {};
  for (const method of seriesMethods) {
    const es = series[method];
    const perLogN = fitLogN(es);
    const exponent = logLogSlope(es.map((e) => e.N), es.map((e) => e.passes));
    const p100 = es.find((e) => e.N === 100).passes;
    const p1000 = es.find((e) => e.N === 1000).passes;
    out.scalingPasses[method] = { N: seriesN, passes: es.map((e) => e.passes), perLogN, exponent, ratio1000to100: p1000 / p100 };
    passRows.push([`${method} (${es[es.length - 1].solvedBy})`, es.map((e) => e.passes).join(' '), fmt(perLogN), fmt(exponent), fmt(p1000 / p100)]);
  }
  say(`passes against N (C = 5; N = ${seriesN.join(', ')}; auto is ${lib.AUTO_ANDERSON_VARIABLES ? `Wegstein then Newton up to ${lib.AUTO_ANDERSON_VARIABLES} tear variables, Anderson above` : "Wegstein then Newton"}): the fitted slope of passes against ln N, the log-log slope (passes ~ N^s), and passes(1000)/passes(100)`);
  say(table(['method', 'passes', 'per ln N', 's', '1000/100'], passRows));
  const logRatio = Math.log(1000) / Math.log(100);
  const a = out.scalingPasses.anderson ?? out.scalingPasses.auto;
  const logMet = a.ratio1000to100 <= logRatio * 1.1;
  say(`aim: passes grow no faster than log N, i.e. passes(1000)/passes(100) <= ln 1000 / ln 100 = ${fmt(logRatio)} (10 % slack): ` +
    `${logMet ? 'met by Anderson' : `not met (Anderson ${fmt(a.ratio1000to100)}, s = ${fmt(a.exponent)}; Wegstein ${fmt(out.scalingPasses.wegstein.ratio1000to100)}, s = ${fmt(out.scalingPasses.wegstein.exponent)})`}`);

  const slopes = [];
  for (const C of Cs) {
    const s = out.scaling.filter((e) => e.C === C && e.condenser === 'split' && e.method === 'auto' && Ns.includes(e.N));
    slopes.push([`C = ${C}`, fmt(logLogSlope(s.map((e) => e.N), s.map((e) => e.msPerPass))), fmt(logLogSlope(s.map((e) => e.N), s.map((e) => e.ms))), fmt(logLogSlope(s.map((e) => e.N), s.map((e) => e.passes)))]);
  }
  for (const N of Ns) {
    const s = out.scaling.filter((e) => e.N === N && e.condenser === 'split' && e.method === 'auto');
    slopes.push([`N = ${N} (against C)`, fmt(logLogSlope(s.map((e) => e.C), s.map((e) => e.msPerPass))), fmt(logLogSlope(s.map((e) => e.C), s.map((e) => e.ms))), fmt(logLogSlope(s.map((e) => e.C), s.map((e) => e.passes)))]);
  }
  out.scalingSlopes = slopes.map(([label, perPass, perSolve, passes]) => ({ label, perPass: Number(perPass), perSolve: Number(perSolve), passes: Number(passes) }));
  say('fitted log-log slopes under auto (against N unless noted; 1 = linear)');
  say(table(['series', 'time per pass', 'time per solve', 'passes'], slopes));
  const big = out.scaling.find((e) => e.N === 1000 && e.C === 20 && e.method === 'auto' && e.condenser === 'split');
  const bigW = out.scaling.find((e) => e.N === 1000 && e.C === 20 && e.method === 'wegstein' && e.condenser === 'split');
  const AIM_MS = 150;
  out.scalingAim = { aimMs: AIM_MS, ms: big.ms, passes: big.passes, msPerPass: big.msPerPass, met: big.status === 'converged' && big.ms <= AIM_MS };
  say(`aim: 1000 units x 20 components <= ${AIM_MS} ms per solve: auto ${fmt(big.ms)} ms (${big.passes} passes of ${fmt(big.msPerPass)} ms; Wegstein ${fmt(bigW.ms)} ms, ${bigW.passes} passes): ` +
    (out.scalingAim.met ? 'met' : `not met, gap ${fmt(big.ms / AIM_MS)}x: even one pass takes ${fmt(big.msPerPass)} ms (the blocks' work on 200 stages of 20 components); at that cost the aim allows ${Math.floor(AIM_MS / big.msPerPass)} passes`));
}

// ---------------------------------------------------------------------------------------------
// 4. Sweep throughput (bench/sweep.mjs, written with the sweep command).
// ---------------------------------------------------------------------------------------------
if (only.has('sweep')) {
  const sweepBench = join(here, 'sweep.mjs');
  say('\n4. Sweep throughput');
  if (existsSync(sweepBench)) {
    // bench/sweep.mjs spawns the CLI for 2,000-point sweeps (serial, --jobs 2, cold, the ammonia
    // loop); its lines, each with its aim, are shown as they are.
    const r = spawnSync(process.execPath, [sweepBench, '--root', root, ...(quick ? ['--points', '100', '--repeat', '1'] : [])], { encoding: 'utf8' });
    const lines = r.stdout.trimEnd().split('\n').filter(Boolean);
    out.sweep = { exit: r.status, lines, ...(r.status !== 0 ? { stderr: r.stderr.slice(0, 2000) } : {}) };
    say(lines.length > 0 ? lines.join('\n') : `bench/sweep.mjs printed nothing (exit ${r.status}) ${r.stderr.slice(0, 500)}`);
  } else {
    out.sweep = { pending: 'the sweep benchmark is in bench/sweep.mjs once the sweep command lands' };
    say('not measured here: the sweep benchmark is in bench/sweep.mjs once the sweep command lands');
  }
}

// ---------------------------------------------------------------------------------------------
// 4b. Allocations per pass (bench/alloc.mjs: the growth of the heap over N passes of each demo's
//     tear function, and over continued solves divided by their passes, with a young generation
//     large enough that nothing is collected in between, checked by a gc observer).
// ---------------------------------------------------------------------------------------------
if (only.has('alloc')) {
  say('\n4b. Bytes allocated per pass (bench/alloc.mjs; no collection during a measurement)');
  const r = spawnSync(process.execPath, [join(here, 'alloc.mjs'), '--json', '--root', root, ...(quick ? ['--passes', '200'] : [])], { encoding: 'utf8' });
  let a;
  try {
    a = JSON.parse(r.stdout);
  } catch {
    a = undefined;
  }
  if (!a) {
    out.alloc = { exit: r.status, stderr: r.stderr.slice(0, 2000) };
    say(`bench/alloc.mjs failed (exit ${r.status}) ${r.stderr.slice(0, 500)}`);
  } else {
    out.alloc = a.rows;
    const b = (v) => (typeof v === 'number' ? fmt(v) : v ?? '-');
    const gap = (v) => (typeof v !== 'number' ? '' : v < 16 ? 'met' : `not met (${fmt(v)} B)`);
    say(table(['flowsheet', 'tear vars', 'B per pass', 'aim 0 B', 'passes per continued solve', 'B per pass in a solve', 'aim 0 B'],
      a.rows.map((x) => (x.error ? [x.case, x.error, '', '', '', '', ''] : [x.case, x.tears, b(x.pass), gap(x.pass), b(x.passesPerSolve), b(x.solvePerPass), gap(x.solvePerPass)]))));
    say('aim: a pass allocates nothing (under 16 B: the measurement\'s own noise); a solve\'s result and its history are allocated once per solve, not per pass');
  }
}

// ---------------------------------------------------------------------------------------------
// 5. CLI cold start: whole process.
// ---------------------------------------------------------------------------------------------
if (only.has('cold')) {
  const runs = quick ? 3 : 15;
  const demo = flowsheetPath('methanol-pilot.yaml');
  const tmp = mkdtempSync(join(tmpdir(), 'loopclose-cold-'));
  // A 50-point sweep of the demo, whole process, as an engineer runs one (issue 15's aim).
  const sweepArgs = [cliPath, 'sweep', demo, '--grid', 'reactor.reactions.0.conversion=0.15:0.35:50', '--report',
    'streams.purge.flows.H2[kmol/h],streams.recycle.fractions.N2,loop.recycle-ratio', '--out', join(tmp, 'sweep.csv'), '--overwrite'];
  const node = processTime(process.execPath, ['-e', ''], { runs });
  const meter = processTime(process.execPath, [cliPath, 'meter', demo], { runs });
  const solve = processTime(process.execPath, [cliPath, 'solve', demo], { runs });
  const sweep = processTime(process.execPath, sweepArgs, { runs });
  rmSync(tmp, { recursive: true, force: true });
  const aims = { meter: 250, solve: 120, sweep: 150 };
  const met = (ms, aim) => (ms <= aim ? 'met' : `gap: ${fmt(ms - aim)} ms (x${fmt(ms / aim)})`);
  out.coldStart = {
    nodeAloneMs: node.ms, meterMs: meter.ms, solveMs: solve.ms, sweep50Ms: sweep.ms, meterExit: meter.status, solveExit: solve.status, sweep50Exit: sweep.status,
    aimsMs: aims, met: { meter: meter.ms <= aims.meter, solve: solve.ms <= aims.solve, sweep50: sweep.ms <= aims.sweep },
  };
  say('\n5. CLI cold start (whole process, wall time, ms)');
  say(table(['command', 'ms', 'exit', 'aim', 'met', 'beyond node alone'], [
    ['node -e "" (node alone)', fmt(node.ms), node.status, '', '', ''],
    ['loopclose meter methanol-pilot.yaml', fmt(meter.ms), meter.status, `<= ${aims.meter}`, met(meter.ms, aims.meter), fmt(meter.ms - node.ms)],
    ['loopclose solve methanol-pilot.yaml', fmt(solve.ms), solve.status, `<= ${aims.solve}`, met(solve.ms, aims.solve), fmt(solve.ms - node.ms)],
    ['loopclose sweep methanol-pilot.yaml, 50 points', fmt(sweep.ms), sweep.status, `<= ${aims.sweep}`, met(sweep.ms, aims.sweep), fmt(sweep.ms - node.ms)],
  ]));
  // Where a fresh process spends it: reading the library, reading the file, the first solve
  // (before V8 has compiled anything) and a warm solve, timed inside one new process (medians).
  const probe = `const t0 = performance.now(); const lib = await import(${JSON.stringify(pathToFileURL(libPath).href)}); const t1 = performance.now();
const { model } = lib.loadFlowsheet(${JSON.stringify(demo)}); const t2 = performance.now(); lib.solveFlowsheet(model, {}); const t3 = performance.now();
for (let k = 0; k < 200; k++) lib.solveFlowsheet(model, {}); const t4 = performance.now(); lib.solveFlowsheet(model, {});
console.log(JSON.stringify([t1 - t0, t2 - t1, t3 - t2, performance.now() - t4]));`;
  const parts = [];
  for (let k = 0; k < (quick ? 1 : 5); k++) {
    const r = spawnSync(process.execPath, ['--input-type=module', '-e', probe], { encoding: 'utf8' });
    if (r.status === 0) parts.push(JSON.parse(r.stdout));
  }
  if (parts.length) {
    const [lib, read, first, warm] = [0, 1, 2, 3].map((j) => median(parts.map((p) => p[j])));
    out.coldStart.inProcessMs = { importLibrary: lib, readFile: read, firstSolve: first, warmSolve: warm };
    say(`in a fresh process (ms): import dist/index.mjs ${fmt(lib)}, read the demo ${fmt(read)}, first solve ${fmt(first)}, a warm solve ${fmt(warm)}`);
  }
}

// ---------------------------------------------------------------------------------------------
// 6. Plant data: one snapshot in-process (bench/reconcile.mjs: the engine on a 5-stream,
//    4-element methanol loop; and the ammonia demo's rows through the plant layer, per row), and
//    the demo's year of hourly rows (8,760) through the CLI, whole process: serial (wall and the
//    process's CPU time, bench/cli-cpu.mjs), the same confined to one core, and with --jobs 2.
// ---------------------------------------------------------------------------------------------
if (only.has('plant')) {
  say('\n6. Plant data (reconciliation)');
  const engine = spawnSync(process.execPath, [join(here, 'reconcile.mjs'), '--json', ...(quick ? ['--quick'] : []), '--root', root], { encoding: 'utf8' });
  let e;
  try {
    e = JSON.parse(engine.stdout);
  } catch {
    e = undefined;
  }
  const demo = flowsheetPath('ammonia-loop.yaml');
  const year = join(root, 'flowsheets', 'data', 'ammonia-loop-year.csv');
  const rows = [];
  // Against an aim: met, or the gap (judged on the wall time, as the aim is stated; the CPU time
  // beside it tells what a loaded machine added).
  const verdict = (wall, cpu, aim) => (!Number.isFinite(wall) ? '' : wall <= aim ? 'met' : `not met: +${fmt(wall - aim, 3)} ms wall (${(wall / aim).toFixed(2)}x)${Number.isFinite(cpu) ? `, cpu ${cpu <= aim ? 'within' : `+${fmt(cpu - aim, 3)} ms`}` : ''}`);
  if (e) {
    rows.push([`one snapshot, 5 streams, 4 elements (${e.problem.variables} variables), in-process`, fmt(e.snapshotMs, 3), fmt(e.snapshotCpuMs, 3), '<= 2', verdict(e.snapshotMs, e.snapshotCpuMs, 2)]);
    if (e.demoRowMs !== undefined) rows.push([`ammonia demo, one row of the year (${e.demoVariables} variables, ${e.demoIterationsPerSolve?.toFixed(2) ?? '?'} iterations per solve), in-process`, fmt(e.demoRowMs, 3), fmt(e.demoRowCpuMs, 3), '', '']);
  } else rows.push(['one snapshot, 5 streams, 4 elements, in-process', `failed (exit ${engine.status})`, '', '<= 2', '']);
  const ammonia = existsSync(demo) ? demo : undefined;
  out.plant = { engine: e ?? { exit: engine.status, stderr: engine.stderr.slice(0, 2000) } };
  if (existsSync(year) && ammonia) {
    const runs = quick ? 1 : 3;
    const cpuScript = join(here, 'cli-cpu.mjs');
    // `pin`: the process confined to one core (taskset -c 0, where the system has it), so that
    // V8's own threads (the collector's helpers, the optimising compiler) share that core with the
    // rows instead of running beside them on the other: the aim's "on one core" taken literally.
    const timeYear = (extra, pin = false) => {
      const wall = [];
      const cpu = [];
      let status = 0;
      for (let k = 0; k < runs; k++) {
        const t0 = performance.now();
        const argv = [cpuScript, cliPath, 'reconcile', demo, '--readings', year, ...extra];
        const r = pin ? spawnSync('taskset', ['-c', '0', process.execPath, ...argv], { stdio: ['ignore', 'ignore', 'pipe'], encoding: 'utf8' }) : spawnSync(process.execPath, argv, { stdio: ['ignore', 'ignore', 'pipe'], encoding: 'utf8' });
        wall.push(performance.now() - t0);
        cpu.push(Number(/cpu-ms ([\d.]+)/.exec(r.stderr ?? '')?.[1]));
        status = r.status ?? -1;
      }
      return { ms: median(wall), cpuMs: median(cpu), status };
    };
    const serial = timeYear([]);
    const canPin = spawnSync('taskset', ['-c', '0', 'true']).status === 0;
    const pinned = canPin ? timeYear([], true) : undefined;
    const jobs2 = timeYear(['--jobs', '2']);
    out.plant.yearMs = serial.ms;
    out.plant.yearCpuMs = serial.cpuMs;
    out.plant.yearExit = serial.status;
    out.plant.yearJobs2Ms = jobs2.ms;
    out.plant.yearJobs2CpuMs = jobs2.cpuMs;
    rows.push(['8760 hourly rows of ammonia-loop-year.csv, whole process, serial (CSV to a pipe)', fmt(serial.ms, 5), fmt(serial.cpuMs, 5), '<= 5000', verdict(serial.ms, serial.cpuMs, 5000)]);
    if (pinned) {
      out.plant.yearOneCoreMs = pinned.ms;
      out.plant.yearOneCoreCpuMs = pinned.cpuMs;
      rows.push(['the same confined to one core (taskset -c 0)', fmt(pinned.ms, 5), fmt(pinned.cpuMs, 5), '<= 5000', verdict(pinned.ms, pinned.cpuMs, 5000)]);
    } else rows.push(['the same confined to one core', 'not measured: no taskset on this system', '', '<= 5000', '']);
    rows.push(['the same with --jobs 2', fmt(jobs2.ms, 5), fmt(jobs2.cpuMs, 5), '', '']);
    // The aim says "on one core": judged on the confined run where there is one.
    out.plant.yearAimMet = (pinned ?? serial).ms <= 5000;
  }
  say(table(['case', 'wall ms', 'cpu ms', 'aim ms', 'aim'], rows));
  say(`load average ${loadavg()[0].toFixed(1)} on ${cpus().length} cores (wall times grow with the other processes' load)`);
}

if (json) process.stdout.write(`${JSON.stringify(out, null, 2)}\n`);
