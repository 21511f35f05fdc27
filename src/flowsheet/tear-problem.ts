/**
 * The tear streams of a runtime as the unknowns of a fixed-point problem x = g(x): each tear's
 * component flows, then T and P; one pass of the calculation order per evaluation. With the
 * energy balance on, a guess's molar enthalpy is no unknown of its own: the taker gets it back
 * from the guess's flows, T and P by the rule the maker used (Runtime.tearEnthalpy), so that at
 * convergence it equals what the maker computed, to the tolerance of one flash.
 */
import type { FixedPointProblem } from '../solve/types.js';
import { tearStructure } from './jacobian-structure.js';
import type { Runtime } from './runtime.js';

export function setTears(rt: Runtime, x: Float64Array): void {
  const { n, perTear: m } = rt;
  const ts = rt.tearStreams;
  for (let t = 0; t < ts.length; t++) {
    const s = ts[t];
    for (let i = 0; i < n; i++) s.flows[i] = x[t * m + i];
    s.T = x[t * m + n];
    s.P = x[t * m + n + 1];
    // the guess's T is a stand-in where its maker's was in the last pass
    s.standIn = rt.tearOutputs[t].standIn;
    rt.tearEnthalpy(t);
  }
}

export function readTears(rt: Runtime, out: Float64Array): void {
  const { n, perTear: m } = rt;
  const ts = rt.tearOutputs;
  for (let t = 0; t < ts.length; t++) {
    const s = ts[t];
    for (let i = 0; i < n; i++) out[t * m + i] = s.flows[i];
    out[t * m + n] = s.T;
    out[t * m + n + 1] = s.P;
  }
}

/** Total fresh feed, mol/s. */
export function freshFeed(rt: Runtime): number {
  let t = 0;
  for (const f of rt.feeds) t += f.molarFlow;
  return t;
}

/** The cold start: tears at zero flow, at the conditions of the first feed. */
export function coldStart(rt: Runtime): Float64Array {
  const { n, perTear: m } = rt;
  const x = new Float64Array(rt.tearStreams.length * m);
  for (let t = 0; t < rt.tearStreams.length; t++) {
    x[t * m + n] = rt.feeds[0]?.T ?? 298.15;
    x[t * m + n + 1] = rt.feeds[0]?.P ?? 101325;
  }
  return x;
}

/** The tear variables of a runtime as a fixed-point problem: bounds, absolute floors and names. */
export function tearProblem(rt: Runtime, x0: Float64Array, feedTotal: number): FixedPointProblem {
  const { n, model } = rt;
  const m = rt.perTear;
  const T = rt.tearStreams.length;
  const N = T * m;
  const lower = new Float64Array(N);
  const atol = new Float64Array(N);
  const names: string[] = [];
  for (let t = 0; t < T; t++) {
    for (let i = 0; i < n; i++) {
      // Flows: a floor far below any flow that matters (1e-15 of the fresh feed).
      atol[t * m + i] = Math.max(1e-300, feedTotal * 1e-15);
      names.push(`${rt.plan.tears[t]}.${model.ids[i]}`);
    }
    lower[t * m + n] = 1e-6;
    lower[t * m + n + 1] = 1e-6;
    atol[t * m + n] = 1e-9;
    atol[t * m + n + 1] = 1e-6;
    names.push(`${rt.plan.tears[t]}.T`, `${rt.plan.tears[t]}.P`);
  }
  return {
    n: N,
    x0,
    lower,
    atol,
    names,
    // Which tears each tear's perturbation can reach: Newton skips or groups columns.
    structure: tearStructure(rt),
    g(x, out) {
      // the passes of the iteration may skip stability tests near verified single phases
      // (blocks/energy.ts), and leave out an energy balance the flows do not depend on
      // (runtime.ts, energyDecoupled); every other pass, the final one above all, checks in
      // full and computes every enthalpy
      rt.checks.thorough = false;
      const skip = rt.energyDecoupled && !rt.energyEveryPass;
      rt.checks.skipEnergy = skip;
      try {
        setTears(rt, x);
        rt.pass();
      } finally {
        rt.checks.thorough = true;
        rt.checks.skipEnergy = false;
      }
      readTears(rt, out);
      if (skip) {
        // No unit's flows depend on a temperature here. A tear whose T only the energy balance
        // decides (Stream.standIn) holds it at its guess (a neighbour's answer in a sweep) until
        // the final pass computes it; every other tear's T iterates with the flows.
        const m = rt.perTear;
        const made = rt.tearOutputs;
        for (let t = 0; t < made.length; t++) if (made[t].standIn) out[t * m + rt.n] = x[t * m + rt.n];
      }
    },
  };
}
