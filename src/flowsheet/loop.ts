/**
 * Loop figures of a solved flowsheet: the recycle ratio (total recycle over total fresh feed,
 * molar) and, for every key component a unit reports a conversion of, the single-pass
 * conversion in that unit (from its inlet and outlet flows) and the overall conversion from
 * fresh feed to products. Either is NaN (undefined) where the key has no flow in: a key that
 * reaches the unit from no inlet, or that no fresh feed carries.
 */
import type { UnitSummary } from '../blocks/types.js';
import type { Balance } from './balance.js';
import type { StreamResult } from './result.js';
import type { Runtime } from './runtime.js';
import { ratioRecycles } from './recycles.js';

export interface LoopFigures {
  /** Recycle streams (closing a loop into a unit that also takes fresh material). */
  recycles: string[];
  /** Total recycle / total fresh feed (molar). */
  recycleRatio: number;
  freshFeed: number;
  /**
   * Per key component: single-pass conversion (in the first unit, in calculation order, that
   * reports it) and overall; where several units report one (beds in series, reactors in
   * parallel), `byUnit` holds each unit's own, in calculation order.
   */
  conversions: Record<string, { unit: string; singlePass: number; overall: number; byUnit?: Record<string, number> }>;
}

export function loopFigures(rt: Runtime, streams: ReadonlyMap<string, StreamResult>, units: ReadonlyMap<string, UnitSummary>, balance: Balance, feedTotal: number): LoopFigures {
  // The same circulating gas is counted once, where fresh material joins the loop at several points.
  const recycles = ratioRecycles(rt.model.units, rt.plan, rt.recycles);
  let recycleTotal = 0;
  for (const s of recycles) recycleTotal += streams.get(s)?.total ?? 0;
  const conversions: LoopFigures['conversions'] = {};
  for (const name of rt.plan.order) {
    for (const [id, singlePass] of Object.entries(units.get(name)?.conversions ?? {})) {
      const seen = conversions[id];
      if (seen) {
        seen.byUnit ??= { [seen.unit]: seen.singlePass };
        seen.byUnit[name] = singlePass;
        continue;
      }
      const cb = balance.components[id];
      // A key no fresh feed carries (an intermediate formed upstream) has no overall conversion
      // from fresh feed: NaN (JSON null, '-' in reports), never 0.
      conversions[id] = { unit: name, singlePass, overall: cb.in > 0 ? (cb.in - cb.out) / cb.in : Number.NaN };
    }
  }
  return { recycles, recycleRatio: feedTotal > 0 ? recycleTotal / feedTotal : 0, freshFeed: feedTotal, conversions };
}
