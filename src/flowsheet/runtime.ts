/**
 * The runnable flowsheet: blocks built from a model, streams allocated once, the calculation
 * order and tears from the model's plan. One `pass` evaluates the whole sequence.
 *
 * A runtime belongs to its caller (a solve, a sweep, a target): nothing is kept in module
 * state. `load(model)` switches it to another model: a model is a value, so what changed is
 * found by identity — a new thermo section, component list or plan rebuilds everything; a new
 * spec of one unit or feed (a study's parameter) rebuilds that block only.
 */
import { feed as FEED, type FeedResult } from '../blocks/feed.js';
import { BLOCKS } from '../blocks/registry.js';
import { newStream, type BlockRuntime, type PhaseChecks, type Stream } from '../blocks/types.js';
import { enthalpyByRule, equilibriumEnthalpy, hasEnergyData, OutletState } from '../blocks/energy.js';
import type { EvaluationFailure } from '../solve/types.js';
import { makeEos } from '../thermo/eos.js';
import { meterEosFor, type MeterEos } from '../thermo/meter-eos.js';
import type { Eos } from '../thermo/types.js';
import type { Plan } from './graph.js';
import type { FeedSpec, Model, UnitSpecBase } from './model.js';
import { findRecycles } from './recycles.js';

/** A condition met by one unit in a pass (it makes the state no true solution). */
export interface Condition {
  unit: string;
  failure: EvaluationFailure;
}

export interface SequenceEntry {
  block: BlockRuntime;
  ins: Stream[];
  outs: Stream[];
}

export interface Runtime {
  readonly model: Model;
  readonly eos: Eos;
  readonly n: number;
  readonly feeds: FeedResult[];
  /** Every stream by name. */
  readonly streams: Map<string, Stream>;
  /** Stream names in the order they are made (feeds, then units in file order). */
  readonly streamOrder: string[];
  /** Unit blocks in file order. */
  readonly blocks: BlockRuntime[];
  readonly byName: Map<string, BlockRuntime>;
  readonly plan: Plan;
  /** Blocks in calculation order, with their inlet and outlet streams resolved. */
  readonly sequence: SequenceEntry[];
  /** Streams that no unit takes. */
  readonly products: string[];
  /** Recycle streams: in a loop, entering a unit that also takes a stream from outside the loop. */
  readonly recycles: string[];
  /** Tear streams as their takers read them: the guesses of an iteration (set by setTears). */
  readonly tearStreams: Stream[];
  /** Tear streams as their makers compute them in a pass (read by readTears; the streams reported). */
  readonly tearOutputs: Stream[];
  /** Unknowns per tear stream: n flows, then T and P. */
  readonly perTear: number;
  /** Whether the energy balance is on: every component has cp and hf. */
  readonly energy: boolean;
  /**
   * Whether the energy balance can wait for the converged flows: it is on, and no unit's outlet
   * flows depend on it (BlockDef.needsEnergyEveryPass). Then the iteration's passes leave it out
   * (PhaseChecks.skipEnergy) until `energyEveryPass` is set.
   */
  readonly energyDecoupled: boolean;
  /**
   * Set by a solve: false lets the passes of the iteration leave the energy balance out (when it
   * is decoupled); the closure sets it once the converged flows have had their full pass, so
   * that any further iteration carries the energy balance too.
   */
  energyEveryPass: boolean;
  /**
   * Sets the molar enthalpy of tear guess t from its flows, T and P, by the rule its maker
   * last used (the taker's recomputation: h is no tear variable). No-op with the energy off.
   */
  tearEnthalpy(t: number): void;
  /** Clears warm starts kept between passes (so that a solve does not depend on the previous one). */
  resetWarmStarts(): void;
  /** How thoroughly the blocks check phases: the tear problem's passes set `thorough` false while they run. */
  readonly checks: PhaseChecks;
  /** Runs all blocks in order with the tear streams as they are; returns the conditions met (a reused array). */
  pass(): readonly Condition[];
  /** Switches to another model, rebuilding only what differs. */
  load(model: Model): void;
}

class FlowsheetRuntime implements Runtime {
  model!: Model;
  eos!: Eos;
  /** The meters' equation (thermo.meter-eos), made with the EOS: one per runtime. */
  private meter!: MeterEos;
  n = 0;
  feeds: FeedResult[] = [];
  streams = new Map<string, Stream>();
  streamOrder: string[] = [];
  blocks: BlockRuntime[] = [];
  byName = new Map<string, BlockRuntime>();
  plan!: Plan;
  sequence: SequenceEntry[] = [];
  products: string[] = [];
  recycles: string[] = [];
  tearStreams: Stream[] = [];
  tearOutputs: Stream[] = [];
  perTear = 2;
  energy = false;
  energyDecoupled = false;
  energyEveryPass = true;
  private tearStates: OutletState[] = [];
  readonly checks: PhaseChecks = { thorough: true, skipEnergy: false };
  private readonly conditions: Condition[] = [];
  private fixedEos: Eos | undefined;

  constructor(model: Model, eos?: Eos) {
    this.fixedEos = eos;
    this.rebuild(model);
  }

  pass(): readonly Condition[] {
    const c = this.conditions;
    c.length = 0;
    const seq = this.sequence;
    for (let k = 0; k < seq.length; k++) {
      const s = seq[k];
      const f = s.block.compute(s.ins, s.outs);
      if (f !== null) c.push({ unit: s.block.spec.name, failure: f });
    }
    return c;
  }

  tearEnthalpy(t: number): void {
    if (!this.energy) return;
    const g = this.tearStreams[t];
    if (this.checks.skipEnergy) {
      g.h = Number.NaN;
      return;
    }
    const rule = this.tearOutputs[t].hRule;
    g.hRule = rule;
    const h = enthalpyByRule(this.eos, g, rule, this.tearStates[t]);
    // no flow: the guess carries no enthalpy (0 keeps it finite)
    g.h = Number.isFinite(h) ? h : 0;
  }

  resetWarmStarts(): void {
    for (const s of this.tearStates) s.reset();
    for (const b of this.blocks) b.reset?.();
  }

  load(model: Model): void {
    const cur = this.model;
    if (model === cur) return;
    if (model.components !== cur.components || model.thermo !== cur.thermo || model.plan !== cur.plan
      || model.feeds.length !== cur.feeds.length || model.units.length !== cur.units.length) {
      this.rebuild(model);
      return;
    }
    this.model = model;
    const ctx = { model, eos: this.eos, meter: this.meter, energy: this.energy, checks: this.checks };
    model.feeds.forEach((f, k) => {
      if (f === cur.feeds[k]) return;
      this.feeds[k] = this.feedResult(f);
      this.setFeedStream(this.feeds[k]);
    });
    model.units.forEach((u, k) => {
      if (u === cur.units[k]) return;
      const old = this.blocks[k];
      const b = BLOCKS[u.type].build(u, ctx);
      this.blocks[k] = b;
      this.byName.set(u.name, b);
      for (const s of this.sequence) if (s.block === old) s.block = b;
    });
    this.energyDecoupled = decoupled(model, this.energy);
  }

  private feedResult(f: FeedSpec): FeedResult {
    return FEED.result(FEED.build(f, { model: this.model, eos: this.eos, meter: this.meter, energy: this.energy }));
  }

  private setFeedStream(f: FeedResult): void {
    const s = this.streams.get(f.name)!;
    s.flows.set(f.flows);
    s.T = f.T;
    s.P = f.P;
    s.vf = f.phase === 'vapor' ? 1 : f.phase === 'liquid' ? 0 : Number.NaN;
    s.h = Number.NaN;
    if (this.energy) {
      // The feed's enthalpy at its own T and P, in its equilibrium state (the taker's inlet).
      const e = equilibriumEnthalpy(this.eos, f.T, f.P, f.flows);
      s.h = Number.isFinite(e.h) ? e.h : 0;
      if (f.phase === 'two-phase') s.vf = e.vf;
    }
  }

  private rebuild(model: Model): void {
    this.model = model;
    const n = model.ids.length;
    this.n = n;
    this.energy = hasEnergyData(model.components);
    this.perTear = n + 2;
    this.eos = this.fixedEos ?? makeEos(model.thermo.eos, model.components, model.thermo.kij);
    this.meter = meterEosFor(model.thermo.meterEos, this.eos);
    this.streams = new Map();
    this.streamOrder = [];
    this.feeds = [];
    for (const f of model.feeds) {
      this.streams.set(f.name, newStream(n));
      this.streamOrder.push(f.name);
      const r = this.feedResult(f);
      this.feeds.push(r);
      this.setFeedStream(r);
    }
    this.blocks = [];
    this.byName = new Map();
    const ctx = { model, eos: this.eos, meter: this.meter, energy: this.energy, checks: this.checks };
    for (const u of model.units) {
      const b = BLOCKS[u.type].build(u, ctx);
      this.blocks.push(b);
      this.byName.set(u.name, b);
      for (const o of u.outlets) {
        this.streams.set(o, newStream(n));
        this.streamOrder.push(o);
      }
    }
    const taken = new Set(model.units.flatMap((u) => u.inlets));
    this.products = this.streamOrder.filter((s) => !taken.has(s));
    this.plan = model.plan;
    // A tear's taker reads a guess of its own, so that the maker, wherever it comes in the order,
    // never overwrites the guess before it is read (several tears in one loop).
    const guesses = new Map(this.plan.tears.map((t) => [t, newStream(n)] as const));
    const unitByName = new Map<string, UnitSpecBase>(model.units.map((u) => [u.name, u]));
    this.sequence = this.plan.order.map((name) => {
      const u = unitByName.get(name)!;
      return { block: this.byName.get(name)!, ins: u.inlets.map((s) => guesses.get(s) ?? this.streams.get(s)!), outs: u.outlets.map((s) => this.streams.get(s)!) };
    });
    this.recycles = findRecycles(model.units, this.plan);
    this.tearStreams = this.plan.tears.map((t) => guesses.get(t)!);
    this.tearOutputs = this.plan.tears.map((t) => this.streams.get(t)!);
    this.tearStates = this.plan.tears.map((t) => new OutletState(this.eos, t, this.checks));
    this.energyDecoupled = decoupled(model, this.energy);
  }
}

/** Whether the energy balance is on and no unit's outlet flows depend on it. */
function decoupled(model: Model, energy: boolean): boolean {
  return energy && !model.units.some((u) => BLOCKS[u.type].needsEnergyEveryPass?.(u) ?? false);
}

/** A runtime for a model (optionally with an equation of state made elsewhere). */
export function createRuntime(model: Model, eos?: Eos): Runtime {
  return new FlowsheetRuntime(model, eos);
}
