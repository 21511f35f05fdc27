/**
 * Plant data on a flowsheet: do the plant's own meters close the balance, by how much, within
 * their uncertainty, and if not, which one is wrong? One snapshot (a row of readings) at a time:
 *
 *   const plant = preparePlant(model, { budget })      // the network, its balances, start values
 *   const { report, x } = plant.run(row, warm)         // one row; x starts the next row
 *
 * For a row: each reading is checked (present, not negative, inside its instrument's range, not
 * a 0 under an uncertainty in % of the reading; a meter needs its line pressure and temperature),
 * flow readings are converted to what the balances take with their uncertainty budget
 * (budget.ts; a meter on a stream of unknown composition is converted with the composition the
 * reconciliation finds, again until it no longer moves, and reported with the conversion the
 * reconciliation took), then:
 *  1. the raw closure of each element and of the total mass over the plant's envelope (feeds in,
 *     products out) from the readings alone, with its uncertainty (closure.ts, GUM, k = 2);
 *  2. the reconciliation (reconcile.ts) of the network's balances (network.ts);
 *  3. the global test, the measurement tests and serial elimination (serial.ts);
 *  4. the figures the data decide (conversions, split fractions, recoveries) and the streams no
 *     meter reads, each with its standard uncertainty (derived.ts), from the reconciliation
 *     without the suspects.
 * Status: reconciled (global test passes), gross-error (it fails), not-redundant (nothing to
 * check: the raw closure is still given), not-converged, invalid.
 */
import { solveFlowsheet } from '../flowsheet/solve.js';
import type { Model } from '../flowsheet/model.js';
import { parameter } from '../study/parameters.js';
import { makeEos } from '../thermo/eos.js';
import type { Eos } from '../thermo/types.js';
import type { StandardRef } from '../units/index.js';
import { meterFlowBudget, type FlowBudget, type FlowBudgetResult } from './budget.js';
import { meterEosFor } from '../thermo/meter-eos.js';
import { atReference, standardUncertainty, type InstrumentDecl } from './declarations.js';
import { derivedFigure, newDerivedWork } from './derived.js';
import { buildNetwork, flowOf, streamVariables, totalOf, type Network, type StreamVars } from './network.js';
import { prepareReconciliation, type PreparedReconciliation } from './reconcile.js';
import { serialElimination } from './serial.js';
import type { ReconcileOptions, ReconcileResult } from './types.js';
import { pValueText } from './statistics.js';

export type PlantStatus = 'reconciled' | 'gross-error' | 'not-redundant' | 'not-converged' | 'invalid';

/** One row's reading of an instrument (SI): a value, or an analyzer's fractions (NaN where not read). */
export interface RowReading {
  value?: number;
  fractions?: Float64Array;
  /** A standard flow's reference, when its unit named one. */
  reference?: StandardRef;
  /** Where it was read (`FILE:LINE:COL`), for messages. */
  where?: string;
}

export interface RowInput {
  readings: ReadonlyMap<string, RowReading>;
  /** Readings the caller has already left out, with the reason (a frozen meter). */
  leftOut?: ReadonlyMap<string, string>;
}

export interface PlantOptions {
  /** The flow instruments' uncertainty budget (default: budget.ts). */
  budget?: FlowBudget;
  reconcile?: ReconcileOptions;
  /** Most suspects serial elimination takes out (default: no limit but the redundancy). */
  maxSuspects?: number;
}

export interface Estimate {
  measured: number | null;
  reconciled: number | null;
  sigma: number | null;
  reconciledSigma: number | null;
  /** An analyzer's component: its own measurement test (|adjustment| / its sigma), null when untested. */
  test?: number | null;
}

export interface InstrumentReport {
  kind: string;
  stream: string;
  /** used: in the reconciliation; no-reading: not read in this row; left-out: read but not used (reason); context: pressure or temperature. */
  use: 'used' | 'no-reading' | 'left-out' | 'context';
  reason?: string;
  /** The reading in SI of its dimension (m3/s, kg/s, mol/s, Pa, K). */
  reading?: number;
  molarFlow?: Estimate;
  massFlow?: Estimate;
  fractions?: Record<string, Estimate>;
  classification?: 'redundant' | 'non-redundant';
  /** Measurement test statistic (largest over an analyzer's components), its critical value. */
  test: number | null;
  critical?: number;
  failed?: boolean;
  suspect: boolean;
  budget?: { terms: FlowBudgetResult['terms']; notes: string[] };
}

export interface GlobalTestReport {
  statistic: number | null;
  dof: number;
  critical: number | null;
  pValue: number | null;
  passed: boolean | null;
}

export interface ClosureEntry {
  in: number;
  out: number;
  relative: number;
  /** Expanded uncertainty of relative (k = 2, about 95 %). */
  uncertainty: number;
}

export interface PlantReport {
  status: PlantStatus;
  message: string;
  closure: { elements: Record<string, ClosureEntry>; mass: ClosureEntry | null; note?: string };
  instruments: Record<string, InstrumentReport>;
  globalTest: GlobalTestReport;
  measurementTest?: { count: number; level: number; critical: number };
  suspects: { tag: string; component?: string; bias: number; biasSigma: number; statistic: number; indistinguishableFrom: string[] }[];
  afterRemoving?: { tags: string[]; globalTest: GlobalTestReport; instruments: Record<string, { molarFlow?: Estimate; fractions?: Record<string, Estimate> }> };
  parameters: Record<string, { value: number | null; sigma: number | null; unit: string; file?: number; parameter: boolean; observable: boolean }>;
  unmeasured: Record<string, { value: number | null; sigma: number | null; observable: boolean; reason?: string }>;
  redundancy: number;
  iterations: number;
  notes: string[];
}

/**
 * Tolerances of a plant's reconciliation: steps of at most 1e-6 standard uncertainties and
 * balances closed to 1e-9 of their terms (far below any meter's uncertainty; the engine's own
 * defaults are tighter still, and cost an iteration more per row).
 */
export const PLANT_RECONCILE_DEFAULTS: ReconcileOptions = { stepTolerance: 1e-6, constraintTolerance: 1e-9 };

/** A meter converted with the reconciled composition is settled when its value moves by at most this many of its standard uncertainties. */
const CONVERSION_SETTLED = 0.05;

const SI_UNIT: Record<string, string> = { meter: 'm3/s', mass: 'kg/s', molar: 'mol/s', standard: 'm3/s', pressure: 'Pa', temperature: 'K', analyzer: '1' };

export function preparePlant(model: Model, options: PlantOptions = {}): PlantReconciliation {
  return new PlantReconciliation(model, options);
}

export class PlantReconciliation {
  readonly network: Network;
  readonly prepared: PreparedReconciliation;
  readonly eos: Eos;
  private readonly budget: FlowBudget;
  private readonly byTag: Map<string, InstrumentDecl>;
  /** Whether the design solve converged (its state gives the start values and unmeasured compositions). */
  readonly designStatus: string;

  constructor(readonly model: Model, readonly options: PlantOptions = {}) {
    const design = solveFlowsheet(model);
    this.designStatus = design.status;
    this.network = buildNetwork(model, design);
    if (design.status !== 'converged') this.network.notes.push(`the design solve of the file is ${design.status}: the reconciliation starts from rough values`);
    this.eos = makeEos(model.thermo.eos, model.components, model.thermo.kij);
    this.budget = options.budget ?? meterFlowBudget(meterEosFor(model.thermo.meterEos, this.eos));
    this.byTag = new Map(model.instruments.map((d) => [d.tag, d]));
    this.rowValues = new Float64Array(this.network.variables.length);
    this.rowSigmas = new Float64Array(this.network.variables.length);
    this.prepared = prepareReconciliation({ variables: this.network.variables, constraints: this.network.constraints }, { ...PLANT_RECONCILE_DEFAULTS, ...options.reconcile });
    for (const fig of this.network.figures) {
      try {
        const p = parameter(model, fig.path);
        this.fileParameters.set(fig.path, { value: p.value, unit: p.dimension ? fig.unit || 'SI' : '' });
      } catch {
        /* a figure of the data, not a parameter of the file */
      }
    }
  }

  /** The figures that are parameters of the file: their value in the file. */
  private readonly fileParameters = new Map<string, { value: number; unit: string }>();
  /** Work space of the derived figures (totals, fitted figures) of the row being described. */
  private readonly derivedWork = newDerivedWork();

  /** Mole fractions of a stream at x (the design's where x does not determine them). */
  composition(s: StreamVars, x: Float64Array | undefined): Float64Array {
    const n = this.model.ids.length;
    const out = new Float64Array(n);
    if (s.z) return s.z.slice();
    let t = 0;
    let ok = !!x;
    if (x) {
      for (let i = 0; i < n; i++) {
        const v = flowOf(s, i, x);
        if (!Number.isFinite(v)) ok = false;
        out[i] = v;
        t += v;
      }
    }
    if (!ok || !(t > 0)) {
      const d = this.network.design.get(s.name)!;
      t = 0;
      for (let i = 0; i < n; i++) t += (out[i] = d[i]);
    }
    for (let i = 0; i < n; i++) out[i] /= t;
    return out;
  }

  /** Reconciles one row. `warm` (a previous row's x) starts the solve. */
  run(input: RowInput, warm?: Float64Array): { report: PlantReport; x: Float64Array } {
    const { network, model } = this;
    const n = network.variables.length;
    const ids = model.ids;
    // The readings and sigmas of this row (read by this row's solves only).
    const values = this.rowValues.fill(Number.NaN);
    const sigmas = this.rowSigmas.fill(Number.NaN);
    const start = Float64Array.from(network.start);
    if (warm) for (let j = 0; j < n; j++) if (Number.isFinite(warm[j])) start[j] = warm[j];
    const instruments: Record<string, InstrumentReport> = {};
    const notes: string[] = [...network.notes];
    const budgets = new Map<string, FlowBudgetResult>();

    // Which readings are usable.
    const usable = new Map<string, RowReading>();
    for (const d of model.instruments) {
      const rep: InstrumentReport = { kind: d.kind, stream: d.stream, use: 'used', test: null, suspect: false };
      instruments[d.tag] = rep;
      const r = input.readings.get(d.tag);
      const left = input.leftOut?.get(d.tag);
      if (d.kind === 'pressure' || d.kind === 'temperature') rep.use = 'context';
      if (r?.value !== undefined) rep.reading = r.value;
      if (left) {
        rep.use = 'left-out';
        rep.reason = left;
        continue;
      }
      if (!r || (r.value === undefined && !r.fractions) || (r.value !== undefined && !Number.isFinite(r.value))) {
        rep.use = d.kind === 'pressure' || d.kind === 'temperature' ? 'context' : 'no-reading';
        if (rep.use === 'context') rep.reason = 'no reading';
        continue;
      }
      const why = readingProblem(d, r, ids);
      if (why) {
        rep.use = 'left-out';
        rep.reason = why;
        continue;
      }
      // An analyzer's component read as exactly 0 with a relative uncertainty (ZERO_RELATIVE) is
      // not read; the analyzer goes on with its other components.
      const zeroRelative = d.kind === 'analyzer'
        ? d.components!.filter((k, pos) => {
            const u = d.componentUncertainty?.[pos] ?? d.uncertainty!;
            return r.fractions![k] === 0 && 'relative' in u;
          })
        : [];
      if (zeroRelative.length > 0) {
        const fractions = Float64Array.from(r.fractions!);
        for (const k of zeroRelative) {
          fractions[k] = Number.NaN;
          notes.push(`"${d.tag}.${ids[k]}": left out: ${ZERO_RELATIVE}`);
        }
        if (!d.components!.some((k) => Number.isFinite(fractions[k]))) {
          rep.use = 'left-out';
          rep.reason = ZERO_RELATIVE;
          continue;
        }
        usable.set(d.tag, { ...r, fractions });
        continue;
      }
      usable.set(d.tag, r);
    }
    // A meter needs its line pressure and temperature.
    for (const d of model.instruments) {
      if (d.kind !== 'meter' || !usable.has(d.tag)) continue;
      for (const key of ['pressure', 'temperature'] as const) {
        const tag = d[key]!;
        if (!usable.has(tag)) {
          const rep = instruments[d.tag];
          rep.use = 'left-out';
          rep.reason = `its line ${key} \`${tag}\` ${instruments[tag]?.reason === 'no reading' || !input.readings.get(tag) ? 'has no reading' : `is left out (${instruments[tag]?.reason ?? 'no reading'})`}`;
          usable.delete(d.tag);
          break;
        }
      }
    }

    // Analyzer readings go in as they are; flow readings through their budget.
    for (const [tag, r] of usable) {
      const iv = network.instruments.get(tag)!;
      const d = iv.decl;
      if (d.kind !== 'analyzer') continue;
      d.components!.forEach((k, pos) => {
        const v = r.fractions![k];
        if (!Number.isFinite(v)) return;
        values[iv.fractions![pos]] = v;
        sigmas[iv.fractions![pos]] = Math.max(standardUncertainty(d.componentUncertainty?.[pos] ?? d.uncertainty!, v), 1e-12);
      });
    }
    const flowTags = [...usable.keys()].filter((t) => network.instruments.get(t)!.variable !== undefined);
    // Converted again with the reconciled composition: only the instruments whose conversion reads
    // it (a meter or a standard volume on a stream of unknown composition); the others would give
    // the same figures again.
    const readsComposition = (tag: string) => {
      const d = network.instruments.get(tag)!.decl;
      return (d.kind === 'meter' || d.kind === 'standard') && !network.streams.get(d.stream)!.z;
    };
    // A conversion is computed into `pending`, and taken by the readings only when applied (a
    // settled one is not: the readings stay as the last reconciliation took them).
    const pending: { tag: string; j: number; b: FlowBudgetResult; sigma: number }[] = [];
    const apply = () => {
      for (const { tag, j, b, sigma } of pending) {
        values[j] = b.value;
        sigmas[j] = sigma;
        budgets.set(tag, b);
      }
    };
    const convert = (x: Float64Array | undefined, again = false): number => {
      let moved = 0;
      pending.length = 0;
      for (const tag of flowTags) {
        if (again && !readsComposition(tag)) continue;
        const iv = network.instruments.get(tag)!;
        const d = iv.decl;
        const r = usable.get(tag)!;
        const s = network.streams.get(d.stream)!;
        const line = d.kind === 'meter'
          ? {
              T: usable.get(d.temperature!)!.value!,
              P: usable.get(d.pressure!)!.value!,
              uT: standardUncertainty(this.byTag.get(d.temperature!)!.uncertainty!, usable.get(d.temperature!)!.value!),
              uP: standardUncertainty(this.byTag.get(d.pressure!)!.uncertainty!, usable.get(d.pressure!)!.value!),
              temperatureTag: d.temperature!,
              pressureTag: d.pressure!,
            }
          : undefined;
        const b = this.budget({
          tag, kind: d.kind as 'meter', reading: r.value!, instrument: standardUncertainty(d.uncertainty!, r.value!, d.kind === 'standard' ? r.reference ?? d.reference : undefined),
          composition: this.composition(s, x), eos: this.eos, line, design: d.design, reference: r.reference ?? d.reference, realGas: d.realGas,
        });
        const j = iv.variable!;
        const sigma = b.sigma > 0 ? b.sigma : Math.max(1e-12, 1e-9 * Math.abs(b.value));
        if (Number.isFinite(values[j])) moved = Math.max(moved, Math.abs(b.value - values[j]) / sigma);
        else moved = Infinity;
        pending.push({ tag, j, b, sigma });
      }
      return moved;
    };
    convert(warm);
    apply();
    let initial: ReconcileResult = this.prepared.solve({ values, sigmas, start });
    // A meter on a stream of unknown composition: convert again with the reconciled composition.
    const compositionDependent = flowTags.some(readsComposition);
    for (let pass = 0; compositionDependent && pass < 3 && (initial.status === 'reconciled' || initial.status === 'not-redundant'); pass++) {
      // Settled: the readings stay as this reconciliation took them, so that what is reported as
      // measured (and its sigma and budget) is what was reconciled and tested.
      if (convert(initial.x, true) <= CONVERSION_SETTLED) break;
      apply();
      for (let j = 0; j < n; j++) if (Number.isFinite(initial.x[j])) start[j] = initial.x[j];
      initial = this.prepared.solve({ values, sigmas, start });
    }
    // Serial elimination starts its solves from the reconciliation with every reading.
    if (initial.status === 'reconciled' || initial.status === 'not-redundant') for (let j = 0; j < n; j++) if (Number.isFinite(initial.x[j])) start[j] = initial.x[j];
    const serial = serialElimination(this.prepared, { values, sigmas, start }, { initial, maxSuspects: this.options.maxSuspects });
    const final = serial.final;

    const closure = this.closure(usable, budgets, initial);
    const report: PlantReport = {
      status: 'reconciled',
      message: '',
      closure,
      instruments,
      globalTest: globalTestOf(initial),
      suspects: [],
      parameters: {},
      unmeasured: {},
      redundancy: initial.redundancy,
      iterations: initial.iterations,
      notes,
    };
    if (initial.status === 'invalid' || initial.status === 'not-converged') {
      report.status = initial.status;
      report.message = initial.message;
      for (const [tag, b] of budgets) instruments[tag].budget = { terms: b.terms, notes: b.notes };
      return { report, x: start };
    }
    if (initial.measurementTest) report.measurementTest = { count: initial.measurementTest.count, level: initial.measurementTest.level, critical: initial.measurementTest.critical };
    const removed = new Set(serial.suspects.map((s) => s.index));
    this.describeInstruments(report, initial, budgets, usable, removed);
    report.suspects = serial.suspects.map((s) => {
      const { tag, component } = this.tagOf(s.index);
      return { tag, ...(component ? { component } : {}), bias: s.relativeBias, biasSigma: s.biasUncertainty / Math.abs(s.reading), statistic: s.statistic, indistinguishableFrom: s.indistinguishableFrom.map((nm) => nm) };
    });
    if (serial.suspects.length > 0) {
      const after: NonNullable<PlantReport['afterRemoving']> = { tags: [...new Set(report.suspects.map((s) => s.tag))], globalTest: globalTestOf(final), instruments: {} };
      // The instruments without the suspects are described when first read (a row of a
      // historian export does not read them); nothing they read changes after this row's run.
      const base = Object.entries(instruments).map(([tag, rep]) => [tag, { ...rep }] as const);
      let described: NonNullable<PlantReport['afterRemoving']>['instruments'] | undefined;
      Object.defineProperty(after, 'instruments', {
        enumerable: true,
        configurable: true,
        get: () => {
          if (described) return described;
          const tmp: PlantReport = { ...report, instruments: Object.fromEntries(base) };
          this.describeInstruments(tmp, final, budgets, usable, removed);
          described = {};
          for (const [tag, rep] of Object.entries(tmp.instruments)) {
            if (rep.molarFlow || rep.fractions) described[tag] = { ...(rep.molarFlow ? { molarFlow: rep.molarFlow } : {}), ...(rep.fractions ? { fractions: rep.fractions } : {}) };
          }
          return described;
        },
      });
      report.afterRemoving = after;
    }
    this.describeEstimates(report, final, serial.suspects.length > 0, usable);
    const pct = (v: number) => `${v >= 0 ? '+' : ''}${(v * 100).toFixed(1)} %`;
    if (initial.status === 'not-redundant') {
      report.status = 'not-redundant';
      report.message = `not redundant: no reading is checked by another, so nothing can be tested; ${closure.note?.startsWith('no raw closure') ? 'nor is there a raw closure (a boundary stream has no flow reading)' : 'the raw closure stands alone'}`;
    } else if (initial.globalTest?.status === 'failed') {
      report.status = 'gross-error';
      const names = report.suspects.map((s) => `${s.tag}${s.component ? ` ${s.component}` : ''} (${Number.isFinite(s.bias) ? `bias ${pct(s.bias)} of its reading` : 'its reading is 0'})`);
      report.message = `gross error: the global test fails (gamma ${fmt(initial.objective)} > ${fmt(initial.globalTest.critical)}, ${pValueText(initial.globalTest.pValue, 2)})` +
        (names.length ? `; suspect${names.length > 1 ? 's' : ''}: ${names.join(', ')}; ${serial.status === 'suspects-found' ? 'the global test passes without them' : serial.stopReason === 'no-redundancy' ? 'without them no redundancy is left to test' : `the global test still fails (${serial.stopReason})`}` : `; no suspect can be named (${serial.stopReason})`);
    } else {
      report.status = 'reconciled';
      report.message = `reconciled: redundancy ${initial.redundancy}; the global test passes (gamma ${fmt(initial.objective)} <= ${fmt(initial.globalTest!.critical)}, ${pValueText(initial.globalTest!.pValue, 2)})`;
    }
    for (const note of final.notes) if (!note.includes('unobservable')) notes.push(note);
    return { report, x: final.status === 'reconciled' || final.status === 'not-redundant' ? final.x : initial.x };
  }

  private tagOf(index: number): { tag: string; component?: string } {
    const name = this.network.variables[index].name;
    for (const [tag, iv] of this.network.instruments) {
      if (iv.variable === index) return { tag };
      const pos = iv.fractions?.indexOf(index) ?? -1;
      if (pos >= 0) return { tag, component: this.model.ids[iv.decl.components![pos]] };
    }
    return { tag: name };
  }

  private describeInstruments(report: PlantReport, res: ReconcileResult, budgets: Map<string, FlowBudgetResult>, usable: Map<string, RowReading>, removed: Set<number>): void {
    const ok = res.status === 'reconciled' || res.status === 'not-redundant';
    const est = (j: number) => (ok ? res.estimates[j] : undefined);
    for (const [tag, iv] of this.network.instruments) {
      const rep = report.instruments[tag];
      const d = iv.decl;
      const s = this.network.streams.get(d.stream)!;
      if (iv.variable !== undefined) {
        const j = iv.variable;
        const e = est(j);
        const b = budgets.get(tag);
        if (b) rep.budget = { terms: b.terms, notes: b.notes };
        const measured = usable.has(tag) && b ? b.value : null;
        const sigma = usable.has(tag) && b ? b.sigma : null;
        const recon = e && e.value !== null ? e.value : null;
        const rsig = e && e.uncertainty !== null ? e.uncertainty : null;
        if (d.kind === 'mass') {
          rep.massFlow = { measured, reconciled: recon, sigma, reconciledSigma: rsig };
          const x = ok ? res.x : undefined;
          const comp = this.composition(s, x && Number.isFinite(totalOf(s, x)) ? x : undefined);
          let MW = 0;
          for (let i = 0; i < comp.length; i++) MW += comp[i] * this.model.components[i].MW;
          const tot = ok ? derivedFigure(res, (xx) => totalOf(s, xx), this.variablesOf(s), this.derivedWork) : { value: null, uncertainty: null };
          rep.molarFlow = { measured: measured === null ? null : measured / MW, reconciled: tot.value, sigma: sigma === null ? null : sigma / MW, reconciledSigma: tot.uncertainty };
        } else {
          rep.molarFlow = { measured, reconciled: recon, sigma, reconciledSigma: rsig };
        }
        this.testOf(rep, e ? [e] : [], removed, [j]);
      } else if (iv.fractions) {
        const fr: Record<string, Estimate> = {};
        const es = iv.fractions.map((j) => est(j));
        d.components!.forEach((k, pos) => {
          const e = es[pos];
          const measured = e?.reading ?? (usable.get(tag)?.fractions?.[k] ?? null);
          fr[this.model.ids[k]] = {
            measured: Number.isFinite(measured as number) ? (measured as number) : null,
            reconciled: e && e.value !== null ? e.value : null,
            sigma: e?.sigma ?? null,
            reconciledSigma: e && e.uncertainty !== null ? e.uncertainty : null,
            test: e?.test ? e.test.statistic : null,
          };
        });
        rep.fractions = fr;
        this.testOf(rep, es.filter((e): e is NonNullable<typeof e> => !!e), removed, iv.fractions);
      }
    }
  }

  private testOf(rep: InstrumentReport, es: ReconcileResult['estimates'], removed: Set<number>, indices: number[]): void {
    let stat: number | null = null;
    let crit: number | undefined;
    let failed = false;
    let redundant = false;
    for (const e of es) {
      if (e.role !== 'measured') continue;
      if (e.classification === 'redundant') redundant = true;
      if (e.test) {
        if (stat === null || e.test.statistic > stat) stat = e.test.statistic;
        crit = e.test.critical;
        failed ||= e.test.failed;
      }
    }
    rep.test = stat;
    if (crit !== undefined) rep.critical = crit;
    if (stat !== null) rep.failed = failed;
    if (es.some((e) => e.role === 'measured')) rep.classification = redundant ? 'redundant' : 'non-redundant';
    rep.suspect = indices.some((j) => removed.has(j));
  }

  private describeEstimates(report: PlantReport, res: ReconcileResult, afterSuspects: boolean, usable: Map<string, RowReading>): void {
    const ok = res.status === 'reconciled' || res.status === 'not-redundant';
    for (const fig of this.network.figures) {
      const fp = this.fileParameters.get(fig.path);
      const file = fp?.value;
      const isParameter = fp !== undefined;
      const unit = fp ? fp.unit : fig.unit;
      // Differenced only in the variables the figure reads at the solution (the others' derivatives are exactly zero).
      const d = ok ? derivedFigure(res, (x) => fig.value(x), fig.readsAt(res.x), this.derivedWork) : { value: null, uncertainty: null };
      // A figure of a component that is not there at all (0 / 0) is left out.
      if (d.value === null && !isParameter && ok && !Number.isFinite(fig.value(Float64Array.from(this.network.start)))) continue;
      // Two literal shapes rather than a spread (the same keys in the same order).
      report.parameters[fig.path] = file !== undefined
        ? { value: d.value, sigma: d.uncertainty, unit, file, parameter: isParameter, observable: d.value !== null }
        : { value: d.value, sigma: d.uncertainty, unit, parameter: isParameter, observable: d.value !== null };
    }
    // Streams that a flow instrument reads in this row are reported with the instrument.
    const metered = new Set<string>();
    for (const d of this.model.instruments) {
      if (this.network.instruments.get(d.tag)!.variable !== undefined && usable.has(d.tag) && !report.instruments[d.tag].suspect) metered.add(d.stream);
    }
    for (const [name, s] of this.network.streams) {
      if (metered.has(name)) continue;
      const d = ok ? derivedFigure(res, (x) => totalOf(s, x), this.variablesOf(s), this.derivedWork) : { value: null, uncertainty: null };
      report.unmeasured[this.totalKey(name)] = d.value !== null
        ? { value: d.value, sigma: d.uncertainty, observable: true }
        : { value: d.value, sigma: d.uncertainty, observable: false, reason: ok ? 'not observable: the readings and balances do not determine it' : `no reconciliation (${res.status})` };
    }
    if (afterSuspects) report.notes.push('fitted figures and unmeasured streams are from the reconciliation without the suspects');
  }

  /** The key of a stream's total in PlantReport.unmeasured, made once per stream. */
  private readonly totalKeys = new Map<string, string>();

  private totalKey(name: string): string {
    let k = this.totalKeys.get(name);
    if (k === undefined) this.totalKeys.set(name, (k = `streams.${name}.total`));
    return k;
  }

  /** Work space of run: a row's readings and sigmas by variable. */
  private readonly rowValues: Float64Array;
  private readonly rowSigmas: Float64Array;

  /** The variables of each stream (streamVariables), made once. */
  private readonly streamVars = new Map<StreamVars, number[]>();

  private variablesOf(s: StreamVars): number[] {
    let v = this.streamVars.get(s);
    if (!v) this.streamVars.set(s, (v = streamVariables(s)));
    return v;
  }

  /** What the raw closure reads of the model, the same for every row (made on first use). */
  private envelope?: {
    elements: string[];
    /** Atoms of each element per molecule of each component (elements x components). */
    atoms: Float64Array[];
    streams: { name: string; s: StreamVars; role: 'feed' | 'product'; tags: string[]; analyzers: InstrumentDecl[]; design: Float64Array }[];
  };

  private envelopeOf(): NonNullable<PlantReconciliation['envelope']> {
    if (!this.envelope) {
      const { model, network } = this;
      const elements = [...new Set(model.elements.flatMap((e) => Object.keys(e)))];
      const atoms = elements.map((el) => Float64Array.from(model.ids, (_, i) => model.elements[i][el] ?? 0));
      const streams: NonNullable<PlantReconciliation['envelope']>['streams'] = [];
      for (const [name, s] of network.streams) {
        if (s.role === 'internal') continue;
        streams.push({
          name, s, role: s.role === 'feed' ? 'feed' : 'product',
          tags: model.instruments.filter((d) => d.stream === name).map((d) => d.tag),
          analyzers: model.instruments.filter((d) => d.stream === name && d.kind === 'analyzer'),
          design: this.composition(s, undefined),
        });
      }
      this.envelope = { elements, atoms, streams };
    }
    return this.envelope;
  }

  /** Raw closure over the envelope from the readings alone (first usable flow instrument of each boundary stream). */
  private closure(usable: Map<string, RowReading>, budgets: Map<string, FlowBudgetResult>, res: ReconcileResult): PlantReport['closure'] {
    const { model } = this;
    const ids = model.ids;
    const nC = ids.length;
    const env = this.envelopeOf();
    const elements = env.elements;
    const nE = elements.length;
    // The closure of closure.ts (rawClosure) summed here as its terms come, without making them:
    // quantities (readings) in order, and for each element (and the mass, at nE) and side the
    // total and its derivative in each quantity, in the order rawClosure adds them, so that the
    // figures are the same to the bit. A term is coef x F x w (a component an analyzer reads:
    // F its stream's flow, w the reading) or (coef x w_design) x F. Two dependences that
    // closure.ts's products cannot state are added to the derivatives (not to the totals): the
    // unread rest of a `normalized: false` analyzer, and a mass reading's molar flow m / MW(x),
    // both moving with the analyzer's readings (without them a weighed product read by an
    // analyzer had its closure uncertainty wrong: test/plant/closure.test.ts).
    const work = this.closureWorkFor(env);
    const { qv, qs, din, dout, tin, tout, nin } = work;
    let nq = 0;
    tin.fill(0);
    tout.fill(0);
    nin.fill(0);
    din.fill(0);
    dout.fill(0);
    const maxQ = work.maxQ;
    const missing: string[] = [];
    const assumed: string[] = [];
    // rawClosure's checks: every quantity and coefficient finite, every standard uncertainty >= 0.
    let valid = true;
    const fracValue = work.fracValue;
    const fracQ = work.fracQ;
    const { restCoef, readQ, dFdq } = work;
    for (const { name, s, role, tags, analyzers, design } of env.streams) {
      let flowTag: string | undefined;
      for (const t of tags) {
        if (usable.has(t) && budgets.has(t)) {
          flowTag = t;
          break;
        }
      }
      if (!flowTag) {
        missing.push(name);
        continue;
      }
      const b = budgets.get(flowTag)!;
      // Composition: the file's (a feed), an analyzer's reading, or the design solve's.
      fracValue.set(design);
      fracQ.fill(-1);
      // What the composition and the molar flow owe to the analyzer's readings beyond their own
      // appearance: with `normalized: false` the components it does not read share the rest,
      // x_i = c_i (1 - sum_k w_k), c_i = design_i / (the design's sum over them), so each reading
      // w_k enters x_i with -c_i; and a mass reading m is the molar flow m / MW(x) of that
      // composition, which moves with every reading, dF/dw_k = -(F / MW) dMW/dw_k.
      restCoef.fill(0);
      let nRead = 0;
      let anyRest = false;
      let an: InstrumentDecl | undefined;
      for (const d of analyzers) {
        if (usable.has(d.tag)) {
          an = d;
          break;
        }
      }
      if (!s.z && an) {
        const r = usable.get(an.tag)!;
        const comps = an.components!;
        const read = comps.filter((k) => Number.isFinite(r.fractions![k]));
        const unread: number[] = [];
        for (let i = 0; i < nC; i++) if (!(an.normalized === false ? read : comps).includes(i)) unread.push(i);
        let dRest = 0;
        for (const i of unread) dRest += design[i];
        let readSum = 0;
        for (const k of read) readSum += r.fractions![k];
        const scale = an.normalized === false ? 1 : 1 - dRest;
        for (const k of read) {
          const pos = comps.indexOf(k);
          const sig = standardUncertainty(an.componentUncertainty?.[pos] ?? an.uncertainty!, r.fractions![k]);
          qv[nq] = r.fractions![k] * scale;
          qs[nq] = sig * scale;
          fracValue[k] = r.fractions![k] * scale;
          readQ[nRead++] = nq;
          fracQ[k] = nq++;
        }
        if (an.normalized === false) {
          const rest = 1 - readSum;
          for (const i of unread) {
            fracValue[i] = dRest > 0 ? (design[i] * rest) / dRest : 0;
            fracQ[i] = -1;
            restCoef[i] = dRest > 0 ? design[i] / dRest : 0;
            if (restCoef[i] !== 0 && nRead > 0) anyRest = true;
          }
        }
        if (unread.some((i) => design[i] > 0)) assumed.push(`${name} (${unread.filter((i) => design[i] > 0).map((i) => ids[i]).join(', ')})`);
      } else if (!s.z) assumed.push(name);
      let MW = 0;
      for (let i = 0; i < nC; i++) MW += fracValue[i] * model.components[i].MW;
      const F = b.basis === 'mass' ? b.value / MW : b.value;
      const uF = b.basis === 'mass' ? b.sigma / MW : b.sigma;
      qv[nq] = F;
      qs[nq] = uF;
      const fq = nq++;
      // dF/dw_k of a mass reading (zero for a molar one): dMW/dw_k = MW_k - sum_i MW_i c_i.
      const massDependent = b.basis === 'mass' && nRead > 0;
      if (massDependent) {
        let restMW = 0;
        for (let i = 0; i < nC; i++) restMW += restCoef[i] * model.components[i].MW;
        for (let r = 0; r < nRead; r++) {
          let k = 0;
          while (fracQ[k] !== readQ[r]) k++;
          dFdq[r] = (-F / MW) * (model.components[k].MW - restMW);
        }
      }
      const feed = role === 'feed';
      const T = feed ? tin : tout;
      const D = feed ? din : dout;
      for (let i = 0; i < nC; i++) {
        const value = fracValue[i];
        const q = fracQ[i];
        if (value === 0 && q < 0 && restCoef[i] === 0) continue;
        for (let e = 0; e <= nE; e++) {
          // The mass (e = nE) takes every component, weighted by its molar mass.
          const a = e < nE ? env.atoms[e][i] : model.components[i].MW;
          if (e < nE && !a) continue;
          if (feed) nin[e]++;
          const o = e * maxQ;
          if (q >= 0) {
            T[e] += a * qv[fq] * qv[q];
            D[o + fq] += a * qv[q];
            D[o + q] += a * qv[fq];
          } else {
            const c = a * value;
            if (!Number.isFinite(c)) valid = false;
            T[e] += c * qv[fq];
            D[o + fq] += c;
          }
          if (anyRest && restCoef[i] !== 0) for (let r = 0; r < nRead; r++) D[o + readQ[r]] -= a * restCoef[i] * qv[fq];
          if (massDependent) for (let r = 0; r < nRead; r++) D[o + readQ[r]] += a * value * dFdq[r];
        }
      }
    }
    const out: PlantReport['closure'] = { elements: {}, mass: null };
    if (missing.length) {
      out.note = `no raw closure: no flow reading on ${missing.map((m) => `\`${m}\``).join(', ')} (the plant's envelope needs a reading on every feed and product)`;
      return out;
    }
    for (let q = 0; q < nq; q++) if (!Number.isFinite(qv[q]) || !(Number.isFinite(qs[q]) && qs[q] >= 0)) valid = false;
    // ... and a positive inflow.
    const entry = (e: number): ClosureEntry | null => {
      const I = tin[e];
      const O = tout[e];
      if (!valid || !(I > 0)) return null;
      const o = e * maxQ;
      let varRel = 0;
      for (let q = 0; q < nq; q++) {
        const u2 = qs[q] ** 2;
        const sens = (O * din[o + q] - I * dout[o + q]) / (I * I);
        varRel += sens * sens * u2;
      }
      return { in: I, out: O, relative: (I - O) / I, uncertainty: 2 * Math.sqrt(varRel) };
    };
    for (let e = 0; e < nE; e++) {
      if (nin[e] === 0) continue;
      const c = entry(e);
      if (c) out.elements[elements[e]] = c;
    }
    out.mass = entry(nE);
    if (assumed.length) out.note = `compositions from the design solve (no analyzer reads them) for: ${assumed.join('; ')}`;
    void res;
    return out;
  }

  /** Work space of closure, sized by the envelope (made on first use). */
  private closureWork?: {
    maxQ: number;
    qv: Float64Array;
    qs: Float64Array;
    din: Float64Array;
    dout: Float64Array;
    tin: Float64Array;
    tout: Float64Array;
    nin: Int32Array;
    fracValue: Float64Array;
    fracQ: Int32Array;
    /** Per component: c_i of an unread component's share of the rest (`normalized: false`), else 0. */
    restCoef: Float64Array;
    /** The quantity indices of a stream's analyzer readings, and dF/dw of a mass reading in each. */
    readQ: Int32Array;
    dFdq: Float64Array;
  };

  private closureWorkFor(env: NonNullable<PlantReconciliation['envelope']>): NonNullable<PlantReconciliation['closureWork']> {
    if (!this.closureWork) {
      const nC = this.model.ids.length;
      const maxQ = Math.max(1, env.streams.length * (nC + 1));
      const nE1 = env.elements.length + 1;
      this.closureWork = {
        maxQ,
        qv: new Float64Array(maxQ),
        qs: new Float64Array(maxQ),
        din: new Float64Array(nE1 * maxQ),
        dout: new Float64Array(nE1 * maxQ),
        tin: new Float64Array(nE1),
        tout: new Float64Array(nE1),
        nin: new Int32Array(nE1),
        fracValue: new Float64Array(nC),
        fracQ: new Int32Array(nC),
        restCoef: new Float64Array(nC),
        readQ: new Int32Array(nC),
        dFdq: new Float64Array(nC),
      };
    }
    return this.closureWork;
  }

}

/**
 * A reading of exactly 0 whose uncertainty is a percentage of the reading has a standard
 * uncertainty of 0: weighed as exact, it would pin the balances and push every disagreement onto
 * the other readings (a trace analyzer reading 0 made the purge analyzer the suspect). It is left
 * out instead, with what to write.
 */
const ZERO_RELATIVE = 'a reading of 0 with an uncertainty in % of the reading would count as exact; state an absolute uncertainty';

/** Why a reading cannot be used (negative, outside its range, not a fraction), or undefined. */
export function readingProblem(d: InstrumentDecl, r: RowReading, ids: readonly string[]): string | undefined {
  if (d.kind === 'analyzer') {
    if (!r.fractions) return 'no fractions';
    for (const k of d.components!) {
      const v = r.fractions[k];
      if (Number.isFinite(v) && (v < 0 || v > 1)) return `the fraction of ${ids[k]} is ${v}, outside 0..1`;
    }
    if (!d.components!.some((k) => Number.isFinite(r.fractions![k]))) return 'no component read';
    return undefined;
  }
  const v = r.value!;
  if ((d.kind === 'pressure' || d.kind === 'temperature') && !(v > 0)) return `the reading is ${v} (SI), not above absolute zero`;
  if (v < 0) return `negative reading (${fmt(v)} ${SI_UNIT[d.kind]})`;
  if (v === 0 && d.uncertainty && 'relative' in d.uncertainty) return ZERO_RELATIVE;
  // A standard volume flow is compared at its range's reference (the same amount of gas).
  const vr = d.kind === 'standard' ? atReference(v, r.reference ?? d.reference, d.range?.reference) : v;
  if (d.range?.min !== undefined && vr < d.range.min) return `out of range: ${fmt(vr)} ${SI_UNIT[d.kind]} below ${fmt(d.range.min)}`;
  if (d.range?.max !== undefined && vr > d.range.max) return `out of range: ${fmt(vr)} ${SI_UNIT[d.kind]} above ${fmt(d.range.max)}`;
  return undefined;
}

function globalTestOf(r: ReconcileResult): GlobalTestReport {
  const g = r.globalTest;
  if (!g || r.status === 'invalid' || r.status === 'not-converged') return { statistic: null, dof: 0, critical: null, pValue: null, passed: null };
  if (g.status === 'not-redundant') return { statistic: null, dof: 0, critical: null, pValue: null, passed: null };
  return { statistic: g.statistic, dof: g.dof, critical: g.critical, pValue: g.pValue, passed: g.status === 'passed' };
}

function fmt(v: number): string {
  return Number(v.toPrecision(4)).toString();
}
