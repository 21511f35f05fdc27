/**
 * What a solve reports: the solver's result with the flowsheet's state as the final pass left
 * it (streams, units, loop figures, balance). Assembled once, when the solve is over; nothing
 * edits a result afterwards.
 */
import { phaseAt, type FeedResult } from '../blocks/feed.js';
import { describeMissing, missingEnergyKeys, outsideRangeIds } from '../blocks/energy.js';
import type { Stream, UnitSummary } from '../blocks/types.js';
import type { EvaluationFailure, HistoryEntry, SolveResult, Status } from '../solve/types.js';
import type { Balance } from './balance.js';
import { loopFigures, type LoopFigures } from './loop.js';
import type { Model } from './model.js';
import type { Runtime } from './runtime.js';

export interface StreamResult {
  flows: Float64Array;
  total: number;
  fractions: Float64Array;
  T: number;
  P: number;
  vaporFraction: number;
  /** kg/s */
  massFlow: number;
  /** kg/mol of the mixture (NaN for an empty stream). */
  molarMass: number;
  /** kg/m3 at the stream's T and P from the file's equation of state, for a single phase; NaN where two-phase or not computed. */
  density: number;
  /** Molar enthalpy, J/mol (formation basis); NaN when the energy balance is off. */
  h: number;
  /** Enthalpy flow, W (total times h); NaN when the energy balance is off. */
  enthalpy: number;
}

export interface TargetReport {
  text: string;
  /** Output reached, SI. */
  output: number;
  target: number;
  /** The output's tolerance, SI. */
  tolerance: number;
  /** Adjusted input, SI. */
  input: number;
  inputPath: string;
  met: boolean;
  /** Which bound stopped it, when it is infeasible. */
  bound?: 'lower' | 'upper';
  /** How a person reads them: the output in the unit of the target's value (else the file's display unit), the input in the unit of its bounds. */
  shown?: { output: string; input: string };
}

export interface FlowsheetResult {
  status: Status;
  method: string;
  passes: number;
  iterations: number;
  jacobians: number;
  residual: number;
  scaledResidual: number;
  history: HistoryEntry[];
  message?: string;
  failure?: EvaluationFailure;
  /** Largest residuals at the end (not-converged). */
  worst?: SolveResult['worst'];
  tears: string[];
  order: string[];
  loops: string[][];
  feeds: FeedResult[];
  streams: Map<string, StreamResult>;
  streamOrder: string[];
  products: string[];
  units: Map<string, UnitSummary & { type: string }>;
  balance: Balance;
  loop: LoopFigures;
  /** The tear vector at the end (the solution when converged; starts a neighbour). */
  x: Float64Array;
  /** Newton's last tear Jacobian, when Newton ran (to start a neighbour). */
  jacobian?: Float64Array;
  warnings: string[];
  model: Model;
  /** Targets held, when the solve had any. */
  targets?: TargetReport[];
}

/** The state of a runtime's streams and units as the last pass left them, under a verdict. */
export function assembleResult(
  rt: Runtime,
  verdict: Pick<SolveResult, 'status' | 'method' | 'passes' | 'iterations' | 'jacobians' | 'residual' | 'scaledResidual' | 'history' | 'message' | 'failure' | 'worst' | 'jacobian'>,
  x: Float64Array,
  balance: Balance,
  warnings: string[],
  targets?: TargetReport[],
  opts: { densities?: boolean } = {},
): FlowsheetResult {
  const streams = new Map<string, StreamResult>();
  for (const name of rt.streamOrder) streams.set(name, streamResult(rt, rt.streams.get(name)!, opts.densities ?? true));
  const units = new Map<string, UnitSummary & { type: string }>();
  const done = new Set<string>();
  for (const { block, ins, outs } of rt.sequence) {
    units.set(block.spec.name, { type: block.spec.type, ...block.summary(ins, outs) });
    done.add(block.spec.name);
  }
  for (const b of rt.blocks) if (!done.has(b.spec.name)) units.set(b.spec.name, { type: b.spec.type, figures: [], notes: [] });
  let feedTotal = 0;
  for (const f of rt.feeds) feedTotal += f.molarFlow;
  warnings = [...warnings, ...energyWarnings(rt)];
  return {
    status: verdict.status, method: verdict.method, passes: verdict.passes, iterations: verdict.iterations, jacobians: verdict.jacobians,
    residual: verdict.residual, scaledResidual: verdict.scaledResidual, history: verdict.history,
    ...(verdict.message ? { message: verdict.message } : {}),
    ...(verdict.failure ? { failure: verdict.failure } : {}),
    ...(verdict.worst ? { worst: verdict.worst } : {}),
    tears: rt.plan.tears, order: rt.plan.order, loops: rt.plan.loops,
    feeds: rt.feeds.map(ownFeed), streams, streamOrder: rt.streamOrder, products: rt.products, units, balance,
    loop: loopFigures(rt, streams, units, balance, feedTotal),
    x: Float64Array.from(x),
    ...(verdict.jacobian ? { jacobian: verdict.jacobian } : {}),
    warnings, model: rt.model,
    ...(targets ? { targets } : {}),
  };
}

function streamResult(rt: Runtime, s: Stream, withDensity: boolean): StreamResult {
  let total = 0;
  let mass = 0;
  for (let i = 0; i < rt.n; i++) {
    total += s.flows[i];
    mass += s.flows[i] * rt.model.components[i].MW;
  }
  // An empty stream has no composition (not a composition of zeros).
  const fractions = new Float64Array(rt.n).fill(total > 0 ? 0 : Number.NaN);
  if (total > 0) for (let i = 0; i < rt.n; i++) fractions[i] = s.flows[i] / total;
  const molarMass = total > 0 ? mass / total : Number.NaN;
  const h = rt.energy ? s.h : Number.NaN;
  return {
    flows: Float64Array.from(s.flows), total, fractions, T: s.T, P: s.P, vaporFraction: s.vf, massFlow: mass, molarMass,
    density: withDensity ? densityOf(rt, s, fractions, molarMass) : Number.NaN,
    h, enthalpy: total > 0 ? total * h : rt.energy ? 0 : Number.NaN,
  };
}

/** Density of a single-phase stream (kg/m3); NaN when it is two-phase or its state is not known. */
function densityOf(rt: Runtime, s: Stream, x: Float64Array, molarMass: number): number {
  if (!(s.T > 0) || !(s.P > 0) || !(molarMass > 0)) return Number.NaN;
  let phase: string;
  if (s.vf === 1) phase = 'vapor';
  else if (s.vf === 0) phase = 'liquid';
  else if (Number.isNaN(s.vf)) phase = phaseAt(rt.eos, s.T, s.P, x);
  else phase = 'two-phase';
  if (phase === 'two-phase') return Number.NaN;
  return molarMass / rt.eos.molarVolume(s.T, s.P, x, phase === 'liquid' ? 'liquid' : phase === 'vapor' ? 'vapor' : 'stable');
}

/**
 * What the energy side has to say about the state: the energy balance off (once, naming the
 * components and the keys to add), streams at temperatures outside a present component's
 * heat-capacity range, and pressures that rise through a unit that cannot raise them.
 */
function energyWarnings(rt: Runtime): string[] {
  const out: string[] = [];
  for (const { block, ins, outs } of rt.sequence) {
    if (block.raisesPressure) continue;
    let pMax = -Infinity;
    for (const s of ins) if (s.P > pMax) pMax = s.P;
    for (let k = 0; k < outs.length; k++) {
      if (outs[k].P > pMax * (1 + 1e-9)) {
        out.push(`the pressure rises through \`${block.spec.name}\` (${block.spec.type}) from ${Number((pMax / 1e5).toPrecision(6))} bar to ${Number((outs[k].P / 1e5).toPrecision(6))} bar at \`${block.spec.outlets[k]}\`, and only a compressor raises pressure: check the pressures, or add a compressor`);
        break;
      }
    }
  }
  if (!rt.energy) {
    const miss = missingEnergyKeys(rt.model.components);
    out.push(`no energy balance: ${describeMissing(miss)} ${miss.length > 1 ? 'have' : 'has'} no thermal data; add the keys to ${miss.length > 1 ? 'those components' : 'that component'} under \`components:\` to get enthalpies, duties and the energy balance`);
    return out;
  }
  // one line per component: the streams whose temperature its heat-capacity correlation does not cover
  const z = new Float64Array(rt.n);
  const byComponent = new Map<string, { streams: string[]; lo: number; hi: number }>();
  for (const name of rt.streamOrder) {
    const s = rt.streams.get(name)!;
    let F = 0;
    for (let i = 0; i < rt.n; i++) F += s.flows[i];
    if (!(F > 0) || !Number.isFinite(s.T)) continue;
    for (let i = 0; i < rt.n; i++) z[i] = s.flows[i] / F;
    for (const id of outsideRangeIds(rt.model.components, s.T, z)) {
      const e = byComponent.get(id) ?? { streams: [], lo: Infinity, hi: -Infinity };
      e.streams.push(name);
      e.lo = Math.min(e.lo, s.T);
      e.hi = Math.max(e.hi, s.T);
      byComponent.set(id, e);
    }
  }
  for (const [id, e] of byComponent) {
    const c = rt.model.components[rt.model.index.get(id)!];
    const p = c.cp!.pieces;
    const range = `${p[0].Tmin} K to ${p[p.length - 1].Tmax} K`;
    const at = e.lo === e.hi ? `${Number(e.lo.toPrecision(5))} K` : `${Number(e.lo.toPrecision(5))} K to ${Number(e.hi.toPrecision(5))} K`;
    out.push(`the heat-capacity correlation of ${id} covers ${range}; ${e.streams.length > 1 ? 'streams' : 'stream'} ${e.streams.map((x) => `\`${x}\``).join(', ')} at ${at} use${e.streams.length > 1 ? '' : 's'} it extrapolated`);
  }
  return out;
}

/**
 * A feed's result of its own: the runtime keeps one per feed across solves, and its composition
 * is the model's array (a typed array, which freezing does not reach). A caller writing into one
 * result must change neither another result nor the model.
 */
function ownFeed(f: FeedResult): FeedResult {
  return {
    ...f, flows: Float64Array.from(f.flows), composition: Float64Array.from(f.composition), warnings: f.warnings.slice(),
    ...(f.sensitivity ? { sensitivity: { ...f.sensitivity } } : {}),
  };
}
