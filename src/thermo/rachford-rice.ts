/**
 * Rachford-Rice equation for the vapor fraction beta of an isothermal two-phase split with
 * given equilibrium ratios K_i = y_i / x_i (Rachford and Rice, "Procedure for use of electronic
 * digital computers in calculating flash vaporization hydrocarbon equilibrium",
 * J. Petrol. Technol. 4 (1952), section 1, 19):
 *
 *   f(beta) = sum_i z_i (K_i - 1) / (1 + beta (K_i - 1)) = 0,
 *   x_i = z_i / (1 + beta (K_i - 1)),  y_i = K_i x_i.
 *
 * f is strictly decreasing between its poles beta_min = 1/(1 - K_max) < 0 and
 * beta_max = 1/(1 - K_min) > 1, so there is exactly one root there when K_max > 1 > K_min.
 * The root is found by Newton's method kept inside a shrinking bracket (bisection when a Newton
 * step leaves it). Roots outside [0, 1] are returned as they are ("negative flash", Whitson and
 * Michelsen, Fluid Phase Equilibria 53 (1989) 51): the caller treats them as single phase.
 * Only components with z_i > 0 take part.
 */

export interface RachfordRiceResult {
  /**
   * 'root': beta solves f = 0 (it may lie outside [0, 1]). 'all-liquid': every K_i <= 1, no
   * root, beta = -Infinity. 'all-vapor': every K_i >= 1, no root, beta = +Infinity.
   */
  kind: 'root' | 'all-liquid' | 'all-vapor';
  beta: number;
  status: 'converged' | 'not-converged';
  iterations: number;
  /** |f(beta)| at the returned beta (0 when there is no root). */
  residual: number;
}

function rrValue(z: ArrayLike<number>, K: ArrayLike<number>, beta: number, n: number): number {
  let f = 0;
  for (let i = 0; i < n; i++) {
    const zi = z[i];
    if (zi > 0) {
      const km1 = K[i] - 1;
      f += (zi * km1) / (1 + beta * km1);
    }
  }
  return f;
}

/** A result to pass to solveRachfordRice again and again (its fields are overwritten). */
export function newRachfordRiceResult(): RachfordRiceResult {
  return { kind: 'root', beta: 0, status: 'converged', iterations: 0, residual: 0 };
}

function answer(
  out: RachfordRiceResult | undefined, kind: RachfordRiceResult['kind'], beta: number, status: RachfordRiceResult['status'], iterations: number, residual: number,
): RachfordRiceResult {
  if (out === undefined) return { kind, beta, status, iterations, residual };
  out.kind = kind;
  out.beta = beta;
  out.status = status;
  out.iterations = iterations;
  out.residual = residual;
  return out;
}

/**
 * Solves the Rachford-Rice equation. z need not be normalised (only the root matters). With
 * `out`, the result is written there (no allocation: the flashes' inner loops).
 */
export function solveRachfordRice(z: ArrayLike<number>, K: ArrayLike<number>, tol = 1e-15, maxIterations = 200, out?: RachfordRiceResult): RachfordRiceResult {
  const n = z.length;
  if (K.length !== n) throw new RangeError(`Rachford-Rice: z has ${n} entries, K has ${K.length}`);
  let kMax = -Infinity;
  let kMin = Infinity;
  for (let i = 0; i < n; i++) {
    if (z[i] > 0) {
      const k = K[i];
      if (!(k > 0) || k === Infinity) throw new RangeError(`Rachford-Rice: K[${i}] must be positive and finite, got ${k}`);
      if (k > kMax) kMax = k;
      if (k < kMin) kMin = k;
    }
  }
  if (kMax === -Infinity) throw new RangeError('Rachford-Rice: no component with z > 0');
  if (kMax <= 1) return answer(out, 'all-liquid', -Infinity, 'converged', 0, 0);
  if (kMin >= 1) return answer(out, 'all-vapor', Infinity, 'converged', 0, 0);

  // bracket: the poles, narrowed by the signs of f(0) and f(1)
  let lo = 1 / (1 - kMax);
  let hi = 1 / (1 - kMin);
  const f0 = rrValue(z, K, 0, n);
  const f1 = rrValue(z, K, 1, n);
  let beta: number;
  if (f0 <= 0) {
    if (f0 === 0) return answer(out, 'root', 0, 'converged', 0, 0);
    hi = 0;
    beta = 0.5 * lo;
  } else if (f1 >= 0) {
    lo = 1;
    if (f1 === 0) return answer(out, 'root', 1, 'converged', 0, 0);
    beta = 0.5 * (1 + hi);
  } else {
    lo = 0;
    hi = 1;
    // start from the linear interpolation between f(0) > 0 and f(1) < 0
    beta = f0 / (f0 - f1);
  }

  let f = 0;
  for (let it = 1; it <= maxIterations; it++) {
    f = 0;
    let df = 0;
    for (let i = 0; i < n; i++) {
      const zi = z[i];
      if (zi > 0) {
        const km1 = K[i] - 1;
        const t = km1 / (1 + beta * km1);
        f += zi * t;
        df -= zi * t * t;
      }
    }
    if (f === 0) return answer(out, 'root', beta, 'converged', it, 0);
    if (f > 0) lo = beta;
    else hi = beta;
    let next = beta - f / df;
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    const step = Math.abs(next - beta);
    beta = next;
    if (step <= tol * Math.max(1, Math.abs(beta)) || hi - lo <= tol * Math.max(1, Math.abs(beta))) {
      return answer(out, 'root', beta, 'converged', it, Math.abs(rrValue(z, K, beta, n)));
    }
  }
  return answer(out, 'root', beta, 'not-converged', maxIterations, Math.abs(f));
}

/** x_i = z_i / (1 + beta (K_i - 1)), y_i = K_i x_i; components with z_i = 0 get 0. */
export function rachfordRiceCompositions(z: ArrayLike<number>, K: ArrayLike<number>, beta: number, x: Float64Array, y: Float64Array): void {
  const n = z.length;
  for (let i = 0; i < n; i++) {
    const zi = z[i];
    if (zi > 0) {
      const xi = zi / (1 + beta * (K[i] - 1));
      x[i] = xi;
      y[i] = K[i] * xi;
    } else {
      x[i] = 0;
      y[i] = 0;
    }
  }
}
