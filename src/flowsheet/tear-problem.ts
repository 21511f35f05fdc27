/**
 * The tear streams of a runtime as the unknowns of a fixed-point problem x = g(x): each tear's
 * component flows, then T and P, then (when the energy balance is on) its molar enthalpy h;
 * one pass of the calculation order per evaluation. h is a tear variable of its own, so that the
 * taker of a tear reads exactly the enthalpy its maker computed (no flash of the guess, and a
 * split-model condenser's outlets keep the phases the block gave them): at convergence the
 * energy balance closes to the tear tolerance, as the material balance does.
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
    if (rt.energy) s.h = x[t * m + n + 2];
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
    if (rt.energy) out[t * m + n + 2] = s.h;
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
    if (rt.energy) {
      const h = rt.feeds.length ? rt.streams.get(rt.feeds[0].name)!.h : 0;
      x[t * m + n + 2] = Number.isFinite(h) ? h : 0;
    }
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
    if (rt.energy) {
      // h may have either sign (formation basis): no bound; a floor of 1e-7 J/mol (about
      // 3e-9 K of a gas's heat capacity), below what the energy closure needs.
      lower[t * m + n + 2] = -Infinity;
      atol[t * m + n + 2] = 1e-7;
      names.push(`${rt.plan.tears[t]}.h`);
    }
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
      setTears(rt, x);
      rt.pass();
      readTears(rt, out);
    },
  };
}
