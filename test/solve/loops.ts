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
 * Methanol synthesis loop CO2 + 3 H2 -> CH3OH + H2O with inert I, after the problem statement
 * of Felder and Rousseau, 3rd ed., Example 4.7-2 (problem statement from memory): fresh feed
 * with H2 and CO2 in stoichiometric proportion and 0.500 mol% inert; all methanol and water
 * condensed out; a purge taken from the recycle gas; reactor feed (not fresh feed) 2.00 mol%
 * inert; single-pass conversion of hydrogen 60.0%; methanol production 155 kmol/h.
 * Tear: recycle (CO2, H2, I) in mol/s. Components are coupled through the stoichiometry.
 */
export const methanolSpec = { xInertFresh: 0.005, yInertReactorFeed: 0.02, conversionH2: 0.6, methanolKmolPerH: 155 };

/**
 * Fresh feed F (mol/s) and purge fraction p that meet the specification, from the overall
 * inert balance and the overall reactant balance (derived here; Felder and Rousseau Sec. 4.7
 * method). With M the methanol rate, X the H2 conversion, yI the inert fraction of the reactor
 * feed R and xI the inert fraction of the fresh feed:
 *   methanol      M = X * (3/4)(1 - yI) R / 3          ->  R = 4 M / (X (1 - yI))
 *   inert         xI F = p yI R
 *   reactants     (1 - xI) F = 4 M + p (1 - X)(1 - yI) R
 *   ->  p = 4 M / (R [ (1 - xI) yI / xI - (1 - X)(1 - yI) ]),   F = p yI R / xI.
 */
export function methanolDesign(): { F: number; p: number; M: number; R: number } {
  const { xInertFresh: xI, yInertReactorFeed: yI, conversionH2: X, methanolKmolPerH } = methanolSpec;
  const M = (methanolKmolPerH * 1000) / 3600; // mol/s
  const R = (4 * M) / (X * (1 - yI));
  const p = (4 * M) / (R * (((1 - xI) * yI) / xI - (1 - X) * (1 - yI)));
  const F = (p * yI * R) / xI;
  return { F, p, M, R };
}

export interface MethanolPass {
  /** Methanol made in the last evaluated pass, mol/s. */
  methanol: number;
  /** Reactor feed of the last evaluated pass (CO2, H2, I), mol/s. */
  reactorFeed: Float64Array;
}

export function methanolLoop(F: number, p: number, X: number): { problem: FixedPointProblem; last: MethanolPass } {
  const xI = methanolSpec.xInertFresh;
  const fresh = [((1 - xI) * F) / 4, (3 * (1 - xI) * F) / 4, xI * F];
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
