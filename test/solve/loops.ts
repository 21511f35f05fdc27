/**
 * Recycle loops with purge written as one pass x -> g(x) on the tear stream (the recycle), for
 * the solver tests. The balances follow the method of Felder and Rousseau, Elementary
 * Principles of Chemical Processes, 3rd ed., Section 4.7 (recycle and purge): balances on the
 * mixing point, the reactor (single-pass fractional conversion), the separator (all product
 * removed) and the purge splitter. The closed forms are derived here from those balances.
 */
import type { EvaluationFailure, FixedPointProblem } from '../../src/solve/types.js';

/**
 * Reactant A and inert I, fresh feed (FA, FI) mol/s, single-pass conversion X of A, all
 * product removed, fraction p of the recycle gas purged. Tear: recycle flows (rA, rI).
 *   reactor inlet  A_in = FA + rA,  I_in = FI + rI
 *   reactor outlet A = (1 - X) A_in, I = I_in; product removed
 *   recycle        rA' = (1 - p)(1 - X)(FA + rA),  rI' = (1 - p)(FI + rI)
 */
export function purgeLoop(FA: number, FI: number, X: number, p: number): FixedPointProblem {
  const a = (1 - p) * (1 - X);
  const b = 1 - p;
  return {
    n: 2,
    x0: new Float64Array(2),
    lower: new Float64Array(2),
    names: ['recycle.A', 'recycle.I'],
    g(x, out) {
      out[0] = a * (FA + x[0]);
      out[1] = b * (FI + x[1]);
    },
  };
}

/**
 * Closed form at steady state (x = g(x) of purgeLoop, solved for x):
 *   rA = (1 - p)(1 - X) FA / (1 - (1 - p)(1 - X)),   rI = (1 - p) FI / p.
 * Both are linear in the fresh feed.
 */
export function purgeLoopSolution(FA: number, FI: number, X: number, p: number): [number, number] {
  const a = (1 - p) * (1 - X);
  return [(a * FA) / (1 - a), ((1 - p) * FI) / p];
}

/**
 * Methanol synthesis loop CO2 + 3 H2 -> CH3OH + H2O with inert I: the problem statement of
 * Felder and Rousseau, Elementary Principles of Chemical Processes, 3rd ed., Example 4.7-2
 * (statement from memory): fresh feed of H2, CO2 and 0.400 mol% inert; the condenser takes out
 * all methanol and water and none of the reactants or inert; a purge is taken from the recycle;
 * the reactor feed (not the fresh feed) is 28.0 mol% CO2, 70.0 mol% H2 and 2.00 mol% inert; the
 * single-pass conversion of hydrogen is 60.0 %; methanol production 155 kmol/h. The book's
 * answers are not quoted here: the fresh feed, its composition and the purge share that meet the
 * statement are derived below from the balances, and the solvers must reproduce the statement.
 * Tear: recycle (CO2, H2, I) in mol/s.
 */
export const methanolSpec = { xInertFresh: 0.004, reactorFeed: [0.28, 0.7, 0.02] as const, conversionH2: 0.6, methanolKmolPerH: 155 };

/**
 * The fresh feed F (mol/s), its mole fractions (CO2, H2, I) and the purge fraction p of the
 * condenser gas that meet the statement (derived here by the method of Felder and Rousseau
 * Sec. 4.7). With R the reactor feed and zCO2, zH2, zI its fractions, X the H2 conversion:
 *   extent        e = X zH2 R / 3 = M (the methanol rate)        ->  R = 3 M / (X zH2)
 *   condenser gas G = (zCO2 R - e) + (zH2 R - 3 e) + zI R
 *   inert         xI F = p zI R
 *   total moles   F = 4 e + p G   (each extent turns 4 mol of reactants into 2 of methanol and water, both condensed)
 *   ->  p = 4 e / (zI R / xI - G),  F = p zI R / xI;  fresh CO2 = e + p (zCO2 R - e),  H2 = 3 e + p (zH2 R - 3 e).
 */
export function methanolDesign(): { F: number; p: number; M: number; R: number; fresh: [number, number, number] } {
  const { xInertFresh: xI, reactorFeed: [zC, zH, zI], conversionH2: X, methanolKmolPerH } = methanolSpec;
  const M = (methanolKmolPerH * 1000) / 3600; // mol/s
  const R = (3 * M) / (X * zH);
  const e = M;
  const G = zC * R - e + (zH * R - 3 * e) + zI * R;
  const p = (4 * e) / ((zI * R) / xI - G);
  const F = (p * zI * R) / xI;
  const fresh: [number, number, number] = [e + p * (zC * R - e), 3 * e + p * (zH * R - 3 * e), xI * F];
  return { F, p, M, R, fresh };
}

export interface MethanolPass {
  /** Methanol made in the last evaluated pass, mol/s. */
  methanol: number;
  /** Reactor feed of the last evaluated pass (CO2, H2, I), mol/s. */
  reactorFeed: Float64Array;
}

export function methanolLoop(fresh: readonly [number, number, number], p: number, X: number): { problem: FixedPointProblem; last: MethanolPass } {
  const last: MethanolPass = { methanol: 0, reactorFeed: new Float64Array(3) };
  const problem: FixedPointProblem = {
    n: 3,
    x0: new Float64Array(3),
    lower: new Float64Array(3),
    names: ['recycle.CO2', 'recycle.H2', 'recycle.I'],
    g(x, out): EvaluationFailure | void {
      const co2 = fresh[0] + x[0];
      const h2 = fresh[1] + x[1];
      const inert = fresh[2] + x[2];
      const extent = (X * h2) / 3;
      if (extent > co2) {
        return { kind: 'infeasible', message: 'conversion would consume more CO2 than the reactor feed holds', unit: 'reactor', component: 'CO2' };
      }
      last.methanol = extent;
      last.reactorFeed[0] = co2;
      last.reactorFeed[1] = h2;
      last.reactorFeed[2] = inert;
      out[0] = (1 - p) * (co2 - extent);
      out[1] = (1 - p) * (h2 - 3 * extent);
      out[2] = (1 - p) * inert;
    },
  };
  return { problem, last };
}
