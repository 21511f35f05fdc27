/**
 * Reporters for `loopclose solve`: the status first, then (only for a converged state) the
 * stream table, the units, the loop figures and the balance. A state that is not a solution
 * is shown as a diagnosis, never as a stream table.
 */
import type { FlowsheetResult } from '../flowsheet/solve.js';
import { standardOfFlowUnit, toUnit } from '../units/index.js';
import { CAUTION, csvLine, num, otherMethods, pct, table, toJson } from './format.js';

export interface SolveReportOptions {
  flowUnit?: string;
}

function record(ids: readonly string[], a: Float64Array): Record<string, number | null> {
  const o: Record<string, number | null> = {};
  ids.forEach((id, i) => (o[id] = orNull(a[i])));
  return o;
}

/** A number, or null where it was not computed (a mixer's vapor fraction, the T of an empty stream). */
function orNull(v: number): number | null {
  return Number.isFinite(v) ? v : null;
}

/**
 * The result in SI as a plain object (the JSON output and the basis of study outputs). Every
 * number in it is finite: what was not computed is null.
 */
export function resultObject(r: FlowsheetResult): Record<string, unknown> {
  const ids = r.model.ids;
  const ok = r.status === 'converged';
  const base: Record<string, unknown> = {
    status: r.status,
    method: r.method,
    passes: r.passes,
    iterations: r.iterations,
    jacobians: r.jacobians,
    residual: r.residual,
    ...(r.message ? { message: r.message } : {}),
    ...(r.failure ? { failure: r.failure } : {}),
    tears: r.tears,
    order: r.order,
    feeds: Object.fromEntries(r.feeds.map((f) => [f.name, {
      Z: f.Z, molarVolume: f.molarVolume, molarFlow: f.molarFlow,
      ...(f.idealMolarFlow !== undefined ? { idealMolarFlow: f.idealMolarFlow, idealError: f.idealError } : {}),
      phase: f.phase, model: f.model, ...(f.fallback ? { fallback: f.fallback } : {}), ...(f.sensitivity ? { sensitivity: f.sensitivity } : {}),
      flows: record(ids, f.flows), T: f.T, P: f.P, conditions: f.conditions, basis: f.basis,
      ...(f.reference ? { reference: f.reference } : {}),
    }])),
  };
  if (ok) {
    base.streams = Object.fromEntries(r.streamOrder.map((name) => {
      const s = r.streams.get(name)!;
      return [name, {
        flows: record(ids, s.flows), total: s.total, fractions: record(ids, s.fractions), T: orNull(s.T), P: orNull(s.P), vaporFraction: orNull(s.vaporFraction), massFlow: s.massFlow,
        molarMass: orNull(s.molarMass), density: orNull(s.density),
        ...(Number.isFinite(s.h) ? { molarEnthalpy: s.h, enthalpy: s.enthalpy } : {}),
      }];
    }));
    base.products = r.products;
    base.units = Object.fromEntries([...r.units].map(([name, u]) => [name, {
      type: u.type,
      ...Object.fromEntries(u.figures.map((f) => [f.key, orNull(f.value)])),
      ...(u.reactions ? { reactions: u.reactions } : {}),
      ...(u.notes.length ? { notes: u.notes } : {}),
    }]));
    // A conversion of a key with no flow in is undefined: null.
    const conversions = Object.fromEntries(Object.entries(r.loop.conversions).map(([id, c]) => [id, {
      ...c, singlePass: orNull(c.singlePass), overall: orNull(c.overall),
      ...(c.byUnit ? { byUnit: Object.fromEntries(Object.entries(c.byUnit).map(([u, x]) => [u, orNull(x)])) } : {}),
    }]));
    base.loop = { recycleRatio: r.loop.recycleRatio, recycles: r.loop.recycles, freshFeed: r.loop.freshFeed, conversions };
    base.balance = r.balance;
  } else {
    base.lastIterate = r.x;
    base.lastTears = Object.fromEntries(lastTears(r).map((t) => [t.stream, { flows: t.flows, T: orNull(t.T), P: orNull(t.P) }]));
    base.worst = r.worst;
  }
  if (r.targets) base.targets = r.targets;
  base.history = r.history.map((h) => ({ pass: h.pass, residual: h.residual, scaled: h.scaled, method: h.method }));
  base.warnings = r.warnings;
  base.caution = CAUTION;
  return base;
}

/** The last iterate by tear stream: component flows (mol/s), T (K), P (Pa). */
function lastTears(r: FlowsheetResult): { stream: string; flows: Record<string, number | null>; T: number; P: number }[] {
  const ids = r.model.ids;
  const m = r.tears.length ? r.x.length / r.tears.length : 0;
  if (m !== ids.length + 2 && m !== ids.length + 3) return [];
  return r.tears.map((stream, t) => ({
    stream,
    flows: record(ids, r.x.subarray(t * m, t * m + ids.length)),
    T: r.x[t * m + ids.length],
    P: r.x[t * m + ids.length + 1],
  }));
}

/**
 * The state of a loop that did not converge, in its own terms: which tear streams and components
 * are still changing from pass to pass (by how much, against their tolerance), and how much the
 * tears carry against the fresh feed (a loop that carries far more than it is fed is
 * accumulating something).
 */
function loopState(r: FlowsheetResult, F: (v: number) => string, fu: string): string[] {
  const lines: string[] = [];
  const byStream = new Map<string, string[]>();
  for (const w of r.worst ?? []) {
    if (!w.name || !(w.scaled > 1)) continue;
    const dot = w.name.lastIndexOf('.');
    const stream = w.name.slice(0, dot);
    const what = w.name.slice(dot + 1);
    const amount = what === 'T' ? `${num(w.residual, 3)} K` : what === 'P' ? `${num(w.residual, 3)} Pa` : `${F(w.residual)} ${fu}`;
    const list = byStream.get(stream) ?? [];
    list.push(`${what} by ${amount} (${num(w.scaled, 3)} x its tolerance)`);
    byStream.set(stream, list);
  }
  for (const [stream, parts] of byStream) lines.push(`\`${stream}\` still changes from pass to pass: ${parts.join(', ')}`);
  const tears = lastTears(r);
  let carried = 0;
  for (const t of tears) for (const v of Object.values(t.flows)) carried += v ?? 0;
  const fresh = r.loop.freshFeed;
  if (fresh > 0 && carried > 100 * fresh) {
    let top = '';
    let big = 0;
    for (const t of tears) for (const [id, v] of Object.entries(t.flows)) if ((v ?? 0) > big) { big = v ?? 0; top = id; }
    lines.push(`the tear streams carry ${num(carried / fresh, 3)} times the fresh feed, most of it \`${top}\`: something may be building up in the loop (a component with too little way out)`);
  }
  return lines;
}

/** For a flow unit that is a standard volume (Nm3/h), what it means: said beside the numbers. */
export function flowNote(unit: string, ctx: { atmosphere: number }): string {
  const ref = standardOfFlowUnit(unit, ctx);
  return ref ? ` (ideal-gas volume at ${ref.label})` : '';
}

export function solveJson(r: FlowsheetResult): string {
  return toJson(resultObject(r));
}

export function solveCsv(r: FlowsheetResult, opts: SolveReportOptions = {}): string {
  const ids = r.model.ids;
  const fu = opts.flowUnit ?? r.model.display.flowUnit;
  const ctx = { atmosphere: r.model.thermo.atmosphere };
  const pu = r.model.display.pressureUnit;
  const tu = r.model.display.temperatureUnit;
  const energy = [...r.streams.values()].some((s) => Number.isFinite(s.h));
  const lines = [csvLine(['stream', ...ids.map((id) => `${id} [${fu}]`), `total [${fu}]`, ...ids.map((id) => `x ${id}`), `T [${tu}]`, `P [${pu}]`, 'vapor fraction', 'molar mass [g/mol]', 'density [kg/m3]',
    ...(energy ? ['molar enthalpy [J/mol]', 'enthalpy flow [W]'] : [])])];
  // A state that is not a solution gives no rows; the first line says so, as a comment.
  if (r.status !== 'converged') return `# status: ${r.status}: ${(r.message ?? 'no solution').replace(/\s+/g, ' ')}\n${lines[0]}\n`;
  for (const name of r.streamOrder) {
    const s = r.streams.get(name)!;
    lines.push(csvLine([
      name,
      ...ids.map((_, i) => toUnit(s.flows[i], 'molarFlow', fu, ctx)),
      toUnit(s.total, 'molarFlow', fu, ctx),
      ...ids.map((_, i) => (Number.isFinite(s.fractions[i]) ? s.fractions[i] : '')),
      Number.isFinite(s.T) ? toUnit(s.T, 'temperature', tu, ctx) : '',
      Number.isFinite(s.P) ? toUnit(s.P, 'pressure', pu, ctx) : '',
      Number.isFinite(s.vaporFraction) ? s.vaporFraction : '',
      Number.isFinite(s.molarMass) ? s.molarMass * 1000 : '',
      Number.isFinite(s.density) ? s.density : '',
      ...(energy ? [Number.isFinite(s.h) ? s.h : '', Number.isFinite(s.enthalpy) ? s.enthalpy : ''] : []),
    ]));
  }
  return lines.join('\n') + '\n';
}

export function solveText(r: FlowsheetResult, opts: SolveReportOptions = {}): string {
  const m = r.model;
  const ids = m.ids;
  const fu = opts.flowUnit ?? m.display.flowUnit;
  const pu = m.display.pressureUnit;
  const tu = m.display.temperatureUnit;
  const ctx = { atmosphere: m.thermo.atmosphere };
  const F = (v: number) => num(toUnit(v, 'molarFlow', fu, ctx), 5);
  const out: string[] = [];
  const head = `status: ${r.status}`;
  out.push(`${head}  (${r.method}: ${r.passes} passes, ${r.iterations} iterations${r.jacobians ? `, ${r.jacobians} Jacobians` : ''}, residual ${r.residual.toExponential(2)})`);
  out.push(`${m.title ? `${m.title} - ` : ''}${m.file} (equation of state: ${m.thermo.eos})`);
  if (r.tears.length) out.push(`tear streams: ${r.tears.join(', ')}; calculation order: ${r.order.join(' -> ')}`);
  if (r.targets?.length) {
    out.push('');
    out.push('Targets');
    for (const t of r.targets) {
      const input = t.shown?.input ?? num(t.input, 8);
      // Without a steady state there is no output to speak of (a bound's state is one: it was solved).
      if (r.status !== 'converged' && !t.met && !t.bound) out.push(`  ${t.text}: not met; no solution at ${t.inputPath} = ${input}, the last value tried`);
      else out.push(`  ${t.text}: reached ${t.shown?.output ?? num(t.output, 8)} by ${t.inputPath} = ${input}${t.met ? '' : ` (not met${t.bound ? `: stopped by its ${t.bound} bound` : ''})`}`);
    }
  }
  if (r.status !== 'converged') {
    out.push('');
    out.push(r.status === 'infeasible' ? 'No steady state exists as specified:' : r.status === 'invalid' ? 'The specification cannot be computed as given; this is not a solution:' : 'The loop did not converge; this is not a solution:');
    // Physics first: what is out of balance in the loop, in the streams and components an
    // engineer knows; the solver's own account after it.
    const physics = r.status === 'not-converged' ? loopState(r, F, fu) : [];
    if (physics.length) {
      out.push('  what the loop is doing at the last iterate:');
      for (const l of physics) out.push(`    ${l}`);
      if (r.message) out.push(`  the solver: ${r.message}`);
    } else if (r.message) out.push(`  ${r.message}`);
    if (r.failure?.help) out.push(`  to fix: ${r.failure.help}`);
    const tears = lastTears(r);
    if (tears.length) {
      out.push(`  last iterate of the tear streams (${fu}; T in ${tu}, P in ${pu}; not a solution):`);
      for (const t of tears) {
        const flows = ids.map((id) => `${id} ${F(t.flows[id] ?? Number.NaN)}`).join(', ');
        out.push(`    ${t.stream}: ${flows}; T ${num(toUnit(t.T, 'temperature', tu, ctx), 5)}, P ${num(toUnit(t.P, 'pressure', pu, ctx), 5)}`);
      }
    }
    const hist = r.history;
    if (hist.length) {
      const pick = hist.length <= 8 ? hist : [...hist.slice(0, 4), ...hist.slice(-4)];
      out.push(`  residual history (pass: scaled residual): ${pick.map((h) => `${h.pass}: ${num(h.scaled, 3)}`).join(', ')}`);
    }
    if (r.status === 'not-converged') out.push(`  try: ${otherMethods(r.method)}more passes (--max-passes), or check the specifications`);
    for (const w of r.warnings) out.push(`warning: ${w}`);
    out.push(`note: ${CAUTION}`);
    return out.join('\n');
  }

  out.push('');
  out.push(`Streams (flows in ${fu}${flowNote(fu, ctx)}, T in ${tu}, P in ${pu})`);
  const names = r.streamOrder;
  const rows: string[][] = [];
  ids.forEach((id, i) => rows.push([id, ...names.map((s) => F(r.streams.get(s)!.flows[i]))]));
  rows.push(['total', ...names.map((s) => F(r.streams.get(s)!.total))]);
  ids.forEach((id, i) => rows.push([`x ${id}`, ...names.map((s) => num(r.streams.get(s)!.fractions[i], 4))]));
  rows.push(['T', ...names.map((s) => num(toUnit(r.streams.get(s)!.T, 'temperature', tu, ctx), 5))]);
  rows.push(['P', ...names.map((s) => num(toUnit(r.streams.get(s)!.P, 'pressure', pu, ctx), 5))]);
  rows.push(['vapor fraction', ...names.map((s) => num(r.streams.get(s)!.vaporFraction, 4))]);
  rows.push(['molar mass g/mol', ...names.map((s) => num(r.streams.get(s)!.molarMass * 1000, 5))]);
  rows.push(['density kg/m3', ...names.map((s) => num(r.streams.get(s)!.density, 5))]);
  const energy = r.balance.energy !== undefined;
  if (energy) {
    rows.push(['h [kJ/mol]', ...names.map((s) => num(r.streams.get(s)!.h / 1000, 6))]);
    rows.push(['enthalpy flow [kW]', ...names.map((s) => num(r.streams.get(s)!.enthalpy / 1000, 6))]);
  }
  out.push(table(['', ...names], rows));
  if (energy) out.push('  (enthalpies on the formation basis: elements at 298.15 K and 1 bar have H = 0; a cubic equation of state is a weak liquid model, so liquid enthalpies of polar components carry a few percent)');

  out.push('');
  out.push('Units');
  for (const [name, u] of r.units) {
    const parts: string[] = [];
    for (const rx of u.reactions ?? []) {
      const eq = rx.equilibrium && rx.equilibriumTemperature !== undefined && rx.equilibriumConstant !== undefined
        ? `, at equilibrium: K ${num(rx.equilibriumConstant, 5)} at ${num(toUnit(rx.equilibriumTemperature, 'temperature', tu, ctx), 5)} ${tu}${rx.approach ? ` (approach ${num(rx.approach, 4)} K)` : ''}`
        : '';
      parts.push(`${rx.equation}: extent ${F(rx.extent)} ${fu}, conversion of ${rx.key} ${num(rx.conversion, 5)}${eq}${rx.heatOfReaction !== undefined ? `, heat of reaction ${num(rx.heatOfReaction / 1000, 5)} kJ/mol at the outlet T (ideal gas)` : ''}`);
    }
    for (const f of u.figures) {
      if (f.key.startsWith('extent.') || f.key.startsWith('equilibrium-') || f.kind === 'count') continue;
      const v = f.kind === 'molarFlow' ? `${F(f.value)} ${fu}`
        : f.kind === 'power' ? `${num(f.value / 1000, 6)} kW`
          : f.kind === 'temperature' ? `${num(toUnit(f.value, 'temperature', tu, ctx), 5)} ${tu}`
            : f.kind === 'pressure' ? `${num(toUnit(f.value, 'pressure', pu, ctx), 5)} ${pu}` : num(f.value, 5);
      parts.push(`${f.label} ${v}`);
    }
    out.push(`  ${name} (${u.type}): ${parts.join('; ') || '-'}${u.notes.length ? `  [${u.notes.join('; ')}]` : ''}`);
  }

  out.push('');
  out.push('Loop');
  out.push(`  fresh feed ${F(r.loop.freshFeed)} ${fu}; recycle ratio (recycle / fresh feed) ${num(r.loop.recycleRatio, 5)}${r.loop.recycles.length ? ` (recycle: ${r.loop.recycles.join(', ')})` : ''}`);
  for (const [key, c] of Object.entries(r.loop.conversions)) {
    const each = c.byUnit ? Object.entries(c.byUnit).map(([u, x]) => `${num(x, 5)} (${u})`).join(', ') : `${num(c.singlePass, 5)} (${c.unit})`;
    out.push(`  ${key}: single-pass conversion ${each}, overall conversion ${num(c.overall, 5)}`);
  }
  out.push(`  products: ${r.products.join(', ')}`);

  out.push('');
  out.push(`Balance (${fu}; closure = (in + generated - out) / scale)`);
  const b = r.balance;
  out.push(table(['component', 'in', 'out', 'generated', 'closure'], ids.map((id) => {
    const c = b.components[id];
    return [id, F(c.in), F(c.out), F(c.generated), num(c.closure, 2)];
  })));
  out.push('');
  out.push(table(['element', `in (${fu} of atoms)`, 'out', 'closure'], Object.entries(b.elements).map(([el, e]) => [el, F(e.in), F(e.out), num(e.closure, 2)])));
  out.push(`  total mass: in ${num(b.mass.in * 3600, 6)} kg/h, out ${num(b.mass.out * 3600, 6)} kg/h, closure ${num(b.mass.closure, 2)}`);
  if (b.energy) {
    const kw = (v: number) => num(v / 1000, 7);
    out.push('');
    out.push('Energy (kW; closure = (in + duty + power - out) / scale; duty is heat into the material, power is shaft work into the fluid)');
    const rowsE: string[][] = [['overall', kw(b.energy.in), kw(b.energy.out), kw(b.energy.duty), kw(b.energy.power), num(b.energy.closure, 2)]];
    for (const [name, e] of Object.entries(b.unitEnergy ?? {})) rowsE.push([name, kw(e.in), kw(e.out), kw(e.duty), kw(e.power), num(e.closure, 2)]);
    out.push(table(['', 'enthalpy in', 'enthalpy out', 'duty', 'power', 'closure'], rowsE));
  }
  if (r.feeds.length) {
    out.push('');
    out.push('Feeds');
    for (const f of r.feeds) {
      out.push(`  ${f.name}: ${F(f.molarFlow)} ${fu} (${f.basis}${f.model !== r.model.thermo.eos ? `, ${f.model}` : ''}), Z ${num(f.Z, 5)}, ${f.phase}${f.idealError !== undefined ? `, ideal-gas error ${pct(f.idealError)}` : ''}${f.reference ? `, standard volume at ${f.reference.label}` : ''}`);
    }
  }
  for (const w of r.warnings) out.push(`warning: ${w}`);
  out.push(`note: ${CAUTION}`);
  return out.join('\n');
}
