/**
 * Which species can be present at equilibrium, and the extents that keep the others at zero.
 *
 * With b_i the flow of component i that reaches the reactions and a_i = (nu_1i, ..., nu_mi), the
 * extents xi are feasible when b_i + a_i . xi >= 0 for every i. A species that reaches the
 * reactor (b_i > 0) can be present. One that does not (b_i = 0) can be present exactly when some
 * feasible xi has a_i . xi > 0 while every other absent species keeps a_j . xi >= 0: near xi = 0
 * the feasible extents form the cone C = { xi : a_j . xi >= 0 for every absent j }, and the
 * absent species that no direction of C forms (the implicit equalities of C) stay at zero on the
 * whole feasible region. They are found together by one linear programme,
 *   maximise sum_j t_j   subject to   t_j <= a_j . xi,  0 <= t_j <= 1,  xi free,
 * whose optimum has t_j = 1 for every species that some direction forms (C is closed under
 * addition, so one direction forms them all, and it can be scaled) and t_j = 0 for the others
 * (Schrijver, Theory of Linear and Integer Programming, Wiley 1986, sec. 8.2, on implicit
 * equalities). It is solved by the simplex method with Bland's rule (no cycling on the degenerate
 * vertex at the origin, which is where it starts: every right-hand side is 0 or 1).
 *
 * The extents then move in V = { xi : a_i . xi = 0 for every species held at zero }: an
 * orthonormal basis B (m x d) of V is returned, with the direction xi* of the programme (in V,
 * forming every absent species that can be present) from which a start inside the region is
 * taken. A reaction whose row of B is zero cannot proceed at all (its extent is zero). Ammonia
 * synthesis with neither N2 nor NH3 in the inlet is such a reaction; CO2 + 3 H2 -> CH3OH + H2O
 * and CO2 + H2 -> CO + H2O on a CO and H2 inlet are not: they proceed in the one combination
 * (their difference, CO + 2 H2 -> CH3OH) that leaves CO2 and H2O at zero.
 */

export interface ReactionSpace {
  /** 1 for each component held at zero (absent and formed by no feasible direction). */
  zero: Uint8Array;
  /** Orthonormal basis of the feasible extent directions, m x d row-major (row r: reaction r). */
  basis: Float64Array;
  d: number;
  /** A direction in V that forms every absent species that can be present (0 when none is absent). */
  direction: Float64Array;
}

/**
 * nu: m x n row-major coefficients; absent[i] = 1 for a component that some reaction involves and
 * that does not reach the reactor. Allocates (called only when the set of absent species changes).
 */
export function reactionSpace(nu: Float64Array, m: number, n: number, absent: Uint8Array): ReactionSpace {
  const zero = new Uint8Array(n);
  const direction = new Float64Array(m);
  const rows: number[] = [];
  for (let i = 0; i < n; i++) if (absent[i]) rows.push(i);
  if (rows.length > 0) {
    const t = implicitEqualities(nu, m, n, rows, direction);
    rows.forEach((i, k) => {
      if (!(t[k] > 0.5)) zero[i] = 1;
    });
  }
  // Orthonormal basis of the rows a_i of the species held at zero, then of its complement.
  const q: Float64Array[] = [];
  const orth = (v: Float64Array, against: Float64Array[]): number => {
    for (let pass = 0; pass < 2; pass++) {
      for (const u of against) {
        let d = 0;
        for (let r = 0; r < m; r++) d += v[r] * u[r];
        for (let r = 0; r < m; r++) v[r] -= d * u[r];
      }
    }
    let s = 0;
    for (let r = 0; r < m; r++) s += v[r] * v[r];
    return Math.sqrt(s);
  };
  for (let i = 0; i < n; i++) {
    if (!zero[i]) continue;
    const v = new Float64Array(m);
    let s0 = 0;
    for (let r = 0; r < m; r++) {
      v[r] = nu[r * n + i];
      s0 += v[r] * v[r];
    }
    const s = orth(v, q);
    if (s > 1e-10 * Math.sqrt(s0)) {
      for (let r = 0; r < m; r++) v[r] /= s;
      q.push(v);
    }
  }
  const basisCols: Float64Array[] = [];
  for (let r0 = 0; r0 < m; r0++) {
    const v = new Float64Array(m);
    v[r0] = 1;
    const s = orth(v, [...q, ...basisCols]);
    if (s > 1e-8) {
      for (let r = 0; r < m; r++) v[r] /= s;
      // Exact zeros where rounding leaves dust.
      for (let r = 0; r < m; r++) if (Math.abs(v[r]) < 1e-14) v[r] = 0;
      basisCols.push(v);
    }
  }
  const d = basisCols.length;
  const basis = new Float64Array(m * d);
  for (let k = 0; k < d; k++) for (let r = 0; r < m; r++) basis[r * d + k] = basisCols[k][r];
  // The direction in V exactly (it is in V up to rounding).
  if (d < m) {
    const p = new Float64Array(m);
    for (let k = 0; k < d; k++) {
      let c = 0;
      for (let r = 0; r < m; r++) c += basisCols[k][r] * direction[r];
      for (let r = 0; r < m; r++) p[r] += c * basisCols[k][r];
    }
    direction.set(p);
  }
  return { zero, basis, d, direction };
}

/**
 * max sum t_k s.t. t_k - a_{rows[k]} . (xp - xm) <= 0, t_k <= 1, t, xp, xm >= 0, by the simplex
 * method (tableau, Bland's rule). Returns t; writes xp - xm into x.
 */
function implicitEqualities(nu: Float64Array, m: number, n: number, rows: number[], x: Float64Array): Float64Array {
  const p = rows.length;
  // Columns: xp (m), xm (m), t (p), slacks (2p); last column the right-hand side.
  const nv = 2 * m + p + 2 * p;
  const nc = 2 * p;
  const W = nv + 1;
  const tab = new Float64Array((nc + 1) * W);
  const basic = new Int32Array(nc);
  for (let k = 0; k < p; k++) {
    const i = rows[k];
    const row = k * W;
    for (let r = 0; r < m; r++) {
      const a = nu[r * n + i];
      tab[row + r] = -a;
      tab[row + m + r] = a;
    }
    tab[row + 2 * m + k] = 1;
    tab[row + 2 * m + p + k] = 1;
    tab[row + nv] = 0;
    basic[k] = 2 * m + p + k;
    const row2 = (p + k) * W;
    tab[row2 + 2 * m + k] = 1;
    tab[row2 + 2 * m + p + p + k] = 1;
    tab[row2 + nv] = 1;
    basic[p + k] = 2 * m + 2 * p + k;
  }
  // Objective row: reduced costs -c (maximise sum t).
  const obj = nc * W;
  for (let k = 0; k < p; k++) tab[obj + 2 * m + k] = -1;
  const EPS = 1e-12;
  for (let iter = 0; iter < 10000; iter++) {
    let enter = -1;
    for (let j = 0; j < nv; j++) {
      if (tab[obj + j] < -EPS) {
        enter = j;
        break;
      }
    }
    if (enter < 0) break;
    let leave = -1;
    let best = Infinity;
    for (let k = 0; k < nc; k++) {
      const a = tab[k * W + enter];
      if (a > EPS) {
        const ratio = tab[k * W + nv] / a;
        if (ratio < best - 1e-15 || (Math.abs(ratio - best) <= 1e-15 && leave >= 0 && basic[k] < basic[leave])) {
          best = ratio;
          leave = k;
        }
      }
    }
    if (leave < 0) break; // unbounded in a direction that does not raise the objective: cannot happen (t <= 1)
    const prow = leave * W;
    const pv = tab[prow + enter];
    for (let j = 0; j <= nv; j++) tab[prow + j] /= pv;
    for (let k = 0; k <= nc; k++) {
      if (k === leave) continue;
      const f = tab[k * W + enter];
      if (f === 0) continue;
      const row = k * W;
      for (let j = 0; j <= nv; j++) tab[row + j] -= f * tab[prow + j];
    }
    basic[leave] = enter;
  }
  const value = new Float64Array(nv);
  for (let k = 0; k < nc; k++) value[basic[k]] = tab[k * W + nv];
  for (let r = 0; r < m; r++) x[r] = value[r] - value[m + r];
  return value.slice(2 * m, 2 * m + p);
}
