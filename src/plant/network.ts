/**
 * A flowsheet as a reconciliation problem: the variables, the balances c(x) = 0 and the
 * instruments' measured quantities (see reconcile.ts for how the problem is solved).
 *
 * Variables per stream: its component flows, mol/s, >= 0, for the components that can reach it
 * (where a component can go is each block's own statement, BlockDef.structure, followed from the
 * feeds as the structure checks do; a component that cannot reach a stream has no variable there
 * and counts as zero). A feed whose composition the file gives, and that no analyzer reads, has
 * one variable, its total flow: its component flows are the file's mole fractions times it (the
 * composition is taken as exact, and the output says so). A feed that an analyzer reads has free
 * component flows, like any other stream.
 *
 * Equations per unit, as each block declares them (BlockDef.balances; nothing here switches on a
 * block's type):
 *   components (mixer, condenser, flash, separator): for each component, the flow in (all
 *       inlets) equals the flow out (all outlets);
 *   elements (reactor): for each component, in + sum over the file's reactions of nu x extent +
 *       sum over the other element-balanced changes of their coefficient x their extent = out.
 *       The extents are free unknowns; the "other changes" are a basis of the element-balanced
 *       changes that the file's reactions do not span (the null space of the element matrix less
 *       the reactions' span, by SVD), so the equations say exactly that every element is
 *       conserved, and the file's extents are unique when its reactions are independent;
 *   split (splitter): one free fraction f_k per outlet (0..1), sum f_k = 1, and for each outlet
 *       and component, outlet flow = f_k x inlet flow (equal compositions, bilinear).
 * The file's specifications (conversions, split fractions, recoveries, condenser temperatures)
 * are not used: the data decide the figures each block names (BalanceDecl.figures), reported by
 * their parameter paths. The design solve of the file only gives start values.
 *
 * Instruments (each a measured variable with its own equation):
 *   meter, standard, molar   m (mol/s) = sum of the stream's component flows; a meter's volume
 *                            and a standard volume are converted to mol/s outside the problem
 *                            (budget.ts), with the stream's composition;
 *   mass                     m (kg/s) = sum of M_i x component flow i;
 *   analyzer                 for each listed component k: w_k x (sum over the basis of the
 *                            stream's component flows) = flow of k, the basis being the listed
 *                            components (normalized, the default) or every component; on a
 *                            splitter outlet (or after a one-inlet, one-outlet unit on one), the
 *                            flows of the splitter's inlets, the same gas, so that emptying the
 *                            outlet cannot satisfy the equations for any reading;
 *   pressure, temperature    no variable (line conditions of meters).
 * Every equation is a sum of terms c, c x_j or c x_j x_l, so c(x) and its Jacobian are exact and
 * cheap (BilinearConstraints).
 */
import { Matrix, SingularValueDecomposition } from 'ml-matrix';
import { blockOf } from '../blocks/registry.js';
import type { BalanceDecl, BalanceView } from '../blocks/types.js';
import { InputError, type Diagnostic } from '../diagnostics.js';
import type { FlowsheetResult } from '../flowsheet/result.js';
import type { Model } from '../flowsheet/model.js';
import type { InstrumentDecl } from './declarations.js';
import type { ConstraintPattern, ConstraintProducts, PlantConstraints, PlantVariable } from './types.js';

export interface StreamVars {
  name: string;
  /** Feeds of known composition: the variable of the total flow, and the mole fractions. */
  total?: number;
  z?: Float64Array;
  /** Other streams: the variable of each component's flow, -1 where it cannot be. */
  flows?: Int32Array;
  present: Uint8Array;
  role: 'feed' | 'product' | 'internal';
}

export interface InstrumentVars {
  decl: InstrumentDecl;
  /** Flow instruments: the measured variable (mol/s, or kg/s for mass). */
  variable?: number;
  /** Analyzers: the measured variable of each listed component (same order as decl.components). */
  fractions?: number[];
}

export interface UnitVars {
  name: string;
  type: string;
  inlets: string[];
  outlets: string[];
  decl: BalanceDecl;
  /** Variables of the file's reactions' extents, then of the other element-balanced changes. */
  extents: number[];
  others: number[];
  /** Split fraction variable of each outlet (law split). */
  fractions: number[];
}

export interface NetworkFigure {
  path: string;
  unit: string;
  value(x: Float64Array): number;
  /** Every variable value(x) can read: its unit's inlet and outlet streams and extents. */
  reads: Int32Array;
  /**
   * The variables value(x) reads at this x, in increasing order (a subset of reads). The figure
   * sees x only through its unit's view, so at any x that differs from this one only in other
   * variables it reads the same values, takes the same path and gives the same number: its
   * derivative in each of them is exactly zero.
   */
  readsAt(x: Float64Array): Int32Array;
}

export interface Network {
  model: Model;
  variables: PlantVariable[];
  constraints: BilinearConstraints;
  streams: Map<string, StreamVars>;
  instruments: Map<string, InstrumentVars>;
  units: UnitVars[];
  figures: NetworkFigure[];
  /** Start values (the design solve, where it has them). */
  start: Float64Array;
  /** Component flows of each stream in the design solve (for compositions not yet measured). */
  design: Map<string, Float64Array>;
  notes: string[];
}

/** Flow of component i in a stream at x (mol/s). */
export function flowOf(s: StreamVars, i: number, x: ArrayLike<number>): number {
  if (s.total !== undefined) return s.z![i] * x[s.total];
  const j = s.flows![i];
  return j >= 0 ? x[j] : 0;
}

/** The variables of a stream: its total, or its component flows. */
export function streamVariables(s: StreamVars): number[] {
  if (s.total !== undefined) return [s.total];
  return Array.from(s.flows!).filter((j) => j >= 0);
}

export function totalOf(s: StreamVars, x: ArrayLike<number>): number {
  if (s.total !== undefined) return x[s.total];
  let t = 0;
  for (let i = 0; i < s.flows!.length; i++) if (s.flows![i] >= 0) t += x[s.flows![i]];
  return t;
}

/** c(x) as sums of terms c, c x_j, c x_j x_l (j, l = -1 for none), with the exact Jacobian. */
export class BilinearConstraints implements PlantConstraints {
  readonly count: number;
  readonly names: string[];
  private readonly start: Int32Array;
  private readonly c: Float64Array;
  private readonly j: Int32Array;
  private readonly l: Int32Array;
  constructor(rows: { name: string; terms: [number, number, number][] }[], readonly n: number) {
    this.count = rows.length;
    this.names = rows.map((r) => r.name);
    const total = rows.reduce((s, r) => s + r.terms.length, 0);
    this.start = new Int32Array(rows.length + 1);
    this.c = new Float64Array(total);
    this.j = new Int32Array(total);
    this.l = new Int32Array(total);
    let t = 0;
    rows.forEach((r, i) => {
      this.start[i] = t;
      for (const [c, j, l] of r.terms) {
        this.c[t] = c;
        this.j[t] = j;
        this.l[t] = l;
        t++;
      }
    });
    this.start[rows.length] = t;
  }
  evaluate(x: Float64Array, out: Float64Array): void {
    const { c, j, l, start } = this;
    for (let i = 0; i < this.count; i++) {
      let s = 0;
      for (let t = start[i]; t < start[i + 1]; t++) {
        const a = j[t] >= 0 ? x[j[t]] : 1;
        const b = l[t] >= 0 ? x[l[t]] : 1;
        s += c[t] * a * b;
      }
      out[i] = s;
    }
  }
  pattern(): ConstraintPattern {
    const { j, l, start } = this;
    const rowStart = new Int32Array(this.count + 1);
    const index: number[] = [];
    const linear = new Uint8Array(this.count);
    for (let i = 0; i < this.count; i++) {
      rowStart[i] = index.length;
      const seen = new Set<number>();
      let lin = 1;
      for (let t = start[i]; t < start[i + 1]; t++) {
        if (j[t] >= 0 && l[t] >= 0) lin = 0;
        for (const v of [j[t], l[t]]) if (v >= 0 && !seen.has(v)) seen.add(v);
      }
      index.push(...[...seen].sort((a, b) => a - b));
      linear[i] = lin;
    }
    rowStart[this.count] = index.length;
    return { start: rowStart, index: Int32Array.from(index), linear };
  }
  products(): ConstraintProducts {
    const { c, j, l, start } = this;
    const rows: number[] = [];
    const a: number[] = [];
    const b: number[] = [];
    const coef: number[] = [];
    for (let i = 0; i < this.count; i++) {
      for (let t = start[i]; t < start[i + 1]; t++) {
        if (j[t] < 0 || l[t] < 0 || c[t] === 0) continue;
        rows.push(i);
        a.push(j[t]);
        b.push(l[t]);
        coef.push(c[t]);
      }
    }
    return { row: Int32Array.from(rows), a: Int32Array.from(a), b: Int32Array.from(b), coef: Float64Array.from(coef) };
  }
  jacobian(x: Float64Array, out: Float64Array): void {
    const { c, j, l, start, n } = this;
    for (let i = 0; i < this.count; i++) {
      for (let t = start[i]; t < start[i + 1]; t++) {
        const jt = j[t];
        const lt = l[t];
        if (jt >= 0) out[i * n + jt] += c[t] * (lt >= 0 ? x[lt] : 1);
        if (lt >= 0) out[i * n + lt] += c[t] * (jt >= 0 ? x[jt] : 1);
      }
    }
  }
}

/** Where each component can go, from the feeds through each block's own structure rules. */
function presence(model: Model, analyzed: ReadonlySet<string>, components: Map<string, number[]>): Map<string, Uint8Array> {
  const n = model.ids.length;
  const carry = new Map<string, Uint8Array>();
  for (const f of model.feeds) {
    const c = Uint8Array.from(f.composition, (x) => (x > 0 ? 1 : 0));
    if (analyzed.has(f.name)) for (const i of components.get(f.name) ?? []) c[i] = 1;
    carry.set(f.name, c);
  }
  for (const u of model.units) for (const o of u.outlets) carry.set(o, new Uint8Array(n));
  const rules = model.units.map((u) => blockOf(u).structure?.(u, model) ?? { passes: () => true });
  for (let changed = true; changed; ) {
    changed = false;
    model.units.forEach((u, k) => {
      const have = new Uint8Array(n);
      for (const s of u.inlets) {
        const c = carry.get(s);
        if (c) for (let i = 0; i < n; i++) have[i] |= c[i];
      }
      const rule = rules[k];
      const src = rule.transform ? rule.transform(have).out : have;
      u.outlets.forEach((o, j) => {
        const c = carry.get(o)!;
        for (let i = 0; i < n; i++) {
          if (src[i] && !c[i] && rule.passes(j, i)) {
            c[i] = 1;
            changed = true;
          }
        }
      });
    });
  }
  return carry;
}

/** Basis of the element-balanced changes that the reactions do not span (columns, length n each). */
function otherChanges(model: Model, reactions: readonly { nu: Float64Array }[]): Float64Array[] {
  const n = model.ids.length;
  const elements = [...new Set(model.elements.flatMap((e) => Object.keys(e)))];
  if (elements.length === 0) return [];
  const E = new Matrix(elements.map((el) => model.ids.map((_, i) => model.elements[i][el] ?? 0)));
  const svd = new SingularValueDecomposition(E.transpose().mmul(E), { autoTranspose: true });
  const s = svd.diagonal;
  const V = svd.rightSingularVectors;
  const tol = 1e-10 * Math.max(1, ...s);
  const nullBasis: number[][] = [];
  for (let k = 0; k < n; k++) if (s[k] <= tol) nullBasis.push(V.getColumn(k));
  if (nullBasis.length === 0) return [];
  // Remove the reactions' span: project the null basis on the orthogonal complement of the
  // reactions, then keep an orthonormal basis of what is left.
  const cols = [...nullBasis.map((v) => Float64Array.from(v))];
  if (reactions.length > 0) {
    const Rm = new Matrix(reactions.map((r) => Array.from(r.nu))).transpose(); // n x r
    const rsvd = new SingularValueDecomposition(Rm, { autoTranspose: true });
    const U = rsvd.leftSingularVectors;
    const rs = rsvd.diagonal;
    const rtol = 1e-10 * Math.max(1, ...rs);
    const basis: number[][] = [];
    for (let k = 0; k < rs.length; k++) if (rs[k] > rtol) basis.push(U.getColumn(k));
    for (const c of cols) {
      for (const u of basis) {
        let d = 0;
        for (let i = 0; i < n; i++) d += u[i] * c[i];
        for (let i = 0; i < n; i++) c[i] -= d * u[i];
      }
    }
  }
  const M = new Matrix(cols.map((c) => Array.from(c))).transpose(); // n x d
  const msvd = new SingularValueDecomposition(M, { autoTranspose: true });
  const U = msvd.leftSingularVectors;
  const ms = msvd.diagonal;
  const out: Float64Array[] = [];
  for (let k = 0; k < ms.length; k++) {
    if (ms[k] > 1e-8) {
      const v = Float64Array.from(U.getColumn(k), (a) => (Math.abs(a) < 1e-12 ? 0 : a));
      out.push(v);
    }
  }
  return out;
}

/**
 * The reconciliation problem of a model with instruments. `design` (a solve of the file) gives
 * start values; without one, the starts are rough. Throws InputError when a unit's block
 * declares no balances.
 */
export function buildNetwork(model: Model, design?: FlowsheetResult): Network {
  const n = model.ids.length;
  const notes: string[] = [];
  const diags: Diagnostic[] = [];
  const analyzers = model.instruments.filter((d) => d.kind === 'analyzer');
  const analyzedFeeds = new Set(analyzers.map((a) => a.stream).filter((s) => model.feeds.some((f) => f.name === s)));
  const analyzedComponents = new Map<string, number[]>();
  for (const a of analyzers) analyzedComponents.set(a.stream, [...(analyzedComponents.get(a.stream) ?? []), ...a.components!]);
  const carry = presence(model, analyzedFeeds, analyzedComponents);
  const taken = new Set(model.units.flatMap((u) => u.inlets));

  const variables: PlantVariable[] = [];
  const start: number[] = [];
  const designFlows = new Map<string, Float64Array>();
  const streamTotal = (name: string) => {
    const f = designFlows.get(name)!;
    let t = 0;
    for (let i = 0; i < n; i++) t += f[i];
    return t;
  };
  let feedTotal = 0;
  for (const f of model.feeds) {
    const r = design?.feeds.find((x) => x.name === f.name);
    feedTotal += r && Number.isFinite(r.molarFlow) ? r.molarFlow : 0;
  }
  if (!(feedTotal > 0)) feedTotal = 1;
  const streamNames = [...model.feeds.map((f) => f.name), ...model.units.flatMap((u) => u.outlets)];
  for (const s of streamNames) {
    const d = design?.streams.get(s)?.flows;
    const present = carry.get(s)!;
    let count = 0;
    for (let i = 0; i < n; i++) if (present[i]) count++;
    const flows = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      if (!present[i]) continue;
      const v = d ? d[i] : NaN;
      flows[i] = Number.isFinite(v) && v >= 0 ? v : feedTotal / Math.max(1, count);
    }
    designFlows.set(s, flows);
  }

  const add = (v: PlantVariable) => {
    variables.push(v);
    start.push(v.start);
    return variables.length - 1;
  };
  const streams = new Map<string, StreamVars>();
  for (const s of streamNames) {
    const feed = model.feeds.find((f) => f.name === s);
    const present = carry.get(s)!;
    const role = feed ? 'feed' : taken.has(s) ? 'internal' : 'product';
    const df = designFlows.get(s)!;
    const tot = streamTotal(s);
    if (feed && !analyzedFeeds.has(s)) {
      const j = add({ name: `streams.${s}.total`, start: tot, lower: 0, typical: Math.max(tot, 1e-9) });
      streams.set(s, { name: s, total: j, z: feed.composition, present, role });
      notes.push(`feed \`${s}\`: its composition is the file's, taken as exact (no analyzer reads it)`);
    } else {
      const flows = new Int32Array(n).fill(-1);
      for (let i = 0; i < n; i++) {
        if (!present[i]) continue;
        flows[i] = add({ name: `streams.${s}.flows.${model.ids[i]}`, start: df[i], lower: 0, typical: Math.max(df[i], 1e-3 * tot, 1e-9) });
      }
      streams.set(s, { name: s, flows, present, role });
    }
  }

  type Term = [number, number, number];
  const rows: { name: string; terms: Term[] }[] = [];
  /** Terms of coef x flow(s, i) [x times]. */
  const flowTerms = (s: StreamVars, i: number, coef: number, times = -1): Term[] => {
    if (s.total !== undefined) return s.z![i] !== 0 ? [[coef * s.z![i], s.total, times]] : [];
    return s.flows![i] >= 0 ? [[coef, s.flows![i], times]] : [];
  };

  const units: UnitVars[] = [];
  for (const u of model.units) {
    const def = blockOf(u);
    if (!def.balances) {
      diags.push({ severity: 'error', message: `unit \`${u.name}\` (${u.type}) cannot take part in a reconciliation: its block declares no balances`, span: u.span, help: 'reconcile a flowsheet of mixers, reactors, condensers, flashes, splitters and separators' });
      continue;
    }
    const decl = def.balances(u, model);
    const ins = u.inlets.map((s) => streams.get(s)!);
    const outs = u.outlets.map((s) => streams.get(s)!);
    const uv: UnitVars = { name: u.name, type: u.type, inlets: u.inlets, outlets: u.outlets, decl, extents: [], others: [], fractions: [] };
    const designSummary = design?.units.get(u.name);
    if (decl.law === 'elements') {
      const reactions = decl.reactions ?? [];
      reactions.forEach((rx, r) => {
        const e = designSummary?.reactions?.[r]?.extent;
        uv.extents.push(add({ name: `${u.name}.extent.${r}`, start: Number.isFinite(e) ? e! : 0, typical: Math.max(Math.abs(e ?? 0), 1e-3 * feedTotal) }));
      });
      const others = otherChanges(model, reactions);
      others.forEach((_, k) => uv.others.push(add({ name: `${u.name}.other-change.${k}`, start: 0, typical: 1e-3 * feedTotal })));
      if (others.length) {
        notes.push(`reactor \`${u.name}\`: the elements allow ${others.length} change${others.length === 1 ? '' : 's'} of composition besides its reactions; ${others.length === 1 ? 'it has a free extent' : 'they have free extents'} (only the elements are conserved)`);
      }
      for (let i = 0; i < n; i++) {
        const terms: Term[] = [];
        for (const s of ins) terms.push(...flowTerms(s, i, 1));
        reactions.forEach((rx, r) => {
          if (rx.nu[i] !== 0) terms.push([rx.nu[i], uv.extents[r], -1]);
        });
        others.forEach((v, k) => {
          if (v[i] !== 0) terms.push([v[i], uv.others[k], -1]);
        });
        for (const s of outs) terms.push(...flowTerms(s, i, -1));
        if (terms.length) rows.push({ name: `${u.name}: ${model.ids[i]} balance (elements conserved)`, terms });
      }
    } else if (decl.law === 'components') {
      for (let i = 0; i < n; i++) {
        const terms: Term[] = [];
        for (const s of ins) terms.push(...flowTerms(s, i, 1));
        for (const s of outs) terms.push(...flowTerms(s, i, -1));
        if (terms.length) rows.push({ name: `${u.name}: ${model.ids[i]} balance`, terms });
      }
    } else {
      const inTotal = ins.reduce((t, s) => t + streamTotal(s.name), 0);
      outs.forEach((o) => {
        const f = inTotal > 0 ? streamTotal(o.name) / inTotal : 1 / outs.length;
        uv.fractions.push(add({ name: `${u.name}.fraction.${o.name}`, start: f, lower: 0, upper: 1, typical: 1 }));
      });
      rows.push({ name: `${u.name}: fractions sum to 1`, terms: [...uv.fractions.map((j): Term => [1, j, -1]), [-1, -1, -1]] });
      outs.forEach((o, k) => {
        for (let i = 0; i < n; i++) {
          const terms: Term[] = [...flowTerms(o, i, 1)];
          for (const s of ins) terms.push(...flowTerms(s, i, -1, uv.fractions[k]));
          if (terms.length) rows.push({ name: `${u.name}: ${model.ids[i]} to ${o.name} at the inlet's composition`, terms });
        }
      });
    }
    units.push(uv);
  }
  if (diags.length) throw new InputError(diags);

  const instruments = new Map<string, InstrumentVars>();
  for (const d of model.instruments) {
    const s = streams.get(d.stream)!;
    const df = designFlows.get(d.stream)!;
    const tot = streamTotal(d.stream);
    if (d.kind === 'meter' || d.kind === 'molar' || d.kind === 'standard' || d.kind === 'mass') {
      const mass = d.kind === 'mass';
      let designValue = 0;
      for (let i = 0; i < n; i++) designValue += df[i] * (mass ? model.components[i].MW : 1);
      const j = add({ name: d.tag, start: designValue, lower: 0, typical: Math.max(designValue, 1e-9), measured: { value: designValue, sigma: 1 } });
      const terms: Term[] = [[1, j, -1]];
      for (let i = 0; i < n; i++) terms.push(...flowTerms(s, i, mass ? -model.components[i].MW : -1));
      rows.push({ name: `${d.tag}: ${mass ? 'mass' : 'molar'} flow of ${d.stream}`, terms });
      instruments.set(d.tag, { decl: d, variable: j });
    } else if (d.kind === 'analyzer') {
      const basis = d.normalized === false ? model.ids.map((_, i) => i) : d.components!;
      let bsum = 0;
      for (const i of basis) bsum += df[i];
      // A splitter's outlet has its inlets' composition, and so has the outlet of a unit with one
      // inlet and one outlet that keeps every component (a heater, a cooler, a compressor, a
      // one-inlet mixer): the analyzer's equations are written on the inlets of the splitter
      // upstream (through such units and splitters in series). On a splitter outlet's own flows
      // they would hold for any reading once its fraction reaches 0, and the solve could empty an
      // unmetered outlet to wave its analyzer's readings through.
      let from = [s];
      let walk = [s];
      for (let hop = 0; hop < units.length && walk.length === 1; hop++) {
        const name = walk[0].name;
        const up = units.find((uv) => uv.outlets.includes(name));
        if (!up) break;
        if (up.decl.law === 'split') {
          walk = up.inlets.map((nm) => streams.get(nm)!);
          from = walk;
        } else if (up.decl.law === 'components' && up.inlets.length === 1 && up.outlets.length === 1) {
          walk = [streams.get(up.inlets[0])!];
        } else break;
      }
      const fr: number[] = [];
      for (const k of d.components!) {
        const w0 = bsum > 0 ? df[k] / bsum : 0;
        const j = add({ name: `${d.tag}.${model.ids[k]}`, start: w0, lower: 0, upper: 1, typical: Math.max(w0, 1e-6), measured: { value: w0, sigma: 1 } });
        const terms: Term[] = [];
        for (const src of from) for (const i of basis) terms.push(...flowTerms(src, i, 1, j));
        for (const src of from) terms.push(...flowTerms(src, k, -1));
        rows.push({ name: `${d.tag}: fraction of ${model.ids[k]} in ${d.stream}`, terms });
        fr.push(j);
      }
      instruments.set(d.tag, { decl: d, fractions: fr });
    } else instruments.set(d.tag, { decl: d });
  }

  // Figures each block names, as functions of x.
  const figures: NetworkFigure[] = [];
  for (const uv of units) {
    for (const fig of uv.decl.figures ?? []) {
      const ins = uv.inlets.map((s) => streams.get(s)!);
      const outs = uv.outlets.map((s) => streams.get(s)!);
      const reads = Int32Array.from(new Set([...[...ins, ...outs].flatMap(streamVariables), ...uv.extents, ...uv.others]));
      // One view per figure, reading the x of the call (derived estimates call value() many times).
      let at: Float64Array = new Float64Array(0);
      // While readsAt records: the variables the view has read.
      let seen: Uint8Array | undefined;
      const mark = (st: StreamVars, i: number | undefined) => {
        if (st.total !== undefined) seen![st.total] = 1;
        else if (i === undefined) {
          for (const j of st.flows!) if (j >= 0) seen![j] = 1;
        } else if (st.flows![i] >= 0) seen![st.flows![i]] = 1;
      };
      const view: BalanceView = {
        inlet: (i) => {
          if (seen) for (const st of ins) mark(st, i);
          return ins.reduce((t, s) => t + (i === undefined ? totalOf(s, at) : flowOf(s, i, at)), 0);
        },
        outlet: (k, i) => {
          if (seen) mark(outs[k], i);
          return i === undefined ? totalOf(outs[k], at) : flowOf(outs[k], i, at);
        },
        extent: (r) => {
          if (seen) seen[uv.extents[r]] = 1;
          return at[uv.extents[r]];
        },
      };
      figures.push({
        path: fig.path,
        unit: fig.path.includes('.extent') ? 'mol/s' : '',
        reads,
        value(x) {
          at = x;
          return fig.value(view);
        },
        readsAt(x) {
          at = x;
          seen = new Uint8Array(x.length);
          try {
            fig.value(view);
            const out: number[] = [];
            for (let j = 0; j < seen.length; j++) if (seen[j]) out.push(j);
            return Int32Array.from(out);
          } finally {
            seen = undefined;
          }
        },
      });
    }
  }
  const nv = variables.length;
  return {
    model, variables, constraints: new BilinearConstraints(rows, nv), streams, instruments, units, figures,
    start: Float64Array.from(start), design: designFlows, notes,
  };
}
