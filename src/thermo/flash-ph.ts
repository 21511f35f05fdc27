/**
 * Pressure-enthalpy and pressure-entropy flashes: the temperature and phase split of a stream
 * of composition z at pressure P whose molar enthalpy (entropy) is given. Valves and adiabatic
 * mixers need PH, compressors and expanders PS.
 *
 * Method (Michelsen, M. L., "Multiphase isenthalpic and isentropic flash algorithms", Fluid
 * Phase Equilibria 33 (1987) 13-27; Michelsen and Mollerup, Thermodynamic Models: Fundamentals
 * and Computational Aspects, 2nd ed., the chapter on other flash specifications): an outer
 * iteration on T with the enthalpy (entropy) residual, the isothermal flash (flash.ts) deciding
 * the phases. The equilibrium enthalpy H(T) at fixed P is continuous and increasing for a
 * mixture (its derivative is the heat capacity of the equilibrium system, latent heat
 * included), so every equilibrium evaluation narrows a bracket, and the steps are:
 *  - single phase (and, before any flash, the feed on its stable root at the starting T):
 *    Newton on the single-phase H(T) with the analytic heat capacity (ideal-gas Cp plus Cp^R,
 *    departure.ts), no flash, then one isothermal flash, with its stability test, at the
 *    temperature found. If that confirms a single phase, the state is found (one flash in all);
 *    this is Michelsen's advice to solve for the assumed phases first and test stability at the
 *    solution. If the phase's root vanishes on the way (past its spinodal), the last
 *    temperature where it existed is tried instead: the spinodal lies inside the two-phase
 *    region. A phase whose single-phase answer the equilibrium has refused is not asked again.
 *  - two phases: temperature and K-values are iterated together, with no isothermal flash per
 *    step (see `simultaneous`): Rachford-Rice for the current K and the fugacity coefficients of
 *    both phases; substitution on ln K alone at that T until the fugacity residual is below
 *    1e-4 of the enthalpy residual (a T step from an enthalpy whose split is still moving only
 *    chases the split: the steps alternate about the answer and converge linearly); then H of
 *    both phases, a step on T, and ln K carried to the new T. The first step is Newton's with
 *    the slope below and d ln K/dT at fixed phase compositions; the later ones take the secants
 *    of the last two evaluations, for H and for ln K (they hold the change of the compositions).
 *    The slope dH/dT of the equilibrium is estimated from the split: the frozen heat capacity
 *    beta Cp^V + (1 - beta) Cp^L plus sum_i (h_i^V - h_i^L) dv_i/dT, with
 *    h_i^V - h_i^L = R T^2 d ln K_i/dT, d ln K_i/dT from the temperature derivative of the
 *    fugacity coefficients at fixed phase compositions (a difference quotient of eos.lnPhi),
 *    v_i = beta y_i and dbeta/dT from the Rachford-Rice equation. The converged split is
 *    accepted on the tests flashTP applies to a split from given K-values. If beta leaves
 *    (0, 1) the nested iteration (an isothermal flash per step, warm-started from the last K,
 *    Newton with the same slope or the secant of the last two points) goes on from there.
 *  - every step stays inside the bracket and inside [Tmin, Tmax]; a step that would leave it,
 *    or a residual that does not halve in three evaluations, is replaced by bisection (H(T)
 *    bends sharply at bubble and dew points); without a bracket a step at most doubles or
 *    halves T.
 * Entropy works the same way with S(T) (dS/dT = Cp/T).
 *
 * A pure component (one component present) has a saturation temperature at P (below its
 * critical pressure) where H jumps from the saturated liquid's to the saturated vapor's. It is
 * found first (Newton on ln phi^L = ln phi^V, with d/dT = (H^R,V - H^R,L)/(R T^2)); an enthalpy
 * between the two is returned at that temperature with the vapor fraction
 * beta = (H - H^L)/(H^V - H^L); outside it the search is confined to the liquid side (below) or
 * the vapor side (above).
 *
 * Convergence: |H - H_spec| <= tol R T (default tol 1e-8), or |S - S_spec| <= tol R; or, where
 * H(T) is steeper than T can resolve (a narrow two-phase region of a nearly pure fluid), the
 * bracket closed to 1e-12 T with H rising across it by at most 1e-6 R T (JUMP_FLOOR). A state
 * that cannot be found (target outside what [Tmin, Tmax] can reach, an inner flash that fails,
 * no progress) is 'not-converged' with the last temperature, its residual and a message; never
 * a silent guess and never NaN. The search range defaults to half the lowest and 1.5 times the
 * highest temperature of validity of the heat-capacity correlations present (bounded to
 * [20 K, 6000 K]): polynomial heat capacities extrapolated far below their range can turn
 * negative, and H(T) would stop rising.
 */
import { R } from './constants.js';
import {
  missingThermoData, newPhaseProperties, phasePropertiesInto, type MissingThermoData, type PhaseProperties,
} from './enthalpy.js';
import { flashTP, type FlashResult } from './flash.js';
import { rachfordRiceCompositions, solveRachfordRice } from './rachford-rice.js';
import { cpIG, hIG, P_STD, sIG } from './ideal-gas.js';
import { eosWork, type ComponentData, type Eos } from './types.js';

export interface StateFlashOptions {
  /** Starting temperature, K (default: the ideal-gas temperature of the specification). */
  T0?: number;
  /** Tolerance on |H - H_spec|/(R T) or |S - S_spec|/R (default 1e-8). */
  tol?: number;
  /** Budget of isothermal flashes (equilibrium evaluations), default 60. */
  maxIterations?: number;
  /** Search range, K (defaults: see the module comment). */
  Tmin?: number;
  Tmax?: number;
  /** Starting K-values for the inner flashes (e.g. the last solve of the same stream). */
  K0?: Float64Array;
  /** Tolerance of the inner isothermal flashes (default 1e-10, flashTP's). */
  flashTol?: number;
}

export interface StateFlashResult {
  status: 'converged' | 'not-converged';
  /** Which specification was solved. */
  spec: 'PH' | 'PS';
  /** The specified enthalpy (J/mol) or entropy (J/(mol K)). */
  target: number;
  /** Temperature, K (the last one tried when not converged). */
  T: number;
  P: number;
  phase: 'two-phase' | 'vapor' | 'liquid';
  /** Vapor mole fraction. */
  beta: number;
  x: Float64Array;
  y: Float64Array;
  K: Float64Array;
  /** Molar enthalpy of the state returned, J/mol. */
  H: number;
  /** Molar entropy of the state returned, J/(mol K); absent when a component present has no gf (PH only). */
  S?: number;
  /** Temperature updates (single-phase Newton steps and two-phase steps without a flash included). */
  iterations: number;
  /** Isothermal flashes run (flashTP calls). */
  flashes: number;
  /** Fugacity-coefficient evaluations of both phases: those of the flashes and of the two-phase steps. */
  evaluations: number;
  /** |H - H_spec| in J/mol or |S - S_spec| in J/(mol K) at the state returned. */
  residual: number;
  /** Residual (as above) after each equilibrium evaluation. */
  history: number[];
  message?: string;
}

type Kind = 'H' | 'S';

/**
 * Largest rise of H/(R T) (S/R) across a bracket closed to 1e-12 T that is taken as a steep but
 * continuous H(T) rather than a jump: 1e-6, about 3 mJ/mol at 400 K, far below any latent heat.
 */
const JUMP_FLOOR = 1e-6;

/** One equilibrium evaluation at T. */
interface Eval {
  T: number;
  /** H or S of the equilibrium state. */
  v: number;
  H: number;
  S: number;
  /** Scaled residual: (H - target)/(R T) or (S - target)/R. */
  r: number;
  flash: FlashResult;
  /** Frozen heat capacities of the phases (the feed's for a single phase). */
  cpV: number;
  cpL: number;
  root: 'vapor' | 'liquid';
}

/** Everything one flashPH/flashPS call works with (allocated once per call). */
interface Ctx {
  eos: Eos;
  P: number;
  z: Float64Array;
  kind: Kind;
  target: number;
  withS: boolean;
  tol: number;
  flashTol: number | undefined;
  K: Float64Array | undefined;
  flashes: number;
  evaluations: number;
  iterations: number;
  history: number[];
  props: PhaseProperties;
  phiA: Float64Array;
  phiB: Float64Array;
  phiC: Float64Array;
  phiD: Float64Array;
  dlnK: Float64Array;
  /** Arrays of the simultaneous two-phase iteration. */
  work: { lnK: Float64Array; K: Float64Array; x: Float64Array; y: Float64Array; phiL: Float64Array; phiV: Float64Array; phiZ: Float64Array; lnKp: Float64Array };
}

/** Arrays of one flashPH/flashPS call, kept per equation of state (results are copies). */
interface Workspace {
  z: Float64Array;
  props: PhaseProperties;
  phiA: Float64Array;
  phiB: Float64Array;
  phiC: Float64Array;
  phiD: Float64Array;
  dlnK: Float64Array;
  work: Ctx['work'];
}

function workspaceFor(eos: Eos): Workspace {
  return eosWork(eos, 'stateFlash', (): Workspace => {
    const a = (): Float64Array => new Float64Array(eos.n);
    return {
      z: a(), props: newPhaseProperties(), phiA: a(), phiB: a(), phiC: a(), phiD: a(), dlnK: a(),
      work: { lnK: a(), K: a(), x: a(), y: a(), phiL: a(), phiV: a(), phiZ: a(), lnKp: a() },
    };
  }, (w) => w.z.length === eos.n);
}

/**
 * The simultaneous iteration substitutes on ln K alone while its fugacity residual exceeds this
 * fraction of the last scaled enthalpy (entropy) residual.
 */
const K_FIRST = 1e-4;

const TMIN_FLOOR = 20;
const TMAX_CEIL = 6000;

function range(comps: readonly ComponentData[], z: Float64Array, opts: StateFlashOptions): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < comps.length; i++) {
    if (!(z[i] > 0)) continue;
    const p = comps[i].cp!.pieces;
    lo = Math.min(lo, p[0].Tmin);
    hi = Math.max(hi, p[p.length - 1].Tmax);
  }
  const Tmin = opts.Tmin ?? Math.max(TMIN_FLOOR, 0.5 * lo);
  const Tmax = opts.Tmax ?? Math.min(TMAX_CEIL, 1.5 * hi);
  if (!(Tmin > 0) || !(Tmax > Tmin) || Tmax === Infinity) {
    throw new RangeError(`state flash: the temperature range must satisfy 0 < Tmin < Tmax < Infinity, got [${Tmin}, ${Tmax}]`);
  }
  return [Tmin, Tmax];
}

function scaled(ctx: Ctx, v: number, T: number): number {
  return ctx.kind === 'H' ? (v - ctx.target) / (R * T) : (v - ctx.target) / R;
}

/** Equilibrium at T: isothermal flash, then H and S of the split. Returns a message on failure. */
function evaluate(ctx: Ctx, T: number): Eval | string {
  const { eos, P, z, props } = ctx;
  const fl = flashTP(eos, T, P, z, { ...(ctx.K ? { K0: ctx.K } : {}), ...(ctx.flashTol !== undefined ? { tol: ctx.flashTol } : {}) });
  ctx.flashes++;
  ctx.evaluations += fl.evaluations;
  if (fl.status !== 'converged') {
    return `the isothermal flash at T = ${T.toPrecision(8)} K did not converge${fl.note ? ` (${fl.note})` : ''}`;
  }
  let H: number;
  let S: number;
  let cpV: number;
  let cpL: number;
  let root: 'vapor' | 'liquid';
  if (fl.phase === 'two-phase') {
    ctx.K = fl.K;
    const b = fl.beta;
    phasePropertiesInto(eos, T, P, fl.y, 'stable', ctx.kind === 'S', props);
    H = b * props.H;
    S = b * props.S;
    cpV = props.Cp;
    phasePropertiesInto(eos, T, P, fl.x, 'stable', ctx.kind === 'S', props);
    H += (1 - b) * props.H;
    S += (1 - b) * props.S;
    cpL = props.Cp;
    root = 'vapor';
  } else {
    // a single phase: the next flash starts afresh (K from a split would only cost a failed try)
    ctx.K = undefined;
    phasePropertiesInto(eos, T, P, z, 'stable', ctx.kind === 'S', props);
    H = props.H;
    S = props.S;
    cpV = cpL = props.Cp;
    root = props.root;
  }
  const v = ctx.kind === 'H' ? H : S;
  if (!Number.isFinite(v)) return `the ${ctx.kind === 'H' ? 'enthalpy' : 'entropy'} at T = ${T.toPrecision(8)} K is not a finite number`;
  return { T, v, H, S, r: scaled(ctx, v, T), flash: fl, cpV, cpL, root };
}

/**
 * Newton on the single-phase value of the feed on a fixed root between the bounds a < T < b
 * (no flash). Returns the temperature found, or NaN.
 */
function singlePhaseNewton(ctx: Ctx, T: number, root: 'vapor' | 'liquid', a: number, b: number): number {
  const { eos, P, z, props } = ctx;
  const goal = 0.05 * ctx.tol;
  let lastValid = T;
  for (let k = 0; k < 16; k++) {
    phasePropertiesInto(eos, T, P, z, root, ctx.kind === 'S', props);
    // The phase's root has vanished (beyond its spinodal): no single-phase answer this way. The
    // last temperature where it still existed lies past the phase boundary (the spinodal is
    // inside the two-phase region), which is where the equilibrium search goes next.
    if (props.root !== root) {
      if (k === 0) return NaN;
      // close in on where the root vanishes (bisection between the last valid T and this one)
      let bad = T;
      for (let j = 0; j < 8; j++) {
        const mid = 0.5 * (lastValid + bad);
        if (phasePropertiesInto(eos, mid, P, z, root, false, props).root === root) lastValid = mid;
        else bad = mid;
      }
      return lastValid;
    }
    lastValid = T;
    const v = ctx.kind === 'H' ? props.H : props.S;
    const slope = ctx.kind === 'H' ? props.Cp : props.Cp / T;
    const r = scaled(ctx, v, T);
    if (Math.abs(r) <= goal) return T;
    if (!(slope > 0) || !Number.isFinite(v)) return NaN;
    let Tn = T - (v - ctx.target) / slope;
    if (Tn <= a) Tn = 0.5 * (T + a);
    else if (Tn >= b) Tn = 0.5 * (T + b);
    ctx.iterations++;
    if (Math.abs(Tn - T) <= 1e-14 * T) return Tn;
    T = Tn;
  }
  return NaN;
}

/**
 * dH/dT (or dS/dT) of the two-phase equilibrium at T with vapor fraction beta, K-values K and
 * d ln K_i/dT at fixed phase compositions in dlnK (see the module comment); cpV and cpL are the
 * phases' heat capacities at fixed composition. Falls back to the frozen heat capacity when
 * the estimate is not positive.
 */
function slopeFrom(ctx: Ctx, T: number, beta: number, K: ArrayLike<number>, dlnK: Float64Array, cpV: number, cpL: number): number {
  const z = ctx.z;
  const n = z.length;
  const frozen = beta * cpV + (1 - beta) * cpL;
  let num = 0;
  let den = 0;
  for (let i = 0; i < n; i++) {
    if (!(z[i] > 0)) continue;
    const q = 1 + beta * (K[i] - 1);
    num += (z[i] * K[i] * dlnK[i]) / (q * q);
    den += (z[i] * (K[i] - 1) * (K[i] - 1)) / (q * q);
  }
  const dbeta = den > 0 ? num / den : 0;
  let latent = 0;
  const RT2 = R * T * T;
  for (let i = 0; i < n; i++) {
    if (!(z[i] > 0)) continue;
    const q = 1 + beta * (K[i] - 1);
    const dv = ((K[i] * z[i]) / (q * q)) * (dbeta + beta * (1 - beta) * dlnK[i]);
    latent += RT2 * dlnK[i] * dv;
  }
  let slope = frozen + latent;
  if (!(slope > 0) || !Number.isFinite(slope)) slope = frozen;
  return ctx.kind === 'H' ? slope : slope / T;
}

/** d ln K_i/dT at fixed x and y by a forward difference; phiL, phiV hold ln phi at T already. */
function lnKDerivative(ctx: Ctx, T: number, x: ArrayLike<number>, y: ArrayLike<number>, phiL: Float64Array, phiV: Float64Array): number {
  const { eos, P, z, phiC, phiD, dlnK } = ctx;
  const h = 1e-5 * T;
  eos.lnPhi(T + h, P, x, 'stable', phiC);
  eos.lnPhi(T + h, P, y, 'stable', phiD);
  for (let i = 0; i < z.length; i++) dlnK[i] = z[i] > 0 ? (phiC[i] - phiD[i] - (phiL[i] - phiV[i])) / h : 0;
  return h;
}

/** The slope of a converged two-phase evaluation (two extra pairs of fugacity evaluations). */
function twoPhaseSlope(ctx: Ctx, e: Eval): number {
  const { eos, P, phiA, phiB, dlnK } = ctx;
  const f = e.flash;
  eos.lnPhi(e.T, P, f.x, 'stable', phiA);
  eos.lnPhi(e.T, P, f.y, 'stable', phiB);
  lnKDerivative(ctx, e.T, f.x, f.y, phiA, phiB);
  return slopeFrom(ctx, e.T, f.beta, f.K, dlnK, e.cpV, e.cpL);
}

type Simultaneous = { kind: 'converged'; e: Eval } | { kind: 'left' | 'stalled'; T: number };

/**
 * Two-phase region: temperature and K-values iterated together, without an isothermal flash
 * per step. Each step solves Rachford-Rice for the current K and evaluates the fugacity
 * coefficients of both phases; while their residual exceeds K_FIRST times the last scaled
 * enthalpy (entropy) residual it substitutes on ln K alone (ln K_i = ln phi_i^L - ln phi_i^V),
 * else it evaluates H (S) of both phases and steps T (Newton with the slope estimate first, the
 * secant after), ln K moved to the new T with d ln K_i/dT. Measured on the converter effluent
 * of bench section 2b (started 0.1 K off, tolerances 1e-10): 10 evaluations of the fugacities,
 * 4 of them with H (3 steps on T), where stepping T on every evaluation took 11, each with H
 * and a step on T; on 1,578 two-phase states of four loop mixtures, cold and warm, the same
 * temperatures to 1e-6 K in 0.65 of the time (with the warm start's predictor skipped, see
 * solve). It stops when the fugacities are equal to the flash tolerance and the
 * specification is met; the split is then accepted on the tests flashTP applies to a split
 * from given K-values (0 < beta < 1, not trivial, Gibbs energy below the feed's). 'left' when
 * beta leaves (0, 1) (a bubble or dew point is crossed), 'stalled' when it does not converge in
 * its budget: the nested iteration takes over from that temperature.
 */
function simultaneous(ctx: Ctx, start: Eval, a: number, b: number): Simultaneous {
  const { eos, P, z, props, dlnK } = ctx;
  const n = z.length;
  const w = ctx.work;
  const { lnK, K, x, y, phiL, phiV, lnKp } = w;
  const fTol = ctx.flashTol ?? 1e-10;
  for (let i = 0; i < n; i++) lnK[i] = Math.log(start.flash.K[i]);
  lnKp.set(lnK);
  let T = start.T;
  /** The last enthalpy (entropy) evaluation, for the secant: the start's flash is converged. */
  let Tp = start.T;
  let vp = start.v;
  /** The scaled residual of the last evaluation: how far the K-values may be left unconverged. */
  let lastR = start.r;
  let prevE = Infinity;
  let substitutions = 0;
  let tSteps = 0;
  for (let it = 0; it < 60; it++) {
    for (let i = 0; i < n; i++) K[i] = Math.exp(lnK[i] > 600 ? 600 : lnK[i] < -600 ? -600 : lnK[i]);
    const rr = solveRachfordRice(z, K);
    if (rr.kind !== 'root' || !(rr.beta > 0 && rr.beta < 1)) return { kind: 'left', T };
    const beta = rr.beta;
    rachfordRiceCompositions(z, K, beta, x, y);
    eos.lnPhi(T, P, x, 'stable', phiL);
    eos.lnPhi(T, P, y, 'stable', phiV);
    ctx.evaluations++;
    let emax = 0;
    for (let i = 0; i < n; i++) {
      if (!(z[i] > 0)) continue;
      const e = Math.abs(lnK[i] + phiV[i] - phiL[i]);
      if (e > emax) emax = e;
    }
    // Substitution on ln K alone, at this T, while the K-values are far from converged beside
    // the enthalpy residual: a temperature step taken from an enthalpy whose split is still
    // moving only chases the split (the steps then alternate about the answer).
    if (emax > fTol && emax > K_FIRST * Math.abs(lastR)) {
      // the substitution must contract; if it does not, hand over to the nested iteration
      if (substitutions > 3 && emax > 0.9 * prevE) return { kind: 'stalled', T };
      prevE = emax;
      substitutions++;
      for (let i = 0; i < n; i++) lnK[i] = phiL[i] - phiV[i];
      continue;
    }
    phasePropertiesInto(eos, T, P, y, 'stable', ctx.kind === 'S', props);
    const hV = props.H;
    const sV = props.S;
    const cpV = props.Cp;
    phasePropertiesInto(eos, T, P, x, 'stable', ctx.kind === 'S', props);
    const H = beta * hV + (1 - beta) * props.H;
    const S = beta * sV + (1 - beta) * props.S;
    const cpL = props.Cp;
    const v = ctx.kind === 'H' ? H : S;
    if (!Number.isFinite(v)) return { kind: 'stalled', T };
    const r = scaled(ctx, v, T);
    if (emax <= fTol && Math.abs(r) <= ctx.tol) {
      const accepted = acceptSplit(ctx, T, beta, emax);
      if (accepted === undefined) return { kind: 'stalled', T };
      ctx.history.push(Math.abs(v - ctx.target));
      return { kind: 'converged', e: { T, v, H, S, r, flash: accepted, cpV, cpL, root: 'vapor' } };
    }
    if (tSteps >= 20) return { kind: 'stalled', T };
    // Newton on T with the slope of the split, d ln K/dT at fixed phase compositions carrying
    // ln K to the new T; after the first step the secants of the last two evaluations (both
    // nearly converged in K), which hold the change of the compositions too: the estimate at
    // fixed compositions is a few per cent off near a dew point
    let slope = Number.NaN;
    if (T !== Tp) {
      const sec = (v - vp) / (T - Tp);
      if (sec > 0 && Number.isFinite(sec)) {
        slope = sec;
        for (let i = 0; i < n; i++) dlnK[i] = z[i] > 0 ? (phiL[i] - phiV[i] - lnKp[i]) / (T - Tp) : 0;
      }
    }
    if (!(slope > 0)) {
      lnKDerivative(ctx, T, x, y, phiL, phiV);
      slope = slopeFrom(ctx, T, beta, K, dlnK, cpV, cpL);
    }
    let dT = -(v - ctx.target) / slope;
    if (!Number.isFinite(dT)) return { kind: 'stalled', T };
    if (T + dT <= a) dT = 0.5 * (a - T);
    else if (T + dT >= b) dT = 0.5 * (b - T);
    Tp = T;
    vp = v;
    for (let i = 0; i < n; i++) lnKp[i] = phiL[i] - phiV[i];
    lastR = r;
    prevE = Infinity;
    substitutions = 0;
    for (let i = 0; i < n; i++) lnK[i] = phiL[i] - phiV[i] + dlnK[i] * dT;
    T += dT;
    tSteps++;
    ctx.iterations++;
  }
  return { kind: 'stalled', T };
}

/**
 * The tests of flash.ts for a split from given K-values: not trivial (sum z_i ln^2 K_i >= 1e-8)
 * and lower in Gibbs energy than the feed as one phase. Builds the flash record of the split.
 */
function acceptSplit(ctx: Ctx, T: number, beta: number, residual: number): FlashResult | undefined {
  const { eos, P, z } = ctx;
  const { lnK, K, x, y, phiL, phiV, phiZ } = ctx.work;
  const n = z.length;
  let trivial = 0;
  let gSplit = 0;
  for (let i = 0; i < n; i++) {
    if (!(z[i] > 0)) continue;
    trivial += z[i] * lnK[i] * lnK[i];
    if (x[i] > 0) gSplit += (1 - beta) * x[i] * (Math.log(x[i]) + phiL[i]);
    if (y[i] > 0) gSplit += beta * y[i] * (Math.log(y[i]) + phiV[i]);
  }
  if (trivial < 1e-8) return undefined;
  eos.lnPhi(T, P, z, 'stable', phiZ);
  ctx.evaluations++;
  let gFeed = 0;
  for (let i = 0; i < n; i++) if (z[i] > 0) gFeed += z[i] * (Math.log(z[i]) + phiZ[i]);
  if (!(gSplit < gFeed)) return undefined;
  const Kout = Float64Array.from(K);
  // components absent from the feed: K at infinite dilution
  for (let i = 0; i < n; i++) if (!(z[i] > 0)) Kout[i] = Math.exp(phiL[i] - phiV[i]);
  const f: FlashResult = {
    status: 'converged', phase: 'two-phase', beta, x: Float64Array.from(x), y: Float64Array.from(y), K: Kout,
    iterations: 0, residual, evaluations: 0, history: [], method: 'from-K0',
  };
  if (eos.z(T, P, y, 'stable').root === 'liquid' && eos.z(T, P, x, 'stable').root === 'liquid') {
    f.liquidLiquid = true;
    f.note = 'both phases are liquid-like: the model predicts a liquid-liquid split (check the k_ij of polar pairs such as water-methanol)';
  }
  return f;
}

/** Ideal-gas temperature of the specification within [Tmin, Tmax] (the default start). */
function idealGuess(ctx: Ctx, Tmin: number, Tmax: number): number {
  const comps = ctx.eos.components;
  const z = ctx.z;
  const n = z.length;
  let mix = 0;
  if (ctx.kind === 'S') {
    mix = -R * Math.log(ctx.P / P_STD);
    for (let i = 0; i < n; i++) if (z[i] > 0) mix -= R * z[i] * Math.log(z[i]);
  }
  const value = (T: number): number => {
    let v = mix;
    for (let i = 0; i < n; i++) if (z[i] > 0) v += z[i] * (ctx.kind === 'H' ? hIG(comps[i], T) : sIG(comps[i], T));
    return v - ctx.target;
  };
  const slope = (T: number): number => {
    let c = 0;
    for (let i = 0; i < n; i++) if (z[i] > 0) c += z[i] * cpIG(comps[i], T);
    return ctx.kind === 'H' ? c : c / T;
  };
  let lo = Tmin;
  let hi = Tmax;
  if (value(lo) >= 0) return lo;
  if (value(hi) <= 0) return hi;
  let T = Math.min(Math.max(298.15, lo), hi);
  for (let k = 0; k < 60; k++) {
    const f = value(T);
    if (f < 0) lo = T;
    else hi = T;
    const s = slope(T);
    let Tn = s > 0 ? T - f / s : NaN;
    if (!(Tn > lo && Tn < hi)) Tn = 0.5 * (lo + hi);
    // a start, refined by the real-gas steps: a millikelvin is plenty
    if (Math.abs(Tn - T) <= 1e-3) return Tn;
    T = Tn;
  }
  return T;
}

interface Saturation {
  T: number;
  /** ln phi of both roots at T (for the K-values of absent components). */
  phiL: Float64Array;
  phiV: Float64Array;
}

/**
 * Saturation temperature of pure component i at P within [Tmin, Tmax], or undefined when it
 * has none there (P at or above Pc, the ideal gas, or the saturation point out of range).
 */
function saturationTemperature(ctx: Ctx, i: number, Tmin: number, Tmax: number): Saturation | undefined {
  const { eos, P, z } = ctx;
  const c = eos.components[i];
  if (eos.name === 'ideal' || !(P < c.Pc)) return undefined;
  const dep = newPhaseProperties();
  const phiL = new Float64Array(eos.n);
  const phiV = new Float64Array(eos.n);
  let lo = Tmin;
  let hi = Math.min(Tmax, c.Tc);
  if (!(hi > lo)) return undefined;
  // Wilson's estimate, inverted for T
  let T = c.Tc / (1 - Math.log(P / c.Pc) / (5.373 * (1 + c.omega)));
  if (!(T > lo && T < hi)) T = 0.5 * (lo + hi);
  for (let k = 0; k < 200; k++) {
    const rl = eos.lnPhi(T, P, z, 'liquid', phiL);
    let Tn: number;
    if (rl.nRoots === 1) {
      // one root: liquid-like below the saturation range, gas-like above it
      if (rl.root === 'liquid') lo = T;
      else hi = T;
      Tn = 0.5 * (lo + hi);
    } else {
      eos.lnPhi(T, P, z, 'vapor', phiV);
      const g = phiL[i] - phiV[i];
      if (Math.abs(g) <= 1e-12) return { T, phiL, phiV };
      if (g < 0) lo = T;
      else hi = T;
      phasePropertiesInto(eos, T, P, z, 'vapor', false, dep);
      const hV = dep.H;
      phasePropertiesInto(eos, T, P, z, 'liquid', false, dep);
      const slope = (hV - dep.H) / (R * T * T);
      Tn = slope > 0 ? T - g / slope : NaN;
      if (!(Tn > lo && Tn < hi)) Tn = 0.5 * (lo + hi);
    }
    if (hi - lo <= 1e-13 * hi) break;
    T = Tn;
  }
  return undefined;
}

/** Entropy of an evaluated state (PH computes it once, at the end). */
function entropyOf(ctx: Ctx, e: Eval): number {
  const { eos, P } = ctx;
  const f = e.flash;
  const p = ctx.props;
  if (f.phase !== 'two-phase') return phasePropertiesInto(eos, e.T, P, ctx.z, 'stable', true, p).S;
  const sV = phasePropertiesInto(eos, e.T, P, f.y, 'stable', true, p).S;
  const sL = phasePropertiesInto(eos, e.T, P, f.x, 'stable', true, p).S;
  return f.beta * sV + (1 - f.beta) * sL;
}

function result(ctx: Ctx, status: StateFlashResult['status'], e: Eval, message?: string): StateFlashResult {
  const f = e.flash;
  const r: StateFlashResult = {
    status, spec: ctx.kind === 'H' ? 'PH' : 'PS', target: ctx.target, T: e.T, P: ctx.P, phase: f.phase, beta: f.beta,
    x: f.x, y: f.y, K: f.K, H: e.H, iterations: ctx.iterations, flashes: ctx.flashes, evaluations: ctx.evaluations,
    residual: Math.abs(e.v - ctx.target), history: ctx.history,
  };
  if (ctx.withS) r.S = ctx.kind === 'S' ? e.S : entropyOf(ctx, e);
  if (message !== undefined) r.message = message;
  else if (f.note) r.message = f.note;
  return r;
}

/**
 * Result with no equilibrium evaluation to show (the inner flash failed at the first
 * temperature): the feed as one phase on its stable root at T, marked not converged.
 */
function failedAt(ctx: Ctx, T: number, message: string): StateFlashResult {
  const n = ctx.eos.n;
  const p = phasePropertiesInto(ctx.eos, T, ctx.P, ctx.z, 'stable', ctx.withS, newPhaseProperties());
  const v = ctx.kind === 'H' ? p.H : p.S;
  const r: StateFlashResult = {
    status: 'not-converged', spec: ctx.kind === 'H' ? 'PH' : 'PS', target: ctx.target, T, P: ctx.P, phase: p.root, beta: p.root === 'vapor' ? 1 : 0,
    x: Float64Array.from(ctx.z), y: Float64Array.from(ctx.z), K: new Float64Array(n).fill(1), H: p.H,
    iterations: ctx.iterations, flashes: ctx.flashes, evaluations: ctx.evaluations, residual: Math.abs(v - ctx.target), history: ctx.history, message,
  };
  if (ctx.withS) r.S = p.S;
  return r;
}

function describe(ctx: Ctx, v: number): string {
  return ctx.kind === 'H' ? `${v.toPrecision(8)} J/mol` : `${v.toPrecision(8)} J/(mol K)`;
}

function solve(eos: Eos, P: number, kind: Kind, target: number, z: ArrayLike<number>, opts: StateFlashOptions): StateFlashResult | MissingThermoData {
  const name = kind === 'H' ? 'flashPH' : 'flashPS';
  const n = eos.n;
  if (!(P > 0) || P === Infinity) throw new RangeError(`${name}: pressure must be a finite positive number of pascal, got ${P}`);
  if (!Number.isFinite(target)) throw new RangeError(`${name}: the specified ${kind === 'H' ? 'enthalpy' : 'entropy'} must be finite, got ${target}`);
  if (z.length !== n) throw new RangeError(`${name}: feed has ${z.length} entries, expected ${n}`);
  if (opts.T0 !== undefined && (!(opts.T0 > 0) || opts.T0 === Infinity)) throw new RangeError(`${name}: T0 must be a finite positive number of kelvin, got ${opts.T0}`);
  if (opts.K0 !== undefined && opts.K0.length !== n) throw new RangeError(`${name}: K0 has ${opts.K0.length} entries, expected ${n}`);
  let sum = 0;
  for (let i = 0; i < n; i++) {
    const v = z[i];
    if (!(v >= 0) || v === Infinity) throw new RangeError(`${name}: feed mole fraction ${i} must be finite and >= 0, got ${v}`);
    sum += v;
  }
  if (!(sum > 0)) throw new RangeError(`${name}: feed must have a positive sum`);
  const ws = workspaceFor(eos);
  const zz = ws.z;
  let nPresent = 0;
  let only = -1;
  for (let i = 0; i < n; i++) {
    zz[i] = z[i] / sum;
    if (zz[i] > 0) {
      nPresent++;
      only = i;
    }
  }
  const miss = missingThermoData(eos.components, kind === 'H' ? 'enthalpy' : 'entropy', zz);
  if (miss) return miss;
  const withS = kind === 'S' || missingThermoData(eos.components, 'entropy', zz) === undefined;
  const ctx: Ctx = {
    eos, P, z: zz, kind, target, withS, tol: opts.tol ?? 1e-8, flashTol: opts.flashTol, K: opts.K0,
    flashes: 0, evaluations: 0, iterations: 0, history: [], props: ws.props,
    phiA: ws.phiA, phiB: ws.phiB, phiC: ws.phiC, phiD: ws.phiD, dlnK: ws.dlnK, work: ws.work,
  };
  const maxIt = opts.maxIterations ?? 60;
  let [Tmin, Tmax] = range(eos.components, zz, opts);
  /** Bracket: lo has r < 0 (value below the target), hi has r > 0; d = value - target. */
  let lo: { T: number; r: number; d: number } | undefined;
  let hi: { T: number; r: number; d: number } | undefined;

  // A pure component: the saturation temperature, where H (S) jumps.
  if (nPresent === 1) {
    const sat = saturationTemperature(ctx, only, Tmin, Tmax);
    if (sat !== undefined) {
      const Ts = sat.T;
      const pL = phasePropertiesInto(eos, Ts, P, zz, 'liquid', withS, newPhaseProperties());
      const pV = phasePropertiesInto(eos, Ts, P, zz, 'vapor', withS, newPhaseProperties());
      const vL = kind === 'H' ? pL.H : pL.S;
      const vV = kind === 'H' ? pV.H : pV.S;
      if (target >= vL && target <= vV) {
        const beta = vV > vL ? (target - vL) / (vV - vL) : 0;
        const K = new Float64Array(n);
        for (let i = 0; i < n; i++) K[i] = i === only ? 1 : Math.exp(sat.phiL[i] - sat.phiV[i]);
        const H = beta * pV.H + (1 - beta) * pL.H;
        const S = beta * pV.S + (1 - beta) * pL.S;
        const v = kind === 'H' ? H : S;
        ctx.history.push(Math.abs(v - target));
        const r: StateFlashResult = {
          status: 'converged', spec: kind === 'H' ? 'PH' : 'PS', target, T: Ts, P, phase: 'two-phase', beta,
          x: Float64Array.from(zz), y: Float64Array.from(zz), K, H, iterations: ctx.iterations, flashes: 0, evaluations: 0,
          residual: Math.abs(v - target), history: ctx.history,
          message: `pure ${eos.components[only].id} at its saturation temperature: the vapor fraction carries the ${kind === 'H' ? 'enthalpy' : 'entropy'} balance`,
        };
        if (withS) r.S = S;
        return r;
      }
      if (target < vL) {
        hi = { T: Ts, r: scaled(ctx, vL, Ts), d: vL - target };
        Tmax = Ts;
      } else {
        lo = { T: Ts, r: scaled(ctx, vV, Ts), d: vV - target };
        Tmin = Ts;
      }
    }
  }

  let T = opts.T0 ?? idealGuess(ctx, Tmin, Tmax);
  const span = Tmax - Tmin;
  if (T < Tmin) T = Tmin;
  if (T > Tmax) T = Tmax;
  // keep off a saturation bound (the flash there could land on the other side)
  if (lo !== undefined && T <= lo.T) T = lo.T + Math.min(1, 0.01 * span);
  if (hi !== undefined && T >= hi.T) T = hi.T - Math.min(1, 0.01 * span);

  // Predictor without a flash: the feed as one phase on its stable root at the start. A
  // single-phase answer then needs one isothermal flash, to confirm it. A start from the caller
  // is kept when the predictor would move it far (more than 5 %): that is a two-phase state,
  // for which the caller's temperature is the better start. A caller that gives both a
  // temperature and K-values had a two-phase state there (a stream of a loop, a pass before):
  // the predictor is skipped, and the first flash, from those K-values, says which it is now.
  if (opts.T0 === undefined || opts.K0 === undefined) {
    const p0 = phasePropertiesInto(eos, T, P, zz, 'stable', false, ctx.props);
    const Tp = singlePhaseNewton(ctx, T, p0.root, lo ? lo.T : Tmin, hi ? hi.T : Tmax);
    if (Number.isFinite(Tp) && (opts.T0 === undefined || Math.abs(Tp - T) <= 0.05 * T)) T = Tp;
  }

  let prev: Eval | undefined;
  /** History length at the last bisection (the slowness test looks at the evaluations after it). */
  let sinceBisection = 0;
  let simultaneousRuns = 0;
  /** The phase whose single-phase answer the next evaluation tests, and those refused. */
  let frozenFrom: 'vapor' | 'liquid' | undefined;
  const rejected = { vapor: false, liquid: false };
  for (;;) {
    let got = evaluate(ctx, T);
    // An isothermal flash that fails at one temperature (a split that runs off to beta outside
    // [0, 1], typically with three phases close) is tried again from scratch a little to either
    // side, inside the bracket, before the state is given up.
    for (let retry = 1; typeof got === 'string' && retry <= 4 && ctx.flashes < maxIt; retry++) {
      const step = 1e-3 * retry * T * (retry % 2 === 1 ? 1 : -1);
      const Tr = T + step;
      if (!(Tr > (lo ? lo.T : Tmin) && Tr < (hi ? hi.T : Tmax))) continue;
      ctx.K = undefined;
      const again = evaluate(ctx, Tr);
      if (typeof again !== 'string') {
        got = again;
        T = Tr;
      }
    }
    if (typeof got === 'string') {
      return prev ? result(ctx, 'not-converged', prev, got) : failedAt(ctx, T, got);
    }
    const e = got;
    ctx.history.push(Math.abs(e.v - target));
    if (Math.abs(e.r) <= ctx.tol) return result(ctx, 'converged', e);
    if (e.r < 0) {
      if (lo === undefined || e.T > lo.T) lo = { T: e.T, r: e.r, d: e.v - target };
    } else if (hi === undefined || e.T < hi.T) {
      hi = { T: e.T, r: e.r, d: e.v - target };
    }
    if (ctx.flashes >= maxIt) {
      return result(ctx, 'not-converged', e, `no temperature found in ${ctx.flashes} isothermal flashes (residual ${describe(ctx, e.v - target)} at T = ${e.T.toPrecision(8)} K)`);
    }
    // the target cannot be reached at the ends of the range
    if (e.r > 0 && e.T <= Tmin) {
      return result(ctx, 'not-converged', e, `the specified ${kind === 'H' ? 'enthalpy' : 'entropy'} ${describe(ctx, target)} is below that of the stream at the lowest temperature searched, ${Tmin.toPrecision(6)} K (${describe(ctx, e.v)}): no state at this pressure has it`);
    }
    if (e.r < 0 && e.T >= Tmax) {
      return result(ctx, 'not-converged', e, `the specified ${kind === 'H' ? 'enthalpy' : 'entropy'} ${describe(ctx, target)} is above that of the stream at the highest temperature searched, ${Tmax.toPrecision(6)} K (${describe(ctx, e.v)})`);
    }
    const a0 = lo ? lo.T : Tmin;
    const b0 = hi ? hi.T : Tmax;
    if (lo && hi && b0 - a0 <= 1e-12 * b0) {
      // The bracket has closed to the resolution of T. Across a narrow two-phase region (a nearly
      // pure fluid: n-hexane with 1 % nitrogen at 3.6 bar boils over 0.3 K, dH/dT near 1e5 J/(mol K))
      // H(T) is continuous but rises more over 1e-12 T than the tolerance allows: a rise across the
      // bracket below JUMP_FLOOR (scaled as the residual) is that, and the state is found to the
      // resolution of T. A larger one is a jump the flash cannot bridge.
      if (hi.r - lo.r <= JUMP_FLOOR) return result(ctx, 'converged', e);
      return result(ctx, 'not-converged', e, `the ${kind === 'H' ? 'enthalpy' : 'entropy'} jumps at T = ${e.T.toPrecision(10)} K (from ${describe(ctx, target + lo.d)} to ${describe(ctx, target + hi.d)}): the flash finds no state in between`);
    }
    // next temperature
    let Tn: number;
    if (frozenFrom !== undefined && e.flash.phase !== frozenFrom) rejected[frozenFrom] = true;
    frozenFrom = undefined;
    if (e.flash.phase !== 'two-phase') {
      // a phase whose single-phase answer the equilibrium has already refused is not asked again
      Tn = rejected[e.root] ? NaN : singlePhaseNewton(ctx, e.T, e.root, a0, b0);
      // an answer pressed against an end of the bracket is the single phase failing, not a solution
      if (lo && hi && (Tn - a0 < 1e-3 * (b0 - a0) || b0 - Tn < 1e-3 * (b0 - a0))) Tn = NaN;
      if (Number.isFinite(Tn)) frozenFrom = e.root;
    } else if (simultaneousRuns < 3) {
      simultaneousRuns++;
      const sim = simultaneous(ctx, e, a0, b0);
      if (sim.kind === 'converged') return result(ctx, 'converged', sim.e);
      // a bubble or dew point crossed, or no progress: the nested iteration goes on from there
      Tn = Math.min(Math.max(sim.T, a0 + 1e-3 * (b0 - a0)), b0 - 1e-3 * (b0 - a0));
      if (sim.kind === 'left') ctx.K = undefined;
    } else {
      let slope = NaN;
      if (prev !== undefined && prev.flash.phase === 'two-phase' && prev.T !== e.T) {
        slope = (e.v - prev.v) / (e.T - prev.T);
      }
      if (!(slope > 0)) slope = twoPhaseSlope(ctx, e);
      Tn = e.T - (e.v - target) / slope;
      ctx.iterations++;
    }
    // safeguards: inside the bracket, at most doubling or halving without one, bisection when
    // the residual has not halved in three evaluations
    const h = ctx.history;
    const k = h.length;
    const slow = lo !== undefined && hi !== undefined && k - sinceBisection >= 4 && h[k - 1] > 0.5 * h[k - 4];
    if (!Number.isFinite(Tn) || Tn <= a0 || Tn >= b0) {
      if (lo && hi) {
        // bisection: H(T) bends sharply at bubble and dew points, where false position crawls
        Tn = 0.5 * (a0 + b0);
        sinceBisection = ctx.history.length;
      } else if (e.r < 0) Tn = Math.min(2 * e.T, hi ? 0.5 * (e.T + b0) : Tmax);
      else Tn = Math.max(0.5 * e.T, lo ? 0.5 * (e.T + a0) : Tmin);
    }
    if (slow && lo && hi) {
      Tn = 0.5 * (a0 + b0);
      sinceBisection = k;
    }
    if (!(lo && hi)) Tn = Math.min(Math.max(Tn, 0.5 * e.T), 2 * e.T);
    Tn = Math.min(Math.max(Tn, Tmin), Tmax);
    prev = e;
    T = Tn;
  }
}

/**
 * Pressure-enthalpy flash: the state of feed z (mole fractions) at P (Pa) whose molar enthalpy
 * is H (J/mol, formation basis as in enthalpy.ts). 'invalid' when a component present lacks cp
 * or hf.
 */
export function flashPH(eos: Eos, P: number, H: number, z: ArrayLike<number>, opts: StateFlashOptions = {}): StateFlashResult | MissingThermoData {
  return solve(eos, P, 'H', H, z, opts);
}

/**
 * Pressure-entropy flash: the state of feed z at P (Pa) whose molar entropy is S (J/(mol K),
 * formation basis). 'invalid' when a component present lacks cp, hf or gf.
 */
export function flashPS(eos: Eos, P: number, S: number, z: ArrayLike<number>, opts: StateFlashOptions = {}): StateFlashResult | MissingThermoData {
  return solve(eos, P, 'S', S, z, opts);
}
