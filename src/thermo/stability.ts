/**
 * Tangent-plane stability test of a mixture at T, P (Michelsen, M. L., "The isothermal flash
 * problem. Part I. Stability", Fluid Phase Equilibria 9 (1982) 1-19).
 *
 * With d_i = ln z_i + ln phi_i(z), the modified tangent-plane distance of a trial phase with mole
 * numbers W_i is
 *   tm(W) = 1 + sum_i W_i (ln W_i + ln phi_i(w) - d_i - 1),  w = W / sum W,
 * and its stationary points satisfy ln W_i = d_i - ln phi_i(w), which is iterated by successive
 * substitution. At a stationary point tm = 1 - sum W and the tangent-plane distance of the
 * normalised trial phase is tpd = sum_i w_i (ln w_i + ln phi_i(w) - d_i) = -ln(sum W).
 * The feed is unstable if any stationary point has tpd < 0. Two trial phases are started from
 * Wilson's K (wilson.ts): vapor-like W_i = z_i K_i and liquid-like W_i = z_i / K_i.
 * Every evaluation uses the root of lower Gibbs energy ('stable').
 * Every 5th step the iteration is extrapolated along the dominant eigenvector (Michelsen 1982,
 * Part II, FPE 9, 21: lambda = (D_k . D_k)/(D_k-1 . D_k), step D_k lambda/(1 - lambda)); the
 * extrapolation is kept only if tm decreases.
 * A trial that converges to the feed itself (sum (ln W_i - ln z_i)^2 small) is the trivial
 * solution and counts as tpd = 0.
 */
import { lnPhiInto } from './flash-eos.js';
import { eosWork, type Eos } from './types.js';
import { wilsonK } from './wilson.js';

export interface StabilityOptions {
  /** Convergence on max |change of ln W_i| (default 1e-10). */
  tol?: number;
  /** Successive-substitution steps per trial phase (default 500). */
  maxIterations?: number;
}

export interface StabilityResult {
  stable: boolean;
  /** Smallest tangent-plane distance found (0 for the trivial solution), dimensionless (G/RT). */
  tpd: number;
  /** Composition of the trial phase with the smallest tpd, when the feed is unstable. */
  trial?: Float64Array;
  /** Equilibrium-ratio estimate y/x for a following flash, when the feed is unstable. */
  K?: Float64Array;
  /** Total successive-substitution steps of both trials. */
  iterations: number;
  /** Number of fugacity-coefficient evaluations. */
  evaluations: number;
  /** True when a trial ran out of steps before converging. */
  incomplete?: boolean;
}

/**
 * Threshold below which a tangent-plane distance counts as negative. It sits above the noise of
 * a converged flash (ln f equal to 1e-10 gives tpd of that order at the equilibrium tangent), so
 * a phase at its own saturation point is reported stable.
 */
export const TPD_NEGATIVE = -1e-8;

/** Work arrays of one trial phase, and its outcome (written by runTrial; w is the trial's composition). */
export interface TrialWork {
  lnW: Float64Array;
  W: Float64Array;
  w: Float64Array;
  lnPhi: Float64Array;
  prevStep: Float64Array;
  step: Float64Array;
  saved: Float64Array;
  tpd: number;
  trivial: boolean;
  converged: boolean;
  iterations: number;
  evaluations: number;
}

/** Work arrays of one stability test, kept per equation of state (allocated once, reused). */
export interface StabilityWork {
  n: number;
  zz: Float64Array;
  present: Uint8Array;
  lnPhiZ: Float64Array;
  d: Float64Array;
  K: Float64Array;
  lnW: Float64Array;
  /** ln z_i of the present components. */
  lnz: Float64Array;
  /** ln of Wilson's K. */
  lnKw: Float64Array;
  trials: [TrialWork, TrialWork];
  /** The outcome of the last test (stabilityCore): K is the estimate for a flash when unstable. */
  stable: boolean;
  tpd: number;
  iterations: number;
  evaluations: number;
  incomplete: boolean;
  Kout: Float64Array;
  /** The trial with the smallest tpd when unstable. */
  best: TrialWork | undefined;
}


function trialWork(n: number): TrialWork {
  return {
    lnW: new Float64Array(n), W: new Float64Array(n), w: new Float64Array(n), lnPhi: new Float64Array(n),
    prevStep: new Float64Array(n), step: new Float64Array(n), saved: new Float64Array(n),
    tpd: 0, trivial: false, converged: false, iterations: 0, evaluations: 0,
  };
}

export function workFor(eos: Eos): StabilityWork {
  const n = eos.n;
  return eosWork(eos, 'stability', (): StabilityWork => ({
    n, zz: new Float64Array(n), present: new Uint8Array(n), lnPhiZ: new Float64Array(n), d: new Float64Array(n),
    K: new Float64Array(n), lnW: new Float64Array(n), lnz: new Float64Array(n), lnKw: new Float64Array(n), trials: [trialWork(n), trialWork(n)],
    stable: true, tpd: 0, iterations: 0, evaluations: 0, incomplete: false, Kout: new Float64Array(n), best: undefined,
  }), (w) => w.n === n);
}

/** Largest |ln W| an extrapolated trial step may reach (exp(300) is far from overflow). */
const MAX_LN_W = 300;

function runTrial(
  eos: Eos, T: number, P: number, lnz: Float64Array, d: Float64Array, present: Uint8Array,
  lnW0: Float64Array, tol: number, maxIt: number, work: TrialWork,
): TrialWork {
  const n = eos.n;
  const { lnW, W, w, lnPhi, prevStep, step, saved } = work;
  lnW.set(lnW0);
  prevStep.fill(0);
  let savedTm = Infinity;
  let accelPending = false;
  let evaluations = 0;
  let tm = Infinity;
  let tpd = 0;
  let it = 0;
  for (it = 1; it <= maxIt; it++) {
    let sumW = 0;
    for (let i = 0; i < n; i++) {
      W[i] = present[i] ? Math.exp(lnW[i]) : 0;
      sumW += W[i];
    }
    for (let i = 0; i < n; i++) w[i] = W[i] / sumW;
    lnPhiInto(eos, T, P, w, 'stable', lnPhi);
    evaluations++;
    tm = 1;
    tpd = 0;
    const lnSumW = Math.log(sumW);
    for (let i = 0; i < n; i++) {
      if (!present[i]) continue;
      const g = lnW[i] + lnPhi[i] - d[i];
      tm += W[i] * (g - 1);
      tpd += w[i] * (g - lnSumW);
    }
    if (accelPending) {
      accelPending = false;
      if (!(tm < savedTm)) {
        // the extrapolated point is worse: go back to the plain substitution point
        lnW.set(saved);
        prevStep.fill(0);
        continue;
      }
    }
    let maxStep = 0;
    let trivialNorm = 0;
    let dot1 = 0;
    let dot0 = 0;
    for (let i = 0; i < n; i++) {
      if (!present[i]) continue;
      const next = d[i] - lnPhi[i];
      const s = next - lnW[i];
      step[i] = s;
      dot1 += s * s;
      dot0 += s * prevStep[i];
      if (Math.abs(s) > maxStep) maxStep = Math.abs(s);
      lnW[i] = next;
      const dz = next - lnz[i];
      trivialNorm += dz * dz;
    }
    if (trivialNorm < 1e-8) return outcome(work, 0, true, true, it, evaluations);
    if (maxStep <= tol) return outcome(work, tpd, false, true, it, evaluations);
    if (it % 5 === 0 && dot0 > 0) {
      const lambda = dot1 / dot0;
      if (lambda > 0 && lambda < 1) {
        saved.set(lnW);
        savedTm = tm;
        const f = lambda / (1 - lambda);
        let wild = false;
        for (let i = 0; i < n; i++) {
          if (!present[i]) continue;
          lnW[i] += f * step[i];
          // with lambda near 1 the extrapolation can throw ln W past what exp() holds (W would
          // overflow and the trial's mole fractions turn NaN): keep the substitution point then
          if (!(Math.abs(lnW[i]) < MAX_LN_W)) wild = true;
        }
        if (wild) {
          lnW.set(saved);
          prevStep.fill(0);
          continue;
        }
        accelPending = true;
        prevStep.fill(0);
        continue;
      }
    }
    prevStep.set(step);
  }
  return outcome(work, tpd, false, false, maxIt, evaluations);
}

function outcome(work: TrialWork, tpd: number, trivial: boolean, converged: boolean, iterations: number, evaluations: number): TrialWork {
  work.tpd = tpd;
  work.trivial = trivial;
  work.converged = converged;
  work.iterations = iterations;
  work.evaluations = evaluations;
  return work;
}

/**
 * Tangent-plane stability test of composition z (mole fractions, normalised internally) at
 * T (K), P (Pa). Components with z_i = 0 are left out of the trial phases.
 */
export function stabilityTest(eos: Eos, T: number, P: number, z: ArrayLike<number>, opts: StabilityOptions = {}): StabilityResult {
  const n = eos.n;
  if (z.length !== n) throw new RangeError(`stabilityTest: composition has ${z.length} entries, expected ${n}`);
  let s = 0;
  for (let i = 0; i < n; i++) {
    const zi = z[i];
    if (!(zi >= 0) || zi === Infinity) throw new RangeError(`stabilityTest: mole fraction ${i} must be finite and >= 0, got ${zi}`);
    s += zi;
  }
  if (!(s > 0)) throw new RangeError('stabilityTest: composition must have a positive sum');
  const w = stabilityCore(eos, T, P, z, s, opts.tol ?? 1e-10, opts.maxIterations ?? 500);
  const base = { iterations: w.iterations, evaluations: w.evaluations, ...(w.incomplete ? { incomplete: true } : {}) };
  if (w.stable) return { stable: true, tpd: w.tpd, ...base };
  // The work arrays are reused by the next test: hand out copies.
  return { stable: false, tpd: w.tpd, trial: Float64Array.from(w.best!.w), K: Float64Array.from(w.Kout), ...base };
}

/**
 * The test itself, on a composition already checked (z_i finite and >= 0, sum s > 0), with
 * its outcome in the equation of state's work object (stable, tpd, Kout, best, iterations,
 * evaluations, incomplete): no allocation. The flash calls it directly.
 */
export function stabilityCore(eos: Eos, T: number, P: number, z: ArrayLike<number>, s: number, tol: number, maxIt: number): StabilityWork {
  const n = eos.n;
  const work = workFor(eos);
  const { zz, present, lnPhiZ, d, K, lnW, lnz, lnKw } = work;
  let nPresent = 0;
  for (let i = 0; i < n; i++) {
    zz[i] = z[i] / s;
    present[i] = zz[i] > 0 ? 1 : 0;
    if (zz[i] > 0) nPresent++;
  }
  work.best = undefined;
  if (nPresent === 1) return verdict(work, true, 0, 0, 0, false);

  lnPhiInto(eos, T, P, zz, 'stable', lnPhiZ);
  for (let i = 0; i < n; i++) {
    lnz[i] = present[i] ? Math.log(zz[i]) : 0;
    d[i] = present[i] ? lnz[i] + lnPhiZ[i] : 0;
  }
  wilsonK(eos.components, T, P, K);
  for (let i = 0; i < n; i++) lnKw[i] = Math.log(K[i]);

  let iterations = 0;
  let evaluations = 1;
  let incomplete = false;
  for (let t = 0; t < 2; t++) {
    const sign = t === 0 ? 1 : -1; // vapor-like trial first, then liquid-like
    for (let i = 0; i < n; i++) lnW[i] = present[i] ? lnz[i] + sign * lnKw[i] : 0;
    const o = runTrial(eos, T, P, lnz, d, present, lnW, tol, maxIt, work.trials[t]);
    iterations += o.iterations;
    evaluations += o.evaluations;
    if (!o.converged) incomplete = true;
  }
  const [v, l] = work.trials;
  const vNeg = !v.trivial && v.tpd < TPD_NEGATIVE;
  const lNeg = !l.trivial && l.tpd < TPD_NEGATIVE;
  const tpd = Math.min(v.trivial ? 0 : v.tpd, l.trivial ? 0 : l.tpd);
  if (!vNeg && !lNeg) return verdict(work, true, tpd, iterations, evaluations, incomplete);

  const Kout = work.Kout;
  for (let i = 0; i < n; i++) {
    if (!present[i]) {
      Kout[i] = K[i];
    } else if (vNeg && lNeg) {
      Kout[i] = v.w[i] / l.w[i];
    } else if (vNeg) {
      Kout[i] = v.w[i] / zz[i];
    } else {
      Kout[i] = zz[i] / l.w[i];
    }
  }
  work.best = vNeg && (!lNeg || v.tpd <= l.tpd) ? v : l;
  return verdict(work, false, tpd, iterations, evaluations, incomplete);
}

function verdict(work: StabilityWork, stable: boolean, tpd: number, iterations: number, evaluations: number, incomplete: boolean): StabilityWork {
  work.stable = stable;
  work.tpd = tpd;
  work.iterations = iterations;
  work.evaluations = evaluations;
  work.incomplete = incomplete;
  return work;
}
