/**
 * The adiabatic (or fixed-duty) converter at equilibrium: the outlet temperature and the
 * equilibrium extents found together, with the energy balance left to the caller.
 *
 * The caller (the reactor block) owns its energy balance and hands it over as a function
 *   energy(T, flows) = H_out(T, flows) - H_in - Q       (W),
 * the outlet enthalpy at temperature T of the outlet flows, less the inlet enthalpy and the duty.
 * At each trial T the equilibrium is solved (equilibrium.ts, warm-started from the extents of the
 * trial before), so that g(T) = energy(T, flows_eq(T)) is a function of T alone, and its root is
 * the outlet. g rises with T: the sensible heat rises, and so does the enthalpy of the
 * equilibrium mixture on the formation basis, since an exothermic reaction goes less far when
 * hotter and an endothermic one further (le Chatelier); so the root in a bracket is unique.
 *
 * Method: a secant step from the first guess and a second point 1 K away, the bracket widened
 * (steps up to 100 K, doubling) until g changes sign within [Tmin, Tmax], then secant steps kept
 * inside the bracket, with bisection whenever a secant step leaves it or shrinks it by less than
 * half (Dekker's safeguard). Converged when two successive temperatures differ by no more than
 * tolT (default 1e-6 K), also while the secant still approaches from one side; the equilibrium
 * returned is the one of the last temperature tried.
 * A trial temperature at which the equilibrium fails (e.g. the mixture is not a gas there) ends
 * the solve with that failure, located at that temperature.
 *
 * For a sweep or a flowsheet pass, pass the last outlet temperature as T0 and the last extents
 * in the state's `start`: the solve then takes two to four equilibrium solves.
 */
import type { EquilibriumResult, EquilibriumSolver, EquilibriumState, EquilibriumStatus } from './equilibrium.js';

/** The caller's energy balance: outlet enthalpy at T of the flows (mol/s) less inlet enthalpy and duty, W. */
export type EnergyResidual = (T: number, flows: Float64Array) => number;

export interface AdiabaticOptions {
  /** Range of outlet temperatures searched, K. */
  Tmin: number;
  Tmax: number;
  /** First guess, K (default: the middle of the range). */
  T0?: number;
  /** Converged when successive temperatures differ by no more than this, K (default 1e-6). */
  tolT?: number;
  /** Equilibrium solves allowed (default 60). */
  maxEvaluations?: number;
  /**
   * dg/dT near T0 (W/K), e.g. the result's `slope` from the last pass: the second trial is then
   * the Newton step from T0 (at least MIN_STEP away) instead of T0 + 1 K, and T0 itself is the
   * answer when that step is below a tenth of tolT.
   */
  slope0?: number;
}

export interface AdiabaticResult {
  status: EquilibriumStatus;
  message: string;
  /** Outlet temperature, K (the last one tried when not converged). */
  T: number;
  /** energy(T, flows) at that temperature, W. */
  residual: number;
  /** The equilibrium at T (extents, flows, K, ...). */
  equilibrium: EquilibriumResult;
  /** Equilibrium solves made. */
  evaluations: number;
  /** dg/dT from the first two trials (W/K; NaN when fewer than two were made): a slope0 for the next call. */
  slope: number;
  /** Temperatures tried and energy residuals: historyT[k], historyG[k] for k < evaluations. */
  historyT: Float64Array;
  historyG: Float64Array;
}

/** A result object for solveAdiabaticEquilibrium, to reuse across calls. */
export function newAdiabaticResult(solver: EquilibriumSolver, maxEvaluations = 60): AdiabaticResult {
  return {
    status: 'invalid', message: '', T: Number.NaN, residual: Number.NaN, equilibrium: solver.newResult(), evaluations: 0, slope: Number.NaN,
    historyT: new Float64Array(maxEvaluations), historyG: new Float64Array(maxEvaluations),
  };
}

/** Largest temperature step before a bracket is found, K. */
const MAX_STEP = 100;
/** Smallest second step from T0 when a slope is given, K: a secant over a shorter base would read rounding. */
const MIN_STEP = 0.01;

/**
 * Outlet temperature and equilibrium together: the root of energy(T, flows_eq(T)) in
 * [Tmin, Tmax]. `state` is the equilibrium state without T (P, inlet flows, fixed generation,
 * start extents).
 */
export function solveAdiabaticEquilibrium(
  solver: EquilibriumSolver,
  state: Omit<EquilibriumState, 'T'>,
  energy: EnergyResidual,
  options: AdiabaticOptions,
  out?: AdiabaticResult,
): AdiabaticResult {
  const maxEv = options.maxEvaluations ?? 60;
  const res = out ?? newAdiabaticResult(solver, maxEv);
  const tolT = options.tolT ?? 1e-6;
  const { Tmin, Tmax } = options;
  res.status = 'converged';
  res.message = '';
  res.evaluations = 0;
  res.slope = Number.NaN;
  res.T = Number.NaN;
  res.residual = Number.NaN;
  if (!(Tmin > 0) || !(Tmax > Tmin) || !Number.isFinite(Tmax) || res.historyT.length < maxEv) {
    res.status = 'invalid';
    res.message = `the outlet temperature range must satisfy 0 < Tmin < Tmax, got ${Tmin} K to ${Tmax} K`;
    return res;
  }
  const eq = res.equilibrium;
  const start = new Float64Array(solver.m);
  let haveStart = false;
  if (state.start !== undefined && state.start.length === solver.m) {
    start.set(state.start);
    haveStart = true;
  }
  const trial: EquilibriumState = { T: 0, P: state.P, flows: state.flows, generation: state.generation, start: undefined };

  /** g at T; NaN when the equilibrium there failed (res then says so). */
  const g = (T: number): number => {
    trial.T = T;
    trial.start = haveStart ? start : undefined;
    solver.solve(trial, eq);
    res.T = T;
    const k = res.evaluations++;
    res.historyT[k] = T;
    if (eq.status !== 'converged') {
      res.historyG[k] = Number.NaN;
      res.status = eq.status;
      res.message = `at the trial outlet temperature ${fmt(T)} K: ${eq.message}`;
      return Number.NaN;
    }
    start.set(eq.extents);
    haveStart = true;
    const v = energy(T, eq.flows);
    res.historyG[k] = v;
    res.residual = v;
    if (!Number.isFinite(v)) {
      res.status = 'invalid';
      res.message = `the energy balance gave ${v} at ${fmt(T)} K`;
    }
    return v;
  };
  const budget = (): boolean => {
    if (res.evaluations < maxEv) return true;
    res.status = 'not-converged';
    res.message = `the outlet temperature was not found in ${maxEv} equilibrium solves (last ${fmt(res.T)} K, energy residual ${res.residual.toPrecision(3)} W)`;
    return false;
  };

  let a = Math.min(Math.max(options.T0 ?? 0.5 * (Tmin + Tmax), Tmin), Tmax);
  let ga = g(a);
  if (!Number.isFinite(ga)) return res;
  if (ga === 0) return res;
  let b = a + (a + 1 <= Tmax ? 1 : -1);
  const s0 = options.slope0;
  if (s0 !== undefined && s0 > 0 && Number.isFinite(s0)) {
    const d = -ga / s0;
    // The last pass's slope says T0 is within a tenth of the tolerance: the answer (the solve of
    // T0 is the last one made, so res holds its equilibrium).
    if (Math.abs(d) <= 0.1 * tolT) return res;
    const step = Math.min(Math.max(Math.abs(d), MIN_STEP), MAX_STEP);
    const t = a + (d < 0 ? -step : step);
    if (t >= Tmin && t <= Tmax) b = t;
  }
  let gb = g(b);
  if (!Number.isFinite(gb)) return res;
  res.slope = (gb - ga) / (b - a);
  // Bracket: lo has g < 0, hi has g > 0.
  let lo = Number.NaN;
  let hi = Number.NaN;
  const note = (T: number, v: number) => {
    if (v < 0 && !(lo >= T)) lo = T;
    if (v > 0 && !(hi <= T)) hi = T;
  };
  note(a, ga);
  note(b, gb);
  let step = MAX_STEP;
  while (Number.isNaN(lo) || Number.isNaN(hi)) {
    if (!budget()) return res;
    // Secant towards the root, limited; doubling limit while no sign change.
    const slope = (gb - ga) / (b - a);
    let next = slope > 0 ? b - gb / slope : b + (gb > 0 ? -step : step);
    const up = Number.isNaN(hi); // every point so far has g < 0: go up
    if (slope > 0 && Math.abs(next - b) <= tolT && next >= Tmin && next <= Tmax) {
      // Converged from one side before the sign changed.
      g(next);
      return res;
    }
    if (up ? !(next > b) : !(next < b)) next = b + (up ? step : -step);
    next = Math.min(Math.max(next, b - step, Tmin), b + step, Tmax);
    if (next === b) {
      res.status = 'infeasible';
      res.message = `no outlet temperature between ${fmt(Tmin)} K and ${fmt(Tmax)} K closes the energy balance: at ${fmt(b)} K the outlet enthalpy is ${up ? 'still below' : 'still above'} what it must be (residual ${gb.toPrecision(4)} W)`;
      return res;
    }
    a = b;
    ga = gb;
    b = next;
    gb = g(b);
    if (!Number.isFinite(gb)) return res;
    if (gb === 0) return res;
    note(b, gb);
    step *= 2;
  }
  // Secant steps inside [lo, hi]; bisection when a step would leave it, or after two steps that
  // each left more than half of the bracket.
  let width = Math.abs(hi - lo);
  let slow = 0;
  for (;;) {
    if (!budget()) return res;
    const slope = (gb - ga) / (b - a);
    let next = b - gb / slope;
    if (!(next > Math.min(lo, hi) && next < Math.max(lo, hi)) || slow >= 2) {
      next = 0.5 * (lo + hi);
      slow = 0;
    }
    a = b;
    ga = gb;
    b = next;
    gb = g(b);
    if (!Number.isFinite(gb)) return res;
    if (gb === 0 || Math.abs(b - a) <= tolT) return res;
    if (gb < 0) lo = b;
    else hi = b;
    const w = Math.abs(hi - lo);
    if (w <= tolT) return res;
    slow = w > 0.5 * width ? slow + 1 : 0;
    width = w;
  }
}

function fmt(v: number): string {
  return Number(v.toPrecision(6)).toString();
}
