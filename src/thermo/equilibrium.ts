/**
 * Chemical equilibrium of gas-phase reactions at a given T and P: the extents of several
 * reactions found together, each reaction optionally held at an approach to equilibrium.
 *
 * Method. With extents xi_r (mol/s) of the equilibrium reactions and b_i the flow of component i
 * that reaches them (the inlet plus the generation of any reactions at fixed conversion, which
 * the caller applies first), n_i = b_i + sum_r nu_ri xi_r and N = sum_i n_i. Reaction r is at
 * equilibrium when
 *   F_r = sum_i nu_ri ln(y_i phi_i P / P0) - ln K_r = 0,     y_i = n_i / N,   P0 = 1 bar,
 *   ln K_r(T) = -sum_i nu_ri g_i(T) / (R T),
 * with g_i the ideal-gas Gibbs energy of formation at 1 bar (ideal-gas.ts: gf at 298.15 K carried
 * to T with the heat-capacity correlation, so that d ln K / dT = Delta h / (R T^2) holds exactly:
 * the van 't Hoff equation integrated with Cp(T), not a constant heat of reaction). The fugacity
 * coefficients phi_i come from the file's equation of state on the vapor root of the mixture.
 * This is the extent ("stoichiometric") form of the Gibbs energy minimum of Smith and Missen,
 * Chemical Reaction Equilibrium Analysis: Theory and Algorithms (Wiley, 1982), ch. 4 and 6: F is
 * the gradient of G/(RT) with respect to the extents (the terms sum_i n_i d ln phi_i vanish by
 * Gibbs-Duhem), and the ideal-gas part of its Jacobian,
 *   J_rs = sum_i nu_ri nu_si / n_i - dnu_r dnu_s / N,      dnu_r = sum_i nu_ri,
 * is the Hessian of the ideal-gas G/(RT): symmetric and positive definite for independent
 * reactions in the interior of the feasible region, so that the ideal-gas problem has one
 * solution and Newton's direction always lowers G.
 *
 * Solution. Newton's method on the extents. The Jacobian is the analytic ideal-gas part above,
 * evaluated at every iterate, plus the part of the fugacity coefficients,
 * d(sum_i nu_ri ln phi_i)/d xi_s, taken by forward differences of the extents once at the start
 * of each solve (one equation-of-state call per reaction and equilibrium temperature) and held
 * through the solve: a chord for that part only. The fugacity coefficients themselves are
 * evaluated afresh at every iterate, so the residual is exact; the held part changes little over
 * a solve (it is about 5 % of the ideal part for ammonia at 300 atm). If a step fails to lower
 * the residual, or lowers it by less than a factor of 4, that part is differenced again at the
 * current iterate. (Option `jacobian:
 * 'lagged'` leaves the part out, i.e. the coefficients are lagged, as successive substitution
 * nested in Newton; `'full'` differences it at every iterate.) Every step stays inside the
 * feasible region: it is cut so that no species that a reaction uses falls by more than 99 % of
 * what is left (fraction to the boundary), then halved until the sum of squared residuals
 * (each beyond its rounding noise, below) falls (Armijo). Converged when every |F_r| <= tol (default 1e-11, i.e. Q_r/K_r = 1 within 1e-11), or
 * when every residual lies within its own rounding noise, 8 machine epsilons times the sum of the
 * magnitudes that make it, where ln n_i counts (b_i + sum_r |nu_ri xi_r|) / n_i: a reactant that
 * is nearly used up (benzene hydrogenated to 2e-8 of its feed) is the difference of two nearly
 * equal numbers, and its logarithm cannot be resolved further; the result then says so in its
 * message, and its flows are exact to the rounding of the flows.
 * The start is the extents of the last call when the caller passes them (warm start) and they
 * keep every species positive; otherwise, when some species is absent, a step along the direction
 * found below (which forms every absent species that can be present) to a tenth of what its
 * scarcest consumed species allows, and no step when every species is present.
 *
 * What can proceed. A component that reaches the reactor can be present at equilibrium; one that
 * does not can be present when some combination of the reactions forms it without taking any
 * other absent component below zero. Those that no combination forms are held at exactly zero,
 * and the extents move only in the directions that leave them at zero (equilibrium-space.ts: one
 * small linear programme, made again only when the set of absent components changes). A reaction
 * that no such direction moves (N2 + 3 H2 -> 2 NH3 with neither N2 nor NH3 in the inlet) keeps a
 * zero extent, and the result says so; two reactions that can run only together (CO2 + 3 H2 ->
 * CH3OH + H2O and CO2 + H2 -> CO + H2O on an inlet of CO and H2, as CO + 2 H2 -> CH3OH) run
 * together. Newton then works on the coordinates eta of the extents in an orthonormal basis B of
 * those directions: xi = B eta, residual B^T F, Jacobian B^T J B (B is the identity when every
 * component is present). Reactions that are linear combinations of others are refused when the
 * solver is prepared (their extents are not unique, and their equilibrium holds already).
 *
 * Approach to equilibrium. A reaction with an approach dT (K) is held at the equilibrium of
 * T + dT when it is exothermic and of T - dT when it is endothermic in the direction it runs,
 * judged by the sign of its ideal-gas heat of reaction at the reactor's T and, when it runs
 * backwards (a negative extent at the equilibrium of T), reversed: in every case the reaction
 * stops short of the equilibrium of T, on the side it came from (see solve()). The whole condition of that reaction (K and the fugacity coefficients) is
 * taken at its equilibrium temperature, so that with one reaction, or with several sharing one
 * equilibrium temperature, the outlet is exactly the equilibrium mixture of that temperature; it
 * leaves at the reactor's T.
 *
 * Phase. The converter is gas-phase. The mixture must be a vapor at every iterate: when the
 * equation of state has one root and labels it liquid-like, or three roots and the liquid one
 * has the lower Gibbs energy, the result is 'infeasible' with reason 'not-gas' (a trial step into
 * such a state is shortened instead). With `phaseCheck: 'stability'` the converged mixture also
 * goes through the tangent-plane stability test at the reactor's T and P (stability.ts), which
 * finds a dew point that the root labels miss; a second phase is then 'infeasible' with reason
 * 'two-phase'. The test costs some tens of equation-of-state evaluations (about as much again as a
 * warm solve), so the default ('root') leaves it to the caller to run once on a converged
 * flowsheet (phaseProblem). A solve that fails, and whose last mixture the test finds would
 * condense at an equilibrium temperature, is reported as 'infeasible', 'two-phase' too: a dense
 * water- or methanol-rich state on which the vapor root gives no usable answer.
 *
 * What is assumed, and where it is weak.
 * - Ideal-gas standard state at 1 bar; the formation data of thermochem.ts (their sources there).
 *   An error of 1 kJ/mol in Delta g moves K by about 19 % at 700 K.
 * - The mixture's non-ideality is that of the cubic equation of state with its van der Waals
 *   mixing rules (and the file's k_ij, if any): good for light reaction gases away from their
 *   critical region, weaker for polar products (methanol, water, ammonia) at high pressure, where
 *   it carries the error of the one-fluid mixing rule. Against the measured ammonia equilibria of
 *   Larson and Dodge (1923-24) SRK is within 1.5 mole percent up to 300 atm (see
 *   test/thermo/equilibrium.test.ts); the ideal gas is about 4 points low at 300 atm.
 * - No liquid phase, no solid (no carbon deposition), no condensation in the converter.
 * - The heat of reaction that decides the sign of an approach is the ideal-gas one from the
 *   formation-basis enthalpies at the reactor's T (the residual enthalpy is left out).
 * - Outside the range of a heat-capacity correlation, the end piece is extrapolated and the
 *   result says so in its message.
 *
 * API (allocation-free in its hot path: arrays live in the solver, and `solve` writes into a
 * result object the caller keeps; a message string is built only when something is to be said):
 *   const p = prepareEquilibrium(eos, [{ nu, approach, key, label }, ...]);   // once per reactor
 *   if (p.status === 'invalid') ... p.problems: one per problem, with the reaction's index
 *   const out = p.solver.newResult();
 *   p.solver.solve({ T, P, flows, generation?, start? }, out);   // every pass
 *   out.status, out.reason, out.message, out.extents, out.flows, out.lnK, out.Teq, out.heat, ...
 * Reactions at a fixed conversion or extent in the same reactor: the caller computes their extents
 * on the inlet as it does now and passes their net generation (sum of nu times extent) as
 * `generation`; the equilibrium reactions then take inlet + generation to equilibrium, so the
 * outlet is inlet + generation + equilibrium, and the equilibrium holds at the outlet.
 * Warm start: pass the last call's `out.extents` as `start` (a start that is not feasible for the
 * new inlet is dropped for the built-in one). p.solver.phaseProblem(T, P, flows) runs the
 * stability test on demand. Adiabatic converters: equilibrium-adiabatic.ts.
 */
import { R } from './constants.js';
import { gIG, hIG, outsideRange, P_STD } from './ideal-gas.js';
import { reactionSpace, type ReactionSpace } from './equilibrium-space.js';
import { stabilityTest } from './stability.js';
import { newLuWork, solveDense, type LuWork } from '../solve/linear.js';
import type { ComponentData, Eos } from './types.js';

/** One reaction to hold at equilibrium. */
export interface EquilibriumReaction {
  /** Stoichiometric coefficients over the equation of state's components (negative for reactants). */
  nu: ArrayLike<number>;
  /** Approach to equilibrium, K (>= 0; default 0). */
  approach?: number;
  /** Component whose conversion is reported (index), optional. */
  key?: number;
  /** How messages name the reaction, e.g. its equation. */
  label?: string;
}

export interface EquilibriumOptions {
  /** Converged when every |ln(Q_r/K_r)| <= tol (default 1e-11). */
  tol?: number;
  /** Newton iterations per solve (default 100). */
  maxIterations?: number;
  /** 'root' (default): the equation of state's root labels only; 'stability': also the tangent-plane test of the result. */
  phaseCheck?: 'root' | 'stability';
  /**
   * The fugacity-coefficient part of the Jacobian: 'chord' (default) differenced at the start of each
   * solve and held; 'lagged' left out; 'full' differenced at every iterate. The ideal gas has none.
   */
  jacobian?: 'chord' | 'lagged' | 'full';
}

/** A problem found when preparing: the reaction it belongs to (index; -1 for the set) and what to change. */
export interface EquilibriumProblem {
  reaction: number;
  /** Components concerned (indices), where there are any. */
  components?: number[];
  message: string;
  help?: string;
}

export type PreparedEquilibrium =
  | { status: 'ok'; solver: EquilibriumSolver }
  | { status: 'invalid'; problems: EquilibriumProblem[] };

/** What reaches the equilibrium reactions. SI: K, Pa, mol/s. */
export interface EquilibriumState {
  /** Reactor temperature, K. */
  T: number;
  /** Reactor pressure, Pa. */
  P: number;
  /** Component flows at the reactor inlet, mol/s (length n). */
  flows: ArrayLike<number>;
  /**
   * Net generation of the reactions at fixed conversion or extent, mol/s per component (sum over
   * those reactions of nu times extent), applied to the inlet before the equilibrium. Optional.
   */
  generation?: ArrayLike<number>;
  /** Extents to start from (the last pass's), mol/s per equilibrium reaction. Optional. */
  start?: ArrayLike<number>;
}

export type EquilibriumStatus = 'converged' | 'not-converged' | 'infeasible' | 'invalid';

/**
 * Why a result is not a plain converged one: 'bad-input' (T, P or flows not usable), 'no-temperature'
 * (an approach leaves no temperature above 0 K), 'shortfall' (the fixed generation takes more of a
 * component than reaches the reactor), 'not-gas' (liquid-like mixture), 'two-phase' (the stability
 * test finds a second phase), 'iterations' (budget spent), 'line-search' (no step lowers the residual),
 * 'singular' (the Jacobian cannot be factored), 'underflow' (a species went to zero in floating point).
 */
export type EquilibriumReason =
  | 'bad-input' | 'no-temperature' | 'shortfall' | 'not-gas' | 'two-phase' | 'iterations' | 'line-search' | 'singular' | 'underflow';

export interface EquilibriumResult {
  status: EquilibriumStatus;
  /** Set when status is not 'converged'. */
  reason: EquilibriumReason | null;
  /** What happened, for people: '' for a plain converged result; notes (a blocked reaction, an extrapolated Cp) otherwise. */
  message: string;
  /** Reactor T and P of the call, K and Pa. */
  T: number;
  P: number;
  /** Extent of each reaction, mol/s (0 for a reaction that cannot proceed). */
  extents: Float64Array;
  /** Outlet component flows, mol/s: inlet + generation + equilibrium reactions. */
  flows: Float64Array;
  /** ln K of each reaction at its equilibrium temperature (1 bar standard state). */
  lnK: Float64Array;
  /** Temperature each reaction is held at equilibrium of, K (T +/- approach). */
  Teq: Float64Array;
  /** Approach of each reaction as given, K (0 without one). */
  approach: Float64Array;
  /** Ideal-gas heat of each reaction at the reactor's T, J per mole of extent (negative: exothermic). */
  heat: Float64Array;
  /** Conversion of each reaction's key by that reaction: extent |nu_key| / inlet flow of the key (0 without key or inlet). */
  conversion: Float64Array;
  /** 1 where a reaction cannot proceed at all (it needs a component that reaches the reactor from no inlet and that no reaction forms): extent 0. */
  blocked: Uint8Array;
  /** 1 for each component held at zero: absent from the inlet and formed by no feasible combination of the reactions. */
  zero: Uint8Array;
  /** Largest |ln(Q_r/K_r)| at the extents returned (0 for a reaction held at its inlet, see solve()). */
  residual: number;
  /** Newton iterations, residual evaluations (each one equation-of-state call per equilibrium temperature), Jacobians with differenced fugacity coefficients. */
  iterations: number;
  evaluations: number;
  jacobians: number;
  /** Largest |F| before each iteration: history[0 .. historyLength - 1]. */
  history: Float64Array;
  historyLength: number;
  /** Phase of the converged mixture at the reactor's T and P, as far as it was checked. */
  phase: 'vapor' | 'liquid-like' | 'two-phase' | 'unchecked';
  /** Whether the extents came from `start` (warm) rather than the built-in start. */
  warm: boolean;
}

/** K of a reaction from a result: exp(lnK). */
export function equilibriumConstant(r: EquilibriumResult, reaction: number): number {
  return Math.exp(r.lnK[reaction]);
}

/** ln K at T (1 bar standard state) of coefficients nu over components: -sum nu_i g_i(T) / (R T). Data must be present. */
export function lnKAt(components: readonly ComponentData[], nu: ArrayLike<number>, T: number): number {
  let g = 0;
  for (let i = 0; i < components.length; i++) if (nu[i] !== 0) g += nu[i] * gIG(components[i], T);
  return -g / (R * T);
}

/** Ideal-gas heat of reaction at T, J per mole of extent: sum nu_i h_i(T) on the formation basis. Data must be present. */
export function reactionHeat(components: readonly ComponentData[], nu: ArrayLike<number>, T: number): number {
  let h = 0;
  for (let i = 0; i < components.length; i++) if (nu[i] !== 0) h += nu[i] * hIG(components[i], T);
  return h;
}

/**
 * Said when a solve stops at the resolution of the flows before |ln(Q/K)| reaches tol: a species
 * nearly used up is the difference of two nearly equal sums, so its logarithm carries rounding
 * that no step can remove (e.g. benzene left at 2e-8 of its feed).
 */
const RESOLVED_NOTE =
  'a species is nearly used up: its amount is resolved only to the rounding of the flows, so ln(Q/K) is left above the tolerance (see `residual`); the flows are exact to that rounding';

/** Machine epsilons per term in the rounding noise of a residual. */
const ROUNDING = 8 * Number.EPSILON;
/** Fraction of the distance to the boundary that a step may go. */
const TO_BOUNDARY = 0.99;
/** Fraction of its scarcest reactant that a reaction takes in the built-in start. */
const START_FRACTION = 0.1;
/** Smallest pivot of the scaled Newton matrix, relative to its largest, before it counts as singular. */
const PIVOT_RATIO = 1e-13;
/** Armijo constant of the line search. */
const ARMIJO = 1e-4;
/** Halvings of a step before the line search gives up. */
const MAX_HALVINGS = 40;

/**
 * Checks the reactions (data, approach, independence) and prepares a solver for them.
 * One problem per reaction and fault; nothing is thrown for a user's mistake.
 */
export function prepareEquilibrium(eos: Eos, reactions: readonly EquilibriumReaction[], options: EquilibriumOptions = {}): PreparedEquilibrium {
  const comps = eos.components;
  const n = eos.n;
  const problems: EquilibriumProblem[] = [];
  const label = (r: number) => reactions[r].label ?? `reaction ${r + 1}`;
  const names: Record<string, string> = { cp: 'ideal-gas heat capacity (cp)', hf: 'enthalpy of formation (hf)', gf: 'Gibbs energy of formation (gf)' };
  if (reactions.length === 0) problems.push({ reaction: -1, message: 'no reaction is held at equilibrium', help: 'give at least one reaction with `equilibrium: true`' });
  reactions.forEach((rx, r) => {
    if (rx.nu.length !== n) {
      problems.push({ reaction: r, message: `${label(r)} has ${rx.nu.length} coefficients for ${n} components` });
      return;
    }
    let any = false;
    for (let i = 0; i < n; i++) {
      if (!Number.isFinite(rx.nu[i])) {
        problems.push({ reaction: r, message: `${label(r)}: the coefficient of ${comps[i].id} is not a finite number` });
        return;
      }
      if (rx.nu[i] !== 0) any = true;
    }
    if (!any) problems.push({ reaction: r, message: `${label(r)} changes nothing (every coefficient is zero)` });
    const a = rx.approach ?? 0;
    if (!(a >= 0) || !Number.isFinite(a)) {
      problems.push({ reaction: r, message: `the approach of ${label(r)} is ${a} K; it must be zero or a positive temperature difference`, help: 'for example `approach: 20 K` (held at the equilibrium of T + 20 K when exothermic, T - 20 K when endothermic)' });
    }
    if (rx.key !== undefined && !(Number.isInteger(rx.key) && rx.key >= 0 && rx.key < n)) {
      problems.push({ reaction: r, message: `${label(r)}: key ${rx.key} is not a component index` });
    }
    const lacking: number[] = [];
    const what: string[] = [];
    for (let i = 0; i < n; i++) {
      if (rx.nu[i] === 0) continue;
      const c = comps[i];
      const fields: string[] = [];
      if (c.cp === undefined || c.cp.pieces.length === 0) fields.push('cp');
      if (c.hf === undefined || !Number.isFinite(c.hf)) fields.push('hf');
      if (c.gf === undefined || !Number.isFinite(c.gf)) fields.push('gf');
      if (fields.length > 0) {
        lacking.push(i);
        what.push(`${c.id} has no ${fields.map((f) => names[f]).join(', no ')}`);
      }
    }
    if (lacking.length > 0) {
      problems.push({
        reaction: r,
        components: lacking,
        message: `${label(r)} cannot be held at equilibrium: ${what.join('; ')} (K(T) needs cp, hf and gf of every species of the reaction)`,
        help: 'use built-in components (every built-in row carries these data), or give this reaction a fixed `conversion` or `extent` instead',
      });
    }
  });
  if (problems.length === 0) {
    // Independence: modified Gram-Schmidt over the rows in order; a row that reduces to nothing
    // is a combination of the rows before it.
    const basis: Float64Array[] = [];
    const which: number[] = [];
    reactions.forEach((rx, r) => {
      const v = Float64Array.from(rx.nu);
      let norm0 = 0;
      for (let i = 0; i < n; i++) norm0 += v[i] * v[i];
      for (const q of basis) {
        let d = 0;
        for (let i = 0; i < n; i++) d += v[i] * q[i];
        for (let i = 0; i < n; i++) v[i] -= d * q[i];
      }
      let norm = 0;
      for (let i = 0; i < n; i++) norm += v[i] * v[i];
      if (norm <= 1e-20 * norm0) {
        problems.push({
          reaction: r,
          message: `${label(r)} is a combination of ${which.map((k) => label(k)).join(', ')}: at equilibrium it adds nothing and its extent is not defined`,
          help: 'remove it: the equilibrium of the others already holds it',
        });
        return;
      }
      const s = 1 / Math.sqrt(norm);
      for (let i = 0; i < n; i++) v[i] *= s;
      basis.push(v);
      which.push(r);
    });
  }
  if (problems.length > 0) return { status: 'invalid', problems };
  return { status: 'ok', solver: new EquilibriumSolver(eos, reactions, options) };
}

/**
 * Equilibrium of a fixed set of reactions over one equation of state's components. Owns its
 * scratch arrays: one solver per reactor, used by one caller at a time.
 */
export class EquilibriumSolver {
  readonly n: number;
  /** Number of reactions. */
  readonly m: number;
  readonly eos: Eos;
  readonly labels: readonly string[];
  private readonly comps: readonly ComponentData[];
  private readonly tol: number;
  private readonly maxIt: number;
  private readonly stability: boolean;
  private readonly jacobianMode: 'chord' | 'lagged' | 'full';
  /** nu, row-major m x n; per reaction its species flat: sp[spStart[r] .. spStart[r+1]) with their coefficients spNu. */
  private readonly nu: Float64Array;
  private readonly sp: Int32Array;
  private readonly spNu: Float64Array;
  private readonly spStart: Int32Array;
  private readonly approach: Float64Array;
  private readonly keys: Int32Array;
  /** Components that some reaction involves. */
  private readonly involved: Uint8Array;
  // lnK and heat caches per reaction (last temperatures)
  private readonly kT: Float64Array;
  private readonly kVal: Float64Array;
  private readonly hT: Float64Array;
  private readonly hVal: Float64Array;
  /** lnK of each reaction at its equilibrium temperature in the current solve. */
  private readonly lnK: Float64Array;
  // The feasible space, kept while the set of absent species stays the same.
  private readonly absent: Uint8Array;
  private space: ReactionSpace;
  private spaceKnown = false;
  /** Per reaction: 1 when it moves in the feasible space (its row of the basis is not zero). */
  private readonly active: Uint8Array;
  private identity = true;
  private blockedText = '';
  // per-call scratch
  private readonly b: Float64Array;
  private readonly group: Int32Array;
  private readonly groupT: Float64Array;
  private nGroups = 0;
  private readonly x: Float64Array;
  private readonly xt: Float64Array;
  private readonly dxi: Float64Array;
  private readonly eta: Float64Array;
  private readonly deta: Float64Array;
  private readonly nm: Float64Array;
  private readonly nt: Float64Array;
  private readonly y: Float64Array;
  private readonly F: Float64Array;
  private readonly Ft: Float64Array;
  private readonly G: Float64Array;
  private readonly Gt: Float64Array;
  private readonly trialEta: Float64Array;
  /** Rounding noise of F (per reaction) and of G at the current iterate and at a trial; size of the sum giving each amount. */
  private readonly noiseF: Float64Array;
  private readonly noiseG: Float64Array;
  private readonly noiseGt: Float64Array;
  private readonly size: Float64Array;
  private readonly scale: Float64Array;
  /** LU work of the Newton steps, by order (the reactions active in the step). */
  private readonly lu: (LuWork | undefined)[] = [];
  private readonly J: Float64Array;
  private readonly JB: Float64Array;
  private readonly Jr: Float64Array;
  /** The held fugacity part of the reduced Jacobian (d x d). */
  private readonly Jphi: Float64Array;
  /** ln phi per group: the current iterate's, a trial's, a differenced one's (one view per group, made once). */
  private readonly lnPhi: Float64Array[];
  private readonly lnPhiT: Float64Array[];
  private readonly lnPhiD: Float64Array[];
  private readonly phiScratch: Float64Array;
  /**
   * Per reaction, the direction it runs in the current solve, which decides the side of its
   * approach: 1 forward (as written), -1 backward, 0 held at the reactor's own T (no approach).
   */
  private readonly dir: Int8Array;
  /** The extents of one pass of solve() as the start of the next. */
  private readonly passStart: Float64Array;
  private lnP = 0;
  /** Largest |G| found by the last merit() call. */
  private maxAbs = 0;
  /** Why the last evaluate failed: 0 ok, 1 not a gas, 2 a species not positive. */
  private evalFault = 0;
  private faultT = 0;
  private faultRoot: 'liquid-like' | 'three-roots' = 'liquid-like';

  constructor(eos: Eos, reactions: readonly EquilibriumReaction[], options: EquilibriumOptions = {}) {
    const n = eos.n;
    const m = reactions.length;
    this.n = n;
    this.m = m;
    this.eos = eos;
    this.comps = eos.components;
    this.labels = reactions.map((rx, r) => rx.label ?? `reaction ${r + 1}`);
    this.tol = options.tol ?? 1e-11;
    this.maxIt = options.maxIterations ?? 100;
    this.stability = options.phaseCheck === 'stability';
    this.jacobianMode = eos.name === 'ideal' ? 'lagged' : options.jacobian ?? 'chord';
    this.nu = new Float64Array(m * n);
    this.approach = new Float64Array(m);
    this.keys = new Int32Array(m).fill(-1);
    this.involved = new Uint8Array(n);
    this.spStart = new Int32Array(m + 1);
    const sp: number[] = [];
    const spNu: number[] = [];
    for (let r = 0; r < m; r++) {
      const rx = reactions[r];
      this.spStart[r] = sp.length;
      for (let i = 0; i < n; i++) {
        const v = rx.nu[i];
        this.nu[r * n + i] = v;
        if (v !== 0) {
          sp.push(i);
          spNu.push(v);
          this.involved[i] = 1;
        }
      }
      this.approach[r] = rx.approach ?? 0;
      if (rx.key !== undefined) this.keys[r] = rx.key;
    }
    this.spStart[m] = sp.length;
    this.sp = Int32Array.from(sp);
    this.spNu = Float64Array.from(spNu);
    this.kT = new Float64Array(m).fill(Number.NaN);
    this.kVal = new Float64Array(m);
    this.hT = new Float64Array(m).fill(Number.NaN);
    this.hVal = new Float64Array(m);
    this.lnK = new Float64Array(m);
    this.absent = new Uint8Array(n);
    this.space = { zero: new Uint8Array(n), basis: new Float64Array(0), d: 0, direction: new Float64Array(m) };
    this.active = new Uint8Array(m);
    this.b = new Float64Array(n);
    this.group = new Int32Array(m);
    this.groupT = new Float64Array(m);
    this.x = new Float64Array(m);
    this.xt = new Float64Array(m);
    this.dxi = new Float64Array(m);
    this.eta = new Float64Array(m);
    this.deta = new Float64Array(m);
    this.nm = new Float64Array(n);
    this.nt = new Float64Array(n);
    this.y = new Float64Array(n);
    this.F = new Float64Array(m);
    this.Ft = new Float64Array(m);
    this.G = new Float64Array(m);
    this.Gt = new Float64Array(m);
    this.trialEta = new Float64Array(m);
    this.noiseF = new Float64Array(m);
    this.noiseG = new Float64Array(m);
    this.noiseGt = new Float64Array(m);
    this.size = new Float64Array(n);
    this.scale = new Float64Array(m);
    this.J = new Float64Array(m * m);
    this.JB = new Float64Array(m * m);
    this.Jr = new Float64Array(m * m);
    this.Jphi = new Float64Array(m * m);
    const rows = () => {
      const buf = new Float64Array(m * n);
      return Array.from({ length: m }, (_, g) => buf.subarray(g * n, g * n + n));
    };
    this.lnPhi = rows();
    this.lnPhiT = rows();
    this.lnPhiD = rows();
    this.phiScratch = new Float64Array(n);
    this.dir = new Int8Array(m).fill(1);
    this.passStart = new Float64Array(m);
  }

  /** A result object sized for this solver, to pass to solve() again and again. */
  newResult(): EquilibriumResult {
    const m = this.m;
    return {
      status: 'invalid', reason: null, message: '', T: Number.NaN, P: Number.NaN,
      extents: new Float64Array(m), flows: new Float64Array(this.n), lnK: new Float64Array(m), Teq: new Float64Array(m),
      approach: Float64Array.from(this.approach), heat: new Float64Array(m), conversion: new Float64Array(m), blocked: new Uint8Array(m),
      zero: new Uint8Array(this.n), residual: Number.NaN, iterations: 0, evaluations: 0, jacobians: 0,
      history: new Float64Array(this.maxIt + 1), historyLength: 0, phase: 'unchecked', warm: false,
    };
  }

  /** ln K of reaction r at T (1 bar standard state), cached for the last T of that reaction. */
  lnKAt(r: number, T: number): number {
    if (this.kT[r] !== T) {
      let g = 0;
      for (let q = this.spStart[r]; q < this.spStart[r + 1]; q++) g += this.spNu[q] * gIG(this.comps[this.sp[q]], T);
      this.kVal[r] = -g / (R * T);
      this.kT[r] = T;
    }
    return this.kVal[r];
  }

  /** Ideal-gas heat of reaction r at T, J per mole of extent, cached for the last T. */
  heatAt(r: number, T: number): number {
    if (this.hT[r] !== T) {
      let h = 0;
      for (let q = this.spStart[r]; q < this.spStart[r + 1]; q++) h += this.spNu[q] * hIG(this.comps[this.sp[q]], T);
      this.hVal[r] = h;
      this.hT[r] = T;
    }
    return this.hVal[r];
  }

  /**
   * Solves the equilibrium of `state` into `out` (a newResult() object) and returns it.
   *
   * The side of an approach follows the direction the reaction runs: a reaction with an approach
   * is first taken to run forward (as written). When one of them comes out with a negative extent,
   * the direction of each reaction is that of its extent at the equilibrium of the reactor's own T
   * (a second solve without approaches), and the equilibrium is solved again with each approach on
   * that side: a reaction running backwards has the heat of the reverse reaction, so an exothermic
   * reaction as written that runs backwards is held at the equilibrium of T - approach. Either way
   * its outlet stays short of the equilibrium of T, on the side it came from (Q_r/K_r(T) below 1
   * forward, above 1 backward), never beyond it. A single reaction whose inlet lies within its
   * approach of the equilibrium of T does not run (extent 0, with a note).
   */
  solve(state: EquilibriumState, out: EquilibriumResult = this.newResult()): EquilibriumResult {
    const m = this.m;
    this.dir.fill(1);
    this.solveOnce(state, out);
    if (out.status !== 'converged') return out;
    let backward = false;
    for (let r = 0; r < m; r++) if (this.approach[r] > 0 && out.extents[r] < 0) backward = true;
    if (!backward) return out;
    const warm = out.warm;
    let iterations = out.iterations;
    let evaluations = out.evaluations;
    let jacobians = out.jacobians;
    const again = (): void => {
      this.passStart.set(out.extents);
      this.solveOnce({ T: state.T, P: state.P, flows: state.flows, generation: state.generation, start: this.passStart }, out);
      iterations += out.iterations;
      evaluations += out.evaluations;
      jacobians += out.jacobians;
      out.iterations = iterations;
      out.evaluations = evaluations;
      out.jacobians = jacobians;
      out.warm = warm;
    };
    // The direction each reaction runs: its extent at the equilibrium of T.
    this.dir.fill(0);
    again();
    if (out.status !== 'converged') return out;
    for (let r = 0; r < m; r++) this.dir[r] = out.extents[r] < 0 ? -1 : 1;
    again();
    if (out.status !== 'converged') return out;
    // One reaction fed at, or within its approach of, the equilibrium of T (the gas of a bed at
    // equilibrium passed to a second bed at the same T): the equilibrium of T +/- approach lies on
    // the far side of its inlet, and reaching it would take the reaction against the direction it
    // runs at T, past that equilibrium. It does not run: extent 0. (With several reactions the
    // same case is not held; their extents are those of the equilibrium temperatures.)
    if (m === 1 && this.approach[0] > 0 && out.extents[0] * this.dir[0] < 0) {
      out.extents[0] = 0;
      out.conversion[0] = 0;
      out.flows.set(this.b);
      out.residual = 0;
      out.message = joinNotes(out.message,
        `${this.labels[0]} reaches the reactor within its approach of the equilibrium of ${fmt(state.T)} K (the equilibrium of ${fmt(out.Teq[0])} K lies on the other side of its inlet), so it does not run: extent 0`);
    }
    return out;
  }

  private solveOnce(state: EquilibriumState, out: EquilibriumResult): EquilibriumResult {
    const n = this.n;
    const m = this.m;
    const { T, P } = state;
    out.T = T;
    out.P = P;
    out.status = 'converged';
    out.reason = null;
    out.message = '';
    out.residual = 0;
    out.iterations = 0;
    out.evaluations = 0;
    out.jacobians = 0;
    out.historyLength = 0;
    out.phase = 'unchecked';
    out.warm = false;
    out.extents.fill(0);
    out.conversion.fill(0);
    out.blocked.fill(0);
    out.zero.fill(0);
    out.approach.set(this.approach);
    out.flows.fill(0);

    // Inputs.
    if (!(T > 0) || !Number.isFinite(T) || !(P > 0) || !Number.isFinite(P)) {
      return this.fail(out, 'invalid', 'bad-input', `equilibrium needs a finite positive temperature and pressure, got T = ${T} K, P = ${P} Pa`);
    }
    const flows = state.flows;
    const gen = state.generation;
    if (flows.length !== n || (gen !== undefined && gen.length !== n)) {
      return this.fail(out, 'invalid', 'bad-input', `equilibrium: flows (and generation) must have ${n} entries`);
    }
    const b = this.b;
    let scale = 0;
    for (let i = 0; i < n; i++) {
      const f = flows[i];
      if (!(f >= 0) || f === Infinity) return this.fail(out, 'invalid', 'bad-input', `equilibrium: the inlet flow of ${this.comps[i].id} is ${f} mol/s; flows must be finite and not negative`);
      const g = gen === undefined ? 0 : gen[i];
      if (!Number.isFinite(g)) return this.fail(out, 'invalid', 'bad-input', `equilibrium: the fixed generation of ${this.comps[i].id} is ${g} mol/s`);
      b[i] = f + g;
      scale += f;
    }
    for (let i = 0; i < n; i++) {
      if (b[i] < 0) {
        if (b[i] >= -1e-12 * scale) {
          b[i] = 0;
          continue;
        }
        out.flows.set(b);
        return this.fail(out, 'infeasible', 'shortfall',
          `the reactions at fixed conversion take ${fmt(-(gen![i]))} mol/s of ${this.comps[i].id}, but only ${fmt(flows[i])} mol/s reaches the reactor`);
      }
    }
    out.flows.set(b);

    // K at each reaction's equilibrium temperature.
    for (let r = 0; r < m; r++) {
      const h = this.heatAt(r, T);
      out.heat[r] = h;
      const a = this.approach[r];
      const d = this.dir[r];
      const Te = a === 0 || d === 0 ? T : h * d < 0 ? T + a : T - a;
      out.Teq[r] = Te;
      if (!(Te > 0)) {
        return this.fail(out, 'invalid', 'no-temperature',
          `${this.labels[r]} is endothermic${d < 0 ? ' in the direction it runs here (backwards)' : ''} at ${fmt(T)} K, so its approach of ${fmt(a)} K would hold it at the equilibrium of ${fmt(Te)} K, which is not a temperature`);
      }
      this.lnK[r] = this.lnKAt(r, Te);
      out.lnK[r] = this.lnK[r];
    }

    let total = 0;
    for (let i = 0; i < n; i++) total += b[i];
    if (!(total > 0)) {
      out.message = 'no flow reaches the reactor: every extent is zero';
      return out;
    }
    // Which species can be present, and the extents that move.
    this.analyse();
    const sp = this.space;
    out.zero.set(sp.zero);
    for (let r = 0; r < m; r++) out.blocked[r] = this.active[r] ? 0 : 1;
    out.message = this.blockedText;
    if (sp.d === 0) return out;
    this.lnP = Math.log(P / P_STD);
    this.setGroups(out.Teq);

    // Start.
    if (state.start !== undefined && state.start.length === m && this.warmStart(state.start)) {
      out.warm = true;
    } else {
      this.coldStart();
    }

    if (this.newton(out, P)) return out;

    // Outlet and figures.
    this.writeExtents(out);
    for (let r = 0; r < m; r++) {
      const k = this.keys[r];
      if (k >= 0 && flows[k] > 0) out.conversion[r] = (out.extents[r] * -this.nu[r * n + k]) / flows[k];
    }
    // Phase at the reactor's own T (the iterates were checked at the equilibrium temperatures).
    let atT = false;
    for (let g = 0; g < this.nGroups; g++) if (this.groupT[g] === T) atT = true;
    if (!atT && !this.isGas(T, P, this.y, this.phiScratch)) {
      return this.fail(out, 'infeasible', 'not-gas', this.notGasText(T, P, 'the equilibrium mixture'));
    }
    out.phase = 'vapor';
    if (this.stability) {
      const s = stabilityTest(this.eos, T, P, this.y);
      if (!s.stable) {
        out.phase = 'two-phase';
        return this.fail(out, 'infeasible', 'two-phase',
          `at ${fmt(T)} K and ${fmt(P / 1e5)} bar the equilibrium mixture would condense (the tangent-plane test finds a second phase, tpd = ${s.tpd.toPrecision(3)}); the converter model is gas-phase`,
          'raise the temperature or lower the pressure of the converter');
      }
    }
    // Heat-capacity correlations extrapolated.
    for (let r = 0; r < m; r++) {
      for (let q = this.spStart[r]; q < this.spStart[r + 1]; q++) {
        const c = this.comps[this.sp[q]];
        if (outsideRange(c, out.Teq[r])) {
          out.message = joinNotes(out.message, `${fmt(out.Teq[r])} K is outside the heat-capacity range of ${c.id}: K of ${this.labels[r]} is extrapolated`);
        }
      }
    }
    return out;
  }

  /**
   * Whether a mixture leaving the converter at T (K), P (Pa) with these flows (mol/s) is one gas
   * phase: null when it is, else what is wrong. The root labels and the tangent-plane stability
   * test (some tens of equation-of-state calls), for a caller that solves with phaseCheck 'root'
   * on every pass to run once on the converged state. Allocates.
   */
  phaseProblem(T: number, P: number, flows: ArrayLike<number>): string | null {
    const n = this.n;
    const nv = new Float64Array(n);
    for (let i = 0; i < n; i++) nv[i] = flows[i] > 0 ? flows[i] : 0;
    const y = new Float64Array(n);
    let N = 0;
    for (let i = 0; i < n; i++) N += nv[i];
    if (!(N > 0)) return null;
    for (let i = 0; i < n; i++) y[i] = nv[i] / N;
    if (!this.isGas(T, P, y, new Float64Array(n))) return this.notGasText(T, P, 'the converter outlet');
    const s = stabilityTest(this.eos, T, P, y);
    if (!s.stable) {
      return `at ${fmt(T)} K and ${fmt(P / 1e5)} bar the converter outlet would condense (the tangent-plane test finds a second phase, tpd = ${s.tpd.toPrecision(3)}); the converter model is gas-phase`;
    }
    return null;
  }

  /** The feasible space for the absent species of this call; computed again only when they change. */
  private analyse(): void {
    const { n, m, b, involved, absent } = this;
    let same = this.spaceKnown;
    for (let i = 0; i < n; i++) {
      const a = involved[i] && !(b[i] > 0) ? 1 : 0;
      if (a !== absent[i]) same = false;
      absent[i] = a;
    }
    if (same) return;
    const s = reactionSpace(this.nu, m, n, absent);
    this.space = s;
    this.spaceKnown = true;
    this.identity = s.d === m;
    for (let r = 0; r < m; r++) {
      let any = false;
      for (let k = 0; k < s.d; k++) if (s.basis[r * s.d + k] !== 0) any = true;
      this.active[r] = any ? 1 : 0;
    }
    // The message, made here once for this set of absent species.
    const parts: string[] = [];
    const ids = (list: number[]) => list.map((i) => this.comps[i].id).join(', ');
    for (let r = 0; r < m; r++) {
      if (this.active[r]) continue;
      const held: number[] = [];
      for (let q = this.spStart[r]; q < this.spStart[r + 1]; q++) if (s.zero[this.sp[q]]) held.push(this.sp[q]);
      parts.push(`${this.labels[r]} cannot proceed: ${ids(held)} ${held.length > 1 ? 'reach' : 'reaches'} the reactor from no inlet and no reaction can form ${held.length > 1 ? 'them' : 'it'}, so its extent is zero`);
    }
    const heldOnly: number[] = [];
    for (let i = 0; i < n; i++) {
      if (!s.zero[i]) continue;
      let inActive = false;
      for (let r = 0; r < m; r++) if (this.active[r] && this.nu[r * n + i] !== 0) inActive = true;
      if (inActive) heldOnly.push(i);
    }
    if (heldOnly.length > 0) {
      parts.push(`${ids(heldOnly)} ${heldOnly.length > 1 ? 'reach' : 'reaches'} the reactor from no inlet, and no combination of the reactions forms ${heldOnly.length > 1 ? 'them' : 'it'} without using ${heldOnly.length > 1 ? 'them' : 'it'} up again: ${heldOnly.length > 1 ? 'they stay' : 'it stays'} at zero, and the reactions proceed only in combinations that leave ${heldOnly.length > 1 ? 'them' : 'it'} out`);
    }
    this.blockedText = parts.join('; ');
  }

  /** Groups the active reactions by equilibrium temperature (one equation-of-state call per group). */
  private setGroups(Teq: Float64Array): void {
    this.nGroups = 0;
    for (let r = 0; r < this.m; r++) {
      if (!this.active[r]) continue;
      let g = 0;
      while (g < this.nGroups && this.groupT[g] !== Teq[r]) g++;
      if (g === this.nGroups) this.groupT[this.nGroups++] = Teq[r];
      this.group[r] = g;
    }
  }

  /** xi = B eta (exactly zero for reactions that do not move). */
  private extentsOf(eta: Float64Array, xi: Float64Array): void {
    const { m } = this;
    if (this.identity) {
      for (let r = 0; r < m; r++) xi[r] = eta[r];
      return;
    }
    const { basis, d } = this.space;
    for (let r = 0; r < m; r++) {
      let s = 0;
      for (let k = 0; k < d; k++) s += basis[r * d + k] * eta[k];
      xi[r] = s;
    }
  }

  /** n = b + sum_r nu_r xi_r; components held at zero are set to exactly zero. */
  private composition(xi: Float64Array, nOut: Float64Array): void {
    const { sp, spNu, spStart } = this;
    nOut.set(this.b);
    for (let r = 0; r < this.m; r++) {
      const xr = xi[r];
      if (xr === 0) continue;
      for (let q = spStart[r]; q < spStart[r + 1]; q++) nOut[sp[q]] += spNu[q] * xr;
    }
    if (!this.identity) {
      const z = this.space.zero;
      for (let i = 0; i < this.n; i++) if (z[i]) nOut[i] = 0;
    }
  }

  /** Whether every species of an active reaction that is not held at zero is strictly positive. */
  private feasible(nv: Float64Array): boolean {
    const { sp, spStart, active } = this;
    const z = this.space.zero;
    for (let r = 0; r < this.m; r++) {
      if (!active[r]) continue;
      for (let q = spStart[r]; q < spStart[r + 1]; q++) {
        const i = sp[q];
        if (!(nv[i] > 0) && !z[i]) return false;
      }
    }
    return true;
  }

  /** eta = B^T start; accepted when B eta keeps every species positive. */
  private warmStart(start: ArrayLike<number>): boolean {
    const { m, eta, x } = this;
    const { basis, d } = this.space;
    for (let r = 0; r < m; r++) if (!Number.isFinite(start[r])) return false;
    for (let k = 0; k < d; k++) {
      let s = 0;
      for (let r = 0; r < m; r++) s += (this.identity ? (r === k ? 1 : 0) : basis[r * d + k]) * start[r];
      eta[k] = s;
    }
    this.extentsOf(eta, x);
    this.composition(x, this.nm);
    return this.feasible(this.nm);
  }

  /**
   * Start: a step along the programme's direction (which forms every absent species that can be
   * present) to a tenth of what its scarcest consumed species allows; no step when none is absent.
   */
  private coldStart(): void {
    const { m, n, eta, x, nm, b } = this;
    const { basis, d, direction } = this.space;
    let any = false;
    for (let r = 0; r < m; r++) if (direction[r] !== 0) any = true;
    let eps = 0;
    if (any) {
      let lim = Infinity;
      let big = 0;
      let total = 0;
      const z = this.space.zero;
      for (let i = 0; i < n; i++) {
        if (z[i]) continue;
        let dn = 0;
        for (let r = 0; r < m; r++) dn += this.nu[r * n + i] * direction[r];
        if (dn < 0) lim = Math.min(lim, b[i] / -dn);
        big = Math.max(big, Math.abs(dn));
        total += b[i];
      }
      eps = START_FRACTION * (Number.isFinite(lim) ? lim : total / big);
    }
    for (let r = 0; r < m; r++) x[r] = eps * direction[r];
    for (let k = 0; k < d; k++) {
      let s = 0;
      for (let r = 0; r < m; r++) s += (this.identity ? (r === k ? 1 : 0) : basis[r * d + k]) * x[r];
      eta[k] = s;
    }
    this.extentsOf(eta, x);
    this.composition(x, nm);
  }

  /** Mole fractions of nv into this.y; returns the total. */
  private fractions(nv: Float64Array): number {
    const { n, y } = this;
    let N = 0;
    for (let i = 0; i < n; i++) N += nv[i] > 0 ? nv[i] : 0;
    const inv = 1 / N;
    for (let i = 0; i < n; i++) y[i] = nv[i] > 0 ? nv[i] * inv : 0;
    return N;
  }

  /**
   * Residuals F (per reaction; species held at zero left out, their terms cancel in B^T F) and the
   * reduced residual G = B^T F at eta. Composition into nv, ln phi per group into lp. Returns false,
   * with evalFault set, when a species is not positive or the mixture is not a gas.
   */
  private evaluate(eta: Float64Array, xi: Float64Array, nv: Float64Array, lp: Float64Array[], F: Float64Array, G: Float64Array, noiseG: Float64Array, P: number): boolean {
    const { sp, spNu, spStart, y, m, n, active, noiseF, size } = this;
    const z = this.space.zero;
    this.extentsOf(eta, xi);
    this.composition(xi, nv);
    if (!this.feasible(nv)) {
      this.evalFault = 2;
      return false;
    }
    const N = this.fractions(nv);
    for (let g = 0; g < this.nGroups; g++) if (!this.isGas(this.groupT[g], P, y, lp[g])) return false;
    const lnN = Math.log(N);
    // Size of the sum that gives each amount (for the rounding in its logarithm).
    let sizeN = 0;
    for (let i = 0; i < n; i++) {
      let v = this.b[i];
      for (let r = 0; r < m; r++) {
        const c = this.nu[r * n + i];
        if (c !== 0) v += Math.abs(c * xi[r]);
      }
      size[i] = v;
      sizeN += v;
    }
    for (let r = 0; r < m; r++) {
      if (!active[r]) {
        F[r] = 0;
        noiseF[r] = 0;
        continue;
      }
      const phi = lp[this.group[r]];
      let s = 0;
      let dn = 0;
      let noise = Math.abs(this.lnK[r]);
      for (let q = spStart[r]; q < spStart[r + 1]; q++) {
        const i = sp[q];
        if (z[i]) continue;
        const ln = Math.log(nv[i]);
        s += spNu[q] * (ln + phi[i]);
        dn += spNu[q];
        noise += Math.abs(spNu[q]) * (size[i] / nv[i] + Math.abs(ln) + Math.abs(phi[i]));
      }
      F[r] = s + dn * (this.lnP - lnN) - this.lnK[r];
      noiseF[r] = ROUNDING * (noise + Math.abs(dn) * (Math.abs(this.lnP) + Math.abs(lnN) + sizeN / N));
    }
    this.reduce(F, G);
    this.reduceNoise(noiseF, noiseG);
    this.evalFault = 0;
    return true;
  }

  /** G = B^T F. */
  private reduce(F: Float64Array, G: Float64Array): void {
    const { m } = this;
    if (this.identity) {
      for (let r = 0; r < m; r++) G[r] = F[r];
      return;
    }
    const { basis, d } = this.space;
    for (let k = 0; k < d; k++) {
      let s = 0;
      for (let r = 0; r < m; r++) s += basis[r * d + k] * F[r];
      G[k] = s;
    }
  }

  /** noiseG = |B|^T noiseF. */
  private reduceNoise(noiseF: Float64Array, noiseG: Float64Array): void {
    const { m } = this;
    if (this.identity) {
      for (let r = 0; r < m; r++) noiseG[r] = noiseF[r];
      return;
    }
    const { basis, d } = this.space;
    for (let k = 0; k < d; k++) {
      let s = 0;
      for (let r = 0; r < m; r++) s += Math.abs(basis[r * d + k]) * noiseF[r];
      noiseG[k] = s;
    }
  }

  /** Whether every |G_k| lies within its rounding noise. */
  private withinNoise(G: Float64Array, noiseG: Float64Array): boolean {
    for (let k = 0; k < this.space.d; k++) if (!(Math.abs(G[k]) <= noiseG[k])) return false;
    return true;
  }

  /** ln phi of y at T, P on the vapor root into out; false (with the fault noted) when the mixture is not a gas. */
  private isGas(T: number, P: number, y: Float64Array, out: Float64Array): boolean {
    let liquid: 'liquid-like' | 'three-roots' | null = null;
    try {
      const root = this.eos.lnPhi(T, P, y, 'vapor', out);
      if (root.root === 'liquid') liquid = 'liquid-like';
      else if (root.nRoots === 3 && this.eos.z(T, P, y, 'stable').root === 'liquid') liquid = 'three-roots';
    } catch (e) {
      if (!(e instanceof RangeError)) throw e;
      liquid = 'liquid-like';
    }
    if (liquid === null) return true;
    this.evalFault = 1;
    this.faultT = T;
    this.faultRoot = liquid;
    return false;
  }

  private notGasText(T: number, P: number, what: string): string {
    const why = this.faultRoot === 'three-roots'
      ? 'the equation of state finds a liquid root of lower Gibbs energy than the vapor one'
      : 'the equation of state finds it liquid-like, denser than its pseudo-critical volume below its pseudo-critical temperature';
    return `${what} at ${fmt(T)} K and ${fmt(P / 1e5)} bar is not a gas (${why}); the converter model is gas-phase, so there is no equilibrium to report`;
  }

  /**
   * Half the sum of squares of G beyond its rounding noise (|G_k| - noise_k where positive), so that
   * a residual already at its rounding does not hide the progress of the others; the largest |G_k|
   * into this.maxAbs.
   */
  private merit(G: Float64Array, noiseG: Float64Array): number {
    let s = 0;
    let big = 0;
    for (let k = 0; k < this.space.d; k++) {
      const a = Math.abs(G[k]);
      const e = a - noiseG[k];
      if (e > 0) s += e * e;
      else if (Number.isNaN(e)) s = Number.NaN;
      if (!(a <= big)) big = a;
    }
    this.maxAbs = big;
    return 0.5 * s;
  }

  /** Newton iterations on eta from this.eta. Returns true when out now holds a failure. */
  private newton(out: EquilibriumResult, P: number): boolean {
    const { m, n, eta, deta, x, xt, dxi, nm, nt, F, Ft, G, Jr, Jphi, sp, spStart, active } = this;
    const d = this.space.d;
    const z = this.space.zero;
    out.evaluations++;
    if (!this.evaluate(eta, x, nm, this.lnPhi, F, G, this.noiseG, P)) {
      this.writeExtents(out);
      if (this.evalFault === 1) {
        this.fail(out, 'infeasible', 'not-gas', this.notGasText(this.faultT, P, out.warm ? 'the mixture at the last extents' : 'the reactor inlet'));
      } else {
        this.fail(out, 'not-converged', 'underflow', 'no start inside the feasible region was found (a species of a reaction has no positive amount there)');
      }
      return true;
    }
    let f = this.merit(G, this.noiseG);
    const mode = this.jacobianMode;
    let phiPart = false;
    let freshPhiPart = false;
    const trialEta = this.trialEta;
    for (let it = 0; ; it++) {
      out.history[out.historyLength++] = this.maxAbs;
      out.residual = this.maxAbs;
      if (this.maxAbs <= this.tol) return false;
      if (this.withinNoise(G, this.noiseG)) {
        // At the resolution of the flows: what is left of |ln(Q/K)| is rounding.
        out.message = joinNotes(out.message, RESOLVED_NOTE);
        return false;
      }
      if (it >= this.maxIt) {
        this.writeExtents(out);
        if (!this.condenses(out, P)) this.fail(out, 'not-converged', 'iterations', `equilibrium did not converge in ${this.maxIt} Newton iterations (largest |ln(Q/K)| ${this.maxAbs.toPrecision(3)})`);
        return true;
      }
      if (mode === 'full' || (mode === 'chord' && !phiPart)) {
        this.fugacityJacobian(P, out);
        phiPart = true;
        freshPhiPart = true;
      }
      this.reducedJacobian();
      if (phiPart) for (let k = 0; k < d * d; k++) Jr[k] += Jphi[k];
      for (let k = 0; k < d; k++) deta[k] = -G[k];
      if (!luSolve(Jr, deta, d, this.scale, (this.lu[d] ??= newLuWork(d)))) {
        this.writeExtents(out);
        if (!this.condenses(out, P)) this.fail(out, 'not-converged', 'singular', 'the equilibrium Jacobian is singular at the current extents');
        return true;
      }
      this.extentsOf(deta, dxi);
      // Fraction to the boundary, over the species of the active reactions.
      let amax = 1;
      for (let r = 0; r < m; r++) {
        if (!active[r]) continue;
        for (let q = spStart[r]; q < spStart[r + 1]; q++) {
          const i = sp[q];
          if (z[i]) continue;
          let dn = 0;
          for (let r2 = 0; r2 < m; r2++) {
            const c = this.nu[r2 * n + i];
            if (c !== 0) dn += c * dxi[r2];
          }
          if (dn < 0) amax = Math.min(amax, (TO_BOUNDARY * nm[i]) / -dn);
        }
      }
      let alpha = amax;
      let accepted = false;
      let sawNotGas = false;
      for (let h = 0; h < MAX_HALVINGS; h++) {
        for (let k = 0; k < d; k++) trialEta[k] = eta[k] + alpha * deta[k];
        out.evaluations++;
        if (this.evaluate(trialEta, xt, nt, this.lnPhiT, Ft, this.Gt, this.noiseGt, P)) {
          const ft = this.merit(this.Gt, this.noiseGt);
          if (ft <= (1 - 2 * ARMIJO * alpha) * f) {
            accepted = true;
            f = ft;
            break;
          }
        } else if (this.evalFault === 1) {
          sawNotGas = true;
        }
        alpha *= 0.5;
      }
      if (!accepted) {
        this.merit(G, this.noiseG);
        this.fractions(nm);
        if (mode !== 'full' && !freshPhiPart) {
          // Difference the fugacity part afresh here (or for the first time, when lagged) and try again.
          this.fugacityJacobian(P, out);
          phiPart = true;
          freshPhiPart = true;
          continue;
        }
        this.writeExtents(out);
        if (sawNotGas) this.fail(out, 'infeasible', 'not-gas', this.notGasText(this.faultT, P, 'the mixture on the way to equilibrium'));
        else if (!this.condenses(out, P)) this.fail(out, 'not-converged', 'line-search', `no step along Newton's direction lowers the equilibrium residual (largest |ln(Q/K)| ${this.maxAbs.toPrecision(3)})`);
        return true;
      }
      out.iterations++;
      // A held fugacity part that no longer gives fast convergence is differenced again.
      if (mode === 'chord' && this.maxAbs > 0.25 * out.history[out.historyLength - 1]) phiPart = false;
      freshPhiPart = false;
      eta.set(trialEta);
      x.set(xt);
      nm.set(nt);
      F.set(Ft);
      G.set(this.Gt);
      this.noiseG.set(this.noiseGt);
      for (let g = 0; g < this.nGroups; g++) this.lnPhi[g].set(this.lnPhiT[g]);
    }
  }

  /**
   * After a failed solve: whether the last iterate would condense at one of the equilibrium
   * temperatures (tangent-plane test). If so, out says that no gas-phase equilibrium was found
   * there (a dense, water- or methanol-rich state on which the vapor root gives no usable answer).
   */
  private condenses(out: EquilibriumResult, P: number): boolean {
    this.fractions(this.nm);
    for (let g = 0; g < this.nGroups; g++) {
      const T = this.groupT[g];
      let stable = true;
      try {
        stable = stabilityTest(this.eos, T, P, this.y).stable;
      } catch (e) {
        if (!(e instanceof RangeError)) throw e;
      }
      if (!stable) {
        out.phase = 'two-phase';
        this.fail(out, 'infeasible', 'two-phase',
          `on the way to equilibrium the mixture at ${fmt(T)} K and ${fmt(P / 1e5)} bar would condense (the tangent-plane test finds a second phase): no gas-phase equilibrium was found there, and the converter model is gas-phase`,
          'raise the temperature or lower the pressure of the converter');
        return true;
      }
    }
    return false;
  }

  /** Extents and flows of the current iterate into out. */
  private writeExtents(out: EquilibriumResult): void {
    this.extentsOf(this.eta, this.x);
    for (let r = 0; r < this.m; r++) out.extents[r] = this.active[r] ? this.x[r] : 0;
    this.composition(this.x, out.flows);
  }

  /** Jr = B^T J B (d x d), with J the ideal-gas Jacobian at the current composition nm (species held at zero left out). */
  private reducedJacobian(): void {
    const { m, n, nu, J, JB, Jr, nm, active, sp, spNu, spStart } = this;
    const z = this.space.zero;
    J.fill(0);
    let N = 0;
    for (let i = 0; i < n; i++) N += nm[i] > 0 ? nm[i] : 0;
    const invN = 1 / N;
    for (let r = 0; r < m; r++) {
      if (!active[r]) continue;
      for (let s = r; s < m; s++) {
        if (!active[s]) continue;
        let v = 0;
        let dr = 0;
        let ds = 0;
        for (let q = spStart[r]; q < spStart[r + 1]; q++) {
          const i = sp[q];
          if (z[i]) continue;
          const c = nu[s * n + i];
          if (c !== 0) v += (spNu[q] * c) / nm[i];
          dr += spNu[q];
        }
        for (let q = spStart[s]; q < spStart[s + 1]; q++) if (!z[sp[q]]) ds += spNu[q];
        v -= dr * ds * invN;
        J[r * m + s] = v;
        J[s * m + r] = v;
      }
    }
    if (this.identity) {
      Jr.set(J);
      return;
    }
    const { basis, d } = this.space;
    // JB = J B (m x d), Jr = B^T JB.
    for (let r = 0; r < m; r++) {
      for (let k = 0; k < d; k++) {
        let s = 0;
        for (let q = 0; q < m; q++) s += J[r * m + q] * basis[q * d + k];
        JB[r * d + k] = s;
      }
    }
    for (let k = 0; k < d; k++) {
      for (let l = 0; l < d; l++) {
        let s = 0;
        for (let r = 0; r < m; r++) s += basis[r * d + k] * JB[r * d + l];
        Jr[k * d + l] = s;
      }
    }
  }

  /**
   * Jphi[k][l] = d(B^T Fphi)_k / d eta_l at the current iterate, with Fphi_r = sum_i nu_ri ln phi_i,
   * by forward differences (one equation-of-state call per group and direction). this.lnPhi must
   * hold the values at the current composition nm.
   */
  private fugacityJacobian(P: number, out: EquilibriumResult): void {
    const { m, n, Jphi, nm, nt, y, x, sp, spNu, spStart, active, dxi } = this;
    const { basis, d } = this.space;
    const z = this.space.zero;
    Jphi.fill(0);
    out.jacobians++;
    let N0 = 0;
    for (let i = 0; i < n; i++) N0 += nm[i] > 0 ? nm[i] : 0;
    const col = this.Ft; // scratch: the differenced Fphi, per reaction
    for (let l = 0; l < d; l++) {
      // Direction B_l in extents; step relative to the extents along it, capped so that no species halves.
      let size = 0;
      for (let r = 0; r < m; r++) {
        dxi[r] = this.identity ? (r === l ? 1 : 0) : basis[r * d + l];
        size = Math.max(size, Math.abs(x[r]));
      }
      let h = 1.5e-8 * Math.max(size, 1e-6 * N0);
      nt.set(nm);
      for (let r = 0; r < m; r++) {
        if (dxi[r] === 0) continue;
        for (let q = spStart[r]; q < spStart[r + 1]; q++) nt[sp[q]] += spNu[q] * dxi[r];
      }
      // nt - nm is the change per unit step: cap h so that no species falls by half.
      for (let i = 0; i < n; i++) {
        const dn = nt[i] - nm[i];
        if (dn < 0 && !z[i]) h = Math.min(h, (0.5 * nm[i]) / -dn);
      }
      for (let i = 0; i < n; i++) nt[i] = z[i] ? 0 : nm[i] + h * (nt[i] - nm[i]);
      this.fractions(nt);
      let ok = true;
      for (let g = 0; g < this.nGroups; g++) {
        try {
          this.eos.lnPhi(this.groupT[g], P, y, 'vapor', this.lnPhiD[g]);
        } catch (e) {
          if (!(e instanceof RangeError)) throw e;
          ok = false;
        }
      }
      if (!ok) continue;
      for (let r = 0; r < m; r++) {
        if (!active[r]) {
          col[r] = 0;
          continue;
        }
        const g = this.group[r];
        const d1 = this.lnPhiD[g];
        const d0 = this.lnPhi[g];
        let s = 0;
        for (let q = spStart[r]; q < spStart[r + 1]; q++) {
          const i = sp[q];
          if (!z[i]) s += spNu[q] * (d1[i] - d0[i]);
        }
        col[r] = s / h;
      }
      for (let k = 0; k < d; k++) {
        let s = 0;
        for (let r = 0; r < m; r++) s += (this.identity ? (r === k ? 1 : 0) : basis[r * d + k]) * col[r];
        Jphi[k * d + l] = s;
      }
    }
    // y back to the current composition (the phase check reads it).
    this.fractions(nm);
  }

  private fail(out: EquilibriumResult, status: EquilibriumStatus, reason: EquilibriumReason, message: string, help?: string): EquilibriumResult {
    out.status = status;
    out.reason = reason;
    out.message = joinNotes(message + (help ? ` (to fix: ${help})` : ''), out.message);
    return out;
  }
}

/**
 * Solves A d = rhs in place for A of size k x k: scaled symmetrically by the square roots of its
 * diagonal (the ideal-gas part is positive definite, and its diagonal spans the range of 1/n_i),
 * then the project's dense LU (ml-matrix, partial pivoting; src/solve/linear.ts) with a pivot test;
 * A is overwritten, sc is scratch (length k) and work the LU work of order k. False when singular.
 */
function luSolve(A: Float64Array, rhs: Float64Array, k: number, sc: Float64Array, work: LuWork): boolean {
  for (let c = 0; c < k; c++) {
    const dgl = Math.abs(A[c * k + c]);
    sc[c] = dgl > 0 && Number.isFinite(dgl) ? 1 / Math.sqrt(dgl) : 1;
  }
  for (let i = 0; i < k; i++) {
    rhs[i] *= sc[i];
    for (let j = 0; j < k; j++) A[i * k + j] *= sc[i] * sc[j];
  }
  let big = 0;
  for (let q = 0; q < k * k; q++) big = Math.max(big, Math.abs(A[q]));
  if (!(big > 0) || !Number.isFinite(big)) return false;
  if (!solveDense(A.length === k * k ? A : A.subarray(0, k * k), rhs.length === k ? rhs : rhs.subarray(0, k), k, PIVOT_RATIO, work)) return false;
  for (let c = 0; c < k; c++) rhs[c] *= sc[c];
  return true;
}

function joinNotes(a: string, b: string): string {
  return a === '' ? b : b === '' ? a : `${a}; ${b}`;
}

function fmt(v: number): string {
  return Number(v.toPrecision(6)).toString();
}
