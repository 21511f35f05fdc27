/**
 * Isothermal two-phase flash at given T, P and feed z (Michelsen, M. L., "The isothermal flash
 * problem. Part I. Stability" and "Part II. Phase-split calculation", Fluid Phase Equilibria 9
 * (1982) 1-19 and 21-40).
 *
 * 1. With a K-value start from the caller (opts.K0, e.g. the previous pass of a condenser), try
 *    the phase split directly; accept it if it converges with 0 < beta < 1, is not trivial and
 *    has a lower Gibbs energy than the feed. This is the fast path for repeated flashes.
 * 2. Otherwise run the tangent-plane stability test (stability.ts), started from Wilson's K.
 *    Stable: single phase, labelled by the feed's stable root (eos.ts).
 * 3. Unstable: phase split from the stability test's K. Successive substitution
 *    ln K_i = ln phi_i^L(x) - ln phi_i^V(y) with the Rachford-Rice equation for beta
 *    (rachford-rice.ts); every 5th step extrapolated along the dominant eigenvector (GDEM,
 *    Michelsen 1982 Part II), kept only if the Gibbs energy falls; when substitution is slow,
 *    Newton's method on ln K with a finite-difference Jacobian and a halving line search.
 * Convergence: max_i |ln f_i^V - ln f_i^L| = max_i |ln K_i + ln phi_i^V - ln phi_i^L| <= tol
 * (default 1e-10) over the components present in the feed. Components with z_i = 0 get
 * x_i = y_i = 0 and a K_i from the converged fugacity coefficients (infinite dilution).
 * Trivial solution (K -> 1, both phases alike, near a critical point) is detected by
 * sum z_i (ln K_i)^2 < 1e-8 and reported (trivial: true, note), never as a split.
 * Only vapor-liquid (two-phase) splits are computed; three-phase equilibria are not.
 * Each phase uses the root of lower Gibbs energy for its own composition.
 */
import { solveDense } from '../solve/linear.js';
import type { Eos } from './types.js';
import { stabilityTest } from './stability.js';
import { solveRachfordRice, rachfordRiceCompositions } from './rachford-rice.js';
import { wilsonK } from './wilson.js';

export interface FlashOptions {
  /** Starting K-values (length n), e.g. from the previous flash of the same stream. */
  K0?: Float64Array;
  /** Tolerance on max |ln f_i^V - ln f_i^L| (default 1e-10). */
  tol?: number;
  /** Budget of phase-split iterations (substitution + Newton), default 300. */
  maxIterations?: number;
}

export interface FlashResult {
  status: 'converged' | 'not-converged';
  phase: 'two-phase' | 'vapor' | 'liquid';
  /** Vapor mole fraction (1 for all vapor, 0 for all liquid). */
  beta: number;
  /** Liquid composition (the feed when single phase). */
  x: Float64Array;
  /** Vapor composition (the feed when single phase). */
  y: Float64Array;
  /** K_i = y_i / x_i of the split; for a single phase the estimate used (Wilson or the start). */
  K: Float64Array;
  /** Phase-split iterations (substitution and Newton steps). */
  iterations: number;
  /** max_i |ln f_i^V - ln f_i^L| over the components present (0 for a single phase). */
  residual: number;
  note?: string;
  trivial?: boolean;
  /** Fugacity-coefficient evaluations of both phases, including the stability test. */
  evaluations: number;
  /** Residual after each phase-split iteration. */
  history: number[];
  /** Tangent-plane distance of the stability test, when it ran. */
  tpd?: number;
  /**
   * Which path produced the answer: 'direct' (one component present, or the ideal-gas model),
   * 'from-K0' (split from the caller's K), 'stability' (stable feed), 'stability+split'.
   */
  method: 'direct' | 'from-K0' | 'stability' | 'stability+split';
  /**
   * Two-phase only: true when both phases sit on the liquid root (a liquid-liquid split, e.g.
   * water-methanol with k_ij = 0); beta is then the fraction of the lighter liquid.
   */
  liquidLiquid?: boolean;
}

const TRIVIAL_NORM = 1e-8;

interface SplitState {
  readonly n: number;
  readonly z: Float64Array;
  readonly present: Uint8Array;
  lnK: Float64Array;
  K: Float64Array;
  x: Float64Array;
  y: Float64Array;
  phiL: Float64Array;
  phiV: Float64Array;
  /** Scratch of the phase split (residual, steps, saved ln K). */
  res: Float64Array;
  step: Float64Array;
  prevStep: Float64Array;
  saved: Float64Array;
  /** Scratch for the feed's fugacity coefficients. */
  phiZ: Float64Array;
  beta: number;
  evaluations: number;
}

/** Arrays of one flash, kept per equation of state (allocated once, reused by every flash). */
const workspaces = new WeakMap<Eos, SplitState>();

function stateFor(eos: Eos): SplitState {
  const n = eos.n;
  let s = workspaces.get(eos);
  if (s === undefined || s.n !== n) {
    const a = () => new Float64Array(n);
    s = {
      n, z: a(), present: new Uint8Array(n), lnK: a(), K: a(), x: a(), y: a(), phiL: a(), phiV: a(),
      res: a(), step: a(), prevStep: a(), saved: a(), phiZ: a(), beta: NaN, evaluations: 0,
    };
    workspaces.set(eos, s);
  }
  s.beta = NaN;
  s.evaluations = 0;
  return s;
}

type EvalOutcome = 'ok' | 'single-liquid' | 'single-vapor';

/**
 * From ln K: Rachford-Rice, compositions and fugacity coefficients. Returns the residual and the
 * Gibbs energy of the split, gRT = sum_i [(1 - beta) x_i ln(x_i phi_i^L) + beta y_i ln(y_i phi_i^V)]
 * (G/RT per mole of feed, less the constant ln P), which the acceleration and the fast path
 * compare.
 */
interface Evaluation {
  outcome: EvalOutcome;
  residual: number;
  gRT: number;
}

function newEvaluation(): Evaluation {
  return { outcome: 'ok', residual: Infinity, gRT: Infinity };
}

function setEvaluation(out: Evaluation, outcome: EvalOutcome, residual: number, gRT: number): Evaluation {
  out.outcome = outcome;
  out.residual = residual;
  out.gRT = gRT;
  return out;
}

/** Writes into `out` (one object per caller, reused across iterations) and returns it. */
function evaluate(eos: Eos, T: number, P: number, s: SplitState, res: Float64Array, out: Evaluation): Evaluation {
  const n = s.n;
  for (let i = 0; i < n; i++) {
    const l = s.lnK[i];
    s.K[i] = Math.exp(l > 600 ? 600 : l < -600 ? -600 : l);
  }
  const rr = solveRachfordRice(s.z, s.K);
  if (rr.kind === 'all-liquid') return setEvaluation(out, 'single-liquid', Infinity, Infinity);
  if (rr.kind === 'all-vapor') return setEvaluation(out, 'single-vapor', Infinity, Infinity);
  s.beta = rr.beta;
  rachfordRiceCompositions(s.z, s.K, rr.beta, s.x, s.y);
  eos.lnPhi(T, P, s.x, 'stable', s.phiL);
  eos.lnPhi(T, P, s.y, 'stable', s.phiV);
  s.evaluations++;
  let r = 0;
  let g = 0;
  const b = s.beta;
  for (let i = 0; i < n; i++) {
    if (!s.present[i]) {
      res[i] = 0;
      continue;
    }
    const e = s.lnK[i] + s.phiV[i] - s.phiL[i];
    res[i] = e;
    if (Math.abs(e) > r) r = Math.abs(e);
    const xi = s.x[i];
    const yi = s.y[i];
    if (xi > 0) g += (1 - b) * xi * (Math.log(xi) + s.phiL[i]);
    if (yi > 0) g += b * yi * (Math.log(yi) + s.phiV[i]);
  }
  return setEvaluation(out, 'ok', r, g);
}

function trivialNorm(s: SplitState): number {
  let t = 0;
  for (let i = 0; i < s.n; i++) if (s.present[i]) t += s.z[i] * s.lnK[i] * s.lnK[i];
  return t;
}

interface SplitOutcome {
  kind: 'converged' | 'trivial' | 'single-liquid' | 'single-vapor' | 'not-converged';
  iterations: number;
  residual: number;
  gRT: number;
  history: number[];
}

/** Successive substitution with GDEM, then Newton on ln K when slow. */
function phaseSplit(eos: Eos, T: number, P: number, s: SplitState, tol: number, maxIt: number): SplitOutcome {
  const n = s.n;
  const { res, step, prevStep, saved } = s;
  prevStep.fill(0);
  const evaluation = newEvaluation();
  const history: number[] = [];
  let savedG = Infinity;
  let accelPending = false;
  let prevResidual = Infinity;
  let slow = 0;
  let it = 0;
  let ev = evaluate(eos, T, P, s, res, evaluation);
  for (;;) {
    if (ev.outcome !== 'ok') return { kind: ev.outcome, iterations: it, residual: Infinity, gRT: Infinity, history };
    if (accelPending) {
      accelPending = false;
      if (!(ev.gRT < savedG)) {
        s.lnK.set(saved);
        prevStep.fill(0);
        ev = evaluate(eos, T, P, s, res, evaluation);
        continue;
      }
    }
    history.push(ev.residual);
    if (ev.residual <= tol) break;
    if (trivialNorm(s) < TRIVIAL_NORM) return { kind: 'trivial', iterations: it, residual: ev.residual, gRT: ev.gRT, history };
    if (it >= maxIt) return { kind: 'not-converged', iterations: it, residual: ev.residual, gRT: ev.gRT, history };
    it++;
    // slow substitution (ratio near 1, typically close to a critical point): switch to Newton
    slow = ev.residual > 0.6 * prevResidual ? slow + 1 : 0;
    prevResidual = ev.residual;
    if ((slow >= 3 && it > 5) || it > 60) {
      return newtonSplit(eos, T, P, s, tol, maxIt, it, history, res);
    }
    let dot1 = 0;
    let dot0 = 0;
    for (let i = 0; i < n; i++) {
      const d = s.phiL[i] - s.phiV[i] - s.lnK[i];
      step[i] = d;
      if (s.present[i]) {
        dot1 += d * d;
        dot0 += d * prevStep[i];
      }
      s.lnK[i] += d;
    }
    if (it % 5 === 0 && dot0 > 0) {
      const lambda = dot1 / dot0;
      if (lambda > 0 && lambda < 1) {
        saved.set(s.lnK);
        savedG = ev.gRT;
        const f = Math.min(lambda / (1 - lambda), 50);
        for (let i = 0; i < n; i++) s.lnK[i] += f * step[i];
        accelPending = true;
        prevStep.fill(0);
        ev = evaluate(eos, T, P, s, res, evaluation);
        continue;
      }
    }
    prevStep.set(step);
    ev = evaluate(eos, T, P, s, res, evaluation);
  }
  return { kind: 'converged', iterations: it, residual: ev.residual, gRT: ev.gRT, history };
}

/**
 * Newton's method on F(u) = u + ln phi^V(y(u)) - ln phi^L(x(u)), u = ln K, with a forward-
 * difference Jacobian (n extra evaluations per step) and step halving when max |F| grows.
 */
function newtonSplit(
  eos: Eos, T: number, P: number, s: SplitState, tol: number, maxIt: number, it0: number, history: number[], res: Float64Array,
): SplitOutcome {
  const n = s.n;
  const J = new Float64Array(n * n);
  const F = new Float64Array(n);
  const Fp = new Float64Array(n);
  const u = new Float64Array(n);
  const du = new Float64Array(n);
  let it = it0;
  const base = newEvaluation();
  const probe = newEvaluation();
  let ev = evaluate(eos, T, P, s, res, base);
  if (ev.outcome !== 'ok') return { kind: ev.outcome, iterations: it, residual: Infinity, gRT: Infinity, history };
  for (;;) {
    if (ev.residual <= tol) return { kind: 'converged', iterations: it, residual: ev.residual, gRT: ev.gRT, history };
    if (trivialNorm(s) < TRIVIAL_NORM) return { kind: 'trivial', iterations: it, residual: ev.residual, gRT: ev.gRT, history };
    if (it >= maxIt) return { kind: 'not-converged', iterations: it, residual: ev.residual, gRT: ev.gRT, history };
    it++;
    u.set(s.lnK);
    for (let i = 0; i < n; i++) F[i] = s.present[i] ? res[i] : s.lnK[i] - (s.phiL[i] - s.phiV[i]);
    const r0 = ev.residual;
    let ok = true;
    for (let j = 0; j < n; j++) {
      const h = 1e-7 * Math.max(1, Math.abs(u[j]));
      s.lnK.set(u);
      s.lnK[j] += h;
      const e = evaluate(eos, T, P, s, res, probe);
      if (e.outcome !== 'ok') { ok = false; break; }
      for (let i = 0; i < n; i++) {
        Fp[i] = s.present[i] ? res[i] : s.lnK[i] - (s.phiL[i] - s.phiV[i]);
        J[i * n + j] = (Fp[i] - F[i]) / h;
      }
    }
    for (let i = 0; i < n; i++) du[i] = -F[i];
    if (!ok || !solveDense(J, du, n)) {
      const gRT = ev.gRT;
      s.lnK.set(u);
      evaluate(eos, T, P, s, res, probe);
      return { kind: 'not-converged', iterations: it, residual: r0, gRT, history };
    }
    let t = 1;
    for (let k = 0; k < 12; k++) {
      for (let i = 0; i < n; i++) s.lnK[i] = u[i] + t * du[i];
      ev = evaluate(eos, T, P, s, res, base);
      if (ev.outcome === 'ok' && ev.residual < r0) break;
      t *= 0.5;
    }
    if (ev.outcome !== 'ok') return { kind: ev.outcome, iterations: it, residual: Infinity, gRT: Infinity, history };
    history.push(ev.residual);
  }
}

function feedGibbs(eos: Eos, T: number, P: number, z: Float64Array, present: Uint8Array, phi: Float64Array): number {
  eos.lnPhi(T, P, z, 'stable', phi);
  let g = 0;
  for (let i = 0; i < eos.n; i++) if (present[i]) g += z[i] * (Math.log(z[i]) + phi[i]);
  return g;
}

/**
 * Isothermal flash of feed z (mole fractions, normalised internally) at T (K), P (Pa).
 */
export function flashTP(eos: Eos, T: number, P: number, z: ArrayLike<number>, opts: FlashOptions = {}): FlashResult {
  const n = eos.n;
  const tol = opts.tol ?? 1e-10;
  const maxIt = opts.maxIterations ?? 300;
  if (!(T > 0) || T === Infinity) throw new RangeError(`flash: temperature must be a finite positive number of kelvin, got ${T}`);
  if (!(P > 0) || P === Infinity) throw new RangeError(`flash: pressure must be a finite positive number of pascal, got ${P}`);
  if (z.length !== n) throw new RangeError(`flash: feed has ${z.length} entries, expected ${n}`);
  if (opts.K0 !== undefined && opts.K0.length !== n) throw new RangeError(`flash: K0 has ${opts.K0.length} entries, expected ${n}`);
  let sum = 0;
  for (let i = 0; i < n; i++) {
    const zi = z[i];
    if (!(zi >= 0) || zi === Infinity) throw new RangeError(`flash: feed mole fraction ${i} must be finite and >= 0, got ${zi}`);
    sum += zi;
  }
  if (!(sum > 0)) throw new RangeError('flash: feed must have a positive sum');
  // Work arrays reused from the last flash with this equation of state; everything returned
  // is a copy (Float64Array.from), so no result shares them.
  const s = stateFor(eos);
  const zz = s.z;
  const present = s.present;
  let nPresent = 0;
  for (let i = 0; i < n; i++) {
    zz[i] = z[i] / sum;
    present[i] = zz[i] > 0 ? 1 : 0;
    if (zz[i] > 0) nPresent++;
  }
  s.lnK.fill(0);
  s.K.fill(0);
  s.x.fill(0);
  s.y.fill(0);
  s.phiL.fill(0);
  s.phiV.fill(0);
  let iterations = 0;
  const history: number[] = [];

  const twoPhase = (method: FlashResult['method'], residual: number, tpd?: number): FlashResult => {
    const r: FlashResult = {
      status: 'converged', phase: 'two-phase', beta: s.beta,
      x: Float64Array.from(s.x), y: Float64Array.from(s.y), K: Float64Array.from(s.K),
      iterations, residual, evaluations: s.evaluations, history, method,
      ...(tpd !== undefined ? { tpd } : {}),
    };
    s.evaluations += 2;
    r.evaluations = s.evaluations;
    if (eos.z(T, P, s.y, 'stable').root === 'liquid' && eos.z(T, P, s.x, 'stable').root === 'liquid') {
      r.liquidLiquid = true;
      r.note = 'both phases are liquid-like: the model predicts a liquid-liquid split (check the k_ij of polar pairs such as water-methanol)';
    }
    return r;
  };
  const single = (
    phase: 'vapor' | 'liquid', method: FlashResult['method'], K: Float64Array, extra: Partial<FlashResult> = {},
  ): FlashResult => ({
    status: 'converged', phase, beta: phase === 'vapor' ? 1 : 0,
    x: Float64Array.from(zz), y: Float64Array.from(zz), K: Float64Array.from(K),
    iterations, residual: 0, evaluations: s.evaluations, history, method, ...extra,
  });
  const labelOfFeed = (): 'vapor' | 'liquid' => {
    s.evaluations++;
    return eos.z(T, P, zz, 'stable').root;
  };

  if (eos.name === 'ideal') {
    // no liquid in the model
    return single('vapor', 'direct', wilsonK(eos.components, T, P, new Float64Array(n)), { note: 'ideal-gas model: no liquid phase' });
  }
  if (nPresent === 1) {
    return single(labelOfFeed(), 'direct', wilsonK(eos.components, T, P, new Float64Array(n)));
  }

  // 1. fast path from the caller's K
  if (opts.K0 !== undefined) {
    let okK = true;
    for (let i = 0; i < n; i++) {
      const k = opts.K0[i];
      if (!(k > 0) || k === Infinity) { okK = false; break; }
      s.lnK[i] = Math.log(k);
    }
    if (okK) {
      const o = phaseSplit(eos, T, P, s, tol, Math.min(maxIt, 50));
      iterations += o.iterations;
      history.push(...o.history);
      if (o.kind === 'converged' && s.beta > 0 && s.beta < 1 && trivialNorm(s) >= TRIVIAL_NORM) {
        const gFeed = feedGibbs(eos, T, P, zz, present, s.phiZ);
        s.evaluations++;
        // the split is lower in Gibbs energy than the feed: accept
        if (o.gRT < gFeed) {
          evaluateK(s);
          return twoPhase('from-K0', o.residual);
        }
      }
    }
  }

  // 2. stability test
  const st = stabilityTest(eos, T, P, zz);
  s.evaluations += st.evaluations;
  if (st.stable) {
    const K = opts.K0 !== undefined && opts.K0.every((k) => k > 0 && Number.isFinite(k)) ? opts.K0 : wilsonK(eos.components, T, P, new Float64Array(n));
    const extra: Partial<FlashResult> = { tpd: st.tpd };
    if (st.incomplete) extra.note = 'stability test stopped before converging; the single-phase answer is uncertain';
    const r = single(labelOfFeed(), 'stability', K, extra);
    if (st.incomplete) r.status = 'not-converged';
    return r;
  }

  // 3. phase split from the stability test's K
  for (let i = 0; i < n; i++) s.lnK[i] = Math.log(st.K![i]);
  const o = phaseSplit(eos, T, P, s, tol, maxIt);
  iterations += o.iterations;
  history.push(...o.history);
  const base = { tpd: st.tpd };
  switch (o.kind) {
    case 'converged':
      evaluateK(s);
      if (s.beta > 0 && s.beta < 1) return twoPhase('stability+split', o.residual, st.tpd);
      return {
        ...single(s.beta >= 1 ? 'vapor' : 'liquid', 'stability+split', s.K, base),
        status: 'not-converged',
        note: `the stability test found the feed unstable (tpd ${st.tpd.toExponential(2)}) but the phase split converged to beta = ${s.beta.toPrecision(4)} outside [0, 1]`,
      };
    case 'trivial':
      return {
        ...single(labelOfFeed(), 'stability+split', s.K, base),
        status: 'not-converged', trivial: true, residual: o.residual,
        note: 'the phase split collapsed to the trivial solution (K -> 1, both phases alike): the state is close to a critical point',
      };
    case 'single-liquid':
    case 'single-vapor':
      return {
        ...single(o.kind === 'single-vapor' ? 'vapor' : 'liquid', 'stability+split', s.K, base),
        status: 'not-converged',
        note: 'the phase split left the two-phase region (all K on one side of 1) although the stability test found the feed unstable',
      };
    default:
      return {
        status: 'not-converged', phase: 'two-phase', beta: s.beta,
        x: Float64Array.from(s.x), y: Float64Array.from(s.y), K: Float64Array.from(s.K),
        iterations, residual: o.residual, evaluations: s.evaluations, history, method: 'stability+split', tpd: st.tpd,
        note: `the phase split did not converge in ${iterations} iterations (fugacity residual ${o.residual.toExponential(2)})`,
      };
  }
}

/** K of the converged state, including components absent from the feed (infinite dilution). */
function evaluateK(s: SplitState): void {
  for (let i = 0; i < s.n; i++) {
    if (!s.present[i]) s.K[i] = Math.exp(s.phiL[i] - s.phiV[i]);
  }
}
