#!/usr/bin/env node
// Generates the invented demo data of flowsheets/ammonia-loop.yaml (run once; the output is
// committed): a year of hourly readings, flowsheets/data/ammonia-loop-year.csv, and prints the
// snapshot for the file's `readings:`.
//
//   npm run build && node flowsheets/data/generate.mjs
//
// Every number is invented. The plant is the demo loop solved by loopclose at each hour with a
// throughput that follows the seasons and the day (the steady state scales with the makeup flow,
// every specification being intensive) and a per-pass conversion that falls slowly as the
// catalyst ages; each instrument then reads the solved value plus seeded normal noise of its
// own standard uncertainty (U / 2 of the file's instruments). Events planted for the demo:
//   - FI-101 (makeup meter) reads 6 % high from day 200 to day 230 (a fouled meter);
//   - FI-205 (purge meter) is frozen for 12 hours on day 90;
//   - a few empty cells (a historian gap) and one negative spike on FI-310.
import { writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const here = dirname(fileURLToPath(import.meta.url));
const lib = await import(join(here, '..', '..', 'dist', 'index.mjs'));
const { loadFlowsheet, parameter, withValues, solveFlowsheet, createRuntime, makeEos } = lib;

const R = 8.314462618;
const { model } = loadFlowsheet(join(here, '..', 'ammonia-loop.yaml'));
const eos = makeEos(model.thermo.eos, model.components, model.thermo.kij);
const idx = (id) => model.index.get(id);
const normal = model.thermo.standards.get('normal');

// mulberry32 and Box-Muller: the same noise on every run.
function seeded(seed) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}
const uniform = seeded(20240101);
const gauss = () => Math.sqrt(-2 * Math.log(Math.max(uniform(), 1e-300))) * Math.cos(2 * Math.PI * uniform());

const convP = parameter(model, 'converter.reactions.0.conversion');
const rt = createRuntime(model);
const sig = (name) => model.instruments.find((d) => d.tag === name);
const u = (name, reading) => {
  const d = sig(name);
  return 'relative' in d.uncertainty ? (d.uncertainty.relative * Math.abs(reading)) / 2 : d.uncertainty.absolute / 2;
};
const uc = (name, reading) => {
  const d = sig(name);
  const x = d.componentUncertainty?.[0] ?? d.uncertainty;
  return 'relative' in x ? (x.relative * Math.abs(reading)) / 2 : x.absolute / 2;
};

/** Readings of every instrument at a solved state (SI), with noise, and the bias of FI-101. */
function readingsAt(res, bias, scale = 1) {
  // The loop's steady state scales with the makeup flow (every specification is intensive).
  const s = (n) => {
    const st = res.streams.get(n);
    return { ...st, total: st.total * scale, flows: st.flows.map((v) => v * scale) };
  };
  const out = new Map();
  const line = (tag, pTag, tTag, stream, P, T) => {
    const pr = P + u(pTag, P) * gauss();
    const tr = T + u(tTag, T) * gauss();
    const st = s(stream);
    const Q = (st.total * eos.z(T, P, st.fractions, 'stable').Z * R * T) / P;
    out.set(pTag, pr);
    out.set(tTag, tr);
    out.set(tag, Q * (1 + bias) + u(tag, Q) * gauss());
  };
  line('FI-101', 'PI-101', 'TI-101', 'makeup', 150e5, 313.15);
  line('FI-205', 'PI-205', 'TI-205', 'purge', 145e5, 263.15);
  const std = (tag, stream) => {
    const st = s(stream);
    const Q = (st.total * eos.z(normal.T, normal.P, st.fractions, 'stable').Z * R * normal.T) / normal.P;
    out.set(tag, Q + u(tag, Q) * gauss());
  };
  std('FI-120', 'converter-in');
  std('FI-150', 'recycle');
  const liq = s('liquid-ammonia');
  let mass = 0;
  liq.flows.forEach((v, i) => (mass += v * model.components[i].MW));
  out.set('FI-310', mass + u('FI-310', mass) * gauss());
  const an = (tag, stream, ids, normalized) => {
    const st = s(stream);
    let t = 0;
    for (const id of ids) t += st.fractions[idx(id)];
    for (const id of ids) {
      const x = st.fractions[idx(id)] / (normalized ? t : 1);
      out.set(`${tag}.${id}`, Math.max(0, x + uc(tag, x) * gauss()));
    }
  };
  an('AI-120', 'converter-in', ['NH3'], false);
  an('AI-130', 'converter-out', ['NH3'], false);
  an('AI-205', 'purge', ['H2', 'N2', 'Ar', 'CH4'], true);
  an('AI-310', 'liquid-ammonia', ['H2', 'N2', 'Ar', 'CH4'], false);
  return out;
}

// Columns in the units the instruments declare (the second header line says them).
const columns = [
  ['PI-101', 'barg', (v) => v / 1e5 - 1.01325, 4], ['TI-101', 'degC', (v) => v - 273.15, 2], ['FI-101', 'm3/h', (v) => v * 3600, 4],
  ['FI-120', 'Nm3/h', (v) => v * 3600, 1], ['AI-120.NH3', '', (v) => v, 5], ['AI-130.NH3', '', (v) => v, 5], ['FI-150', 'Nm3/h', (v) => v * 3600, 1],
  ['PI-205', 'barg', (v) => v / 1e5 - 1.01325, 4], ['TI-205', 'degC', (v) => v - 273.15, 2], ['FI-205', 'm3/h', (v) => v * 3600, 5],
  ['AI-205.H2', '', (v) => v, 5], ['AI-205.N2', '', (v) => v, 5], ['AI-205.Ar', '', (v) => v, 5], ['AI-205.CH4', '', (v) => v, 5],
  ['FI-310', 't/h', (v) => v * 3.6, 5],
  ['AI-310.H2', '', (v) => v, 7], ['AI-310.N2', '', (v) => v, 7], ['AI-310.Ar', '', (v) => v, 7], ['AI-310.CH4', '', (v) => v, 7],
];
const fmt = (v, d) => (Number.isFinite(v) ? Number(v.toFixed(d)).toString() : '');

const hours = Number(process.argv[2] ?? 8760);
const lines = [
  '# Invented demo data for flowsheets/ammonia-loop.yaml: a year of hourly readings made up by flowsheets/data/generate.mjs (fixed seed).',
  '# Not plant data. FI-101 reads 6 % high from day 200 to 230; FI-205 is frozen for 12 hours on day 90; a few empty cells; one negative spike on FI-310.',
  ['timestamp', ...columns.map((c) => c[0])].join(','),
  ['', ...columns.map((c) => c[1])].join(','),
];
let prev;
const t0 = Date.UTC(2024, 0, 1);
for (let h = 0; h < hours; h++) {
  const day = h / 24;
  const throughput = 1 + 0.04 * Math.sin((2 * Math.PI * day) / 365) + 0.015 * Math.sin((2 * Math.PI * h) / 24);
  const conversion = 0.23 - 0.02 * (day / 365);
  const m = withValues(model, [{ parameter: convP, value: conversion }], { structure: false });
  const res = solveFlowsheet(m, { runtime: rt, start: prev, method: prev ? 'newton' : undefined });
  if (res.status !== 'converged') throw new Error(`hour ${h}: the solve is ${res.status}`);
  prev = res.x;
  const bias = day >= 200 && day < 230 ? 0.06 : 0;
  const r = readingsAt(res, bias, throughput);
  const cells = columns.map(([tag, , f, d]) => fmt(f(r.get(tag)), d));
  // FI-205 frozen on day 90 (hours 2160..2171): it repeats the reading of hour 2159.
  if (h >= 2160 && h < 2172) cells[9] = lines[lines.length - (h - 2159)].split(',')[10];
  if (h === 4000 || h === 4001) cells[3] = '';
  if (h === 6000) cells[14] = '-0.05';
  if (h === 7000) cells[11] = '';
  const stamp = new Date(t0 + h * 3600e3).toISOString().replace(':00.000Z', 'Z');
  lines.push([stamp, ...cells].join(','));
}
const out = join(here, 'ammonia-loop-year.csv');
writeFileSync(out, `${lines.join('\n')}\n`);
process.stdout.write(`wrote ${out} (${hours} rows)\n`);

// The file's snapshot: the design state, seeded noise, FI-101 reading 6 % high.
const design = solveFlowsheet(model);
const snap = readingsAt(design, 0.06);
const show = (tag, unit, f, d) => `  ${tag}: ${fmt(f(snap.get(tag)), d)} ${unit}`.trimEnd();
process.stdout.write('readings:\n');
for (const [tag, unit, f, d] of columns) if (!tag.includes('.')) process.stdout.write(`${show(tag, unit, f, d)}\n`);
for (const a of ['AI-120', 'AI-130', 'AI-205', 'AI-310']) {
  const parts = columns.filter((c) => c[0].startsWith(`${a}.`)).map(([tag, , f, d]) => `${tag.slice(a.length + 1)}: ${fmt(f(snap.get(tag)), d)}`);
  process.stdout.write(`  ${a}: { ${parts.join(', ')} }\n`);
}
