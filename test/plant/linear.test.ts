import { inverse, Matrix } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import {
  chiSquareCritical,
  chiSquarePValue,
  normalCritical,
  prepareReconciliation,
  pValueText,
  reconcile,
  serialElimination,
  sidakLevel,
  type PlantConstraints,
  type PlantVariable,
  type ReconcileResult,
} from '../../src/plant/index.js';

/** Linear balances sum_j a_ij x_j = b_i from rows [a_i0 .. a_i(n-1)] and right-hand sides b. */
function linearBalances(a: number[][], names: string[], b: number[] = a.map(() => 0), analytic = true): PlantConstraints {
  const n = a[0].length;
  return {
    count: a.length,
    names,
    linear: true,
    evaluate(x, out) {
      for (let i = 0; i < a.length; i++) {
        let s = -b[i];
        for (let j = 0; j < n; j++) s += a[i][j] * x[j];
        out[i] = s;
      }
    },
    jacobian: analytic
      ? (_x, J) => {
          for (let i = 0; i < a.length; i++) for (let j = 0; j < n; j++) J[i * n + j] = a[i][j];
        }
      : undefined,
  };
}

// Narasimhan and Jordache, "Data Reconciliation and Gross Error Detection" (Gulf, 2000),
// Example 1.1: a heat exchanger with a bypass. Stream 1 is split into 2 (through the exchanger)
// and 3 (the bypass); 2 leaves the exchanger as 4, 3 passes the bypass valve as 5; 4 and 5 are
// mixed into 6. Balances, built from that network:
//   splitter   F1 - F2 - F3 = 0
//   exchanger  F2 - F4 = 0
//   bypass     F3 - F5 = 0
//   mixer      F4 + F5 - F6 = 0
const HX_A = [
  [1, -1, -1, 0, 0, 0],
  [0, 1, 0, -1, 0, 0],
  [0, 0, 1, 0, -1, 0],
  [0, 0, 0, 1, 1, -1],
];
const HX_NAMES = ['splitter', 'exchanger', 'bypass', 'mixer'];
// Readings and sigma = 1 of the example (from memory).
const HX_Y = [101.91, 64.45, 34.65, 64.2, 36.44, 98.88];

function hxProblem(measured: number[], opts: { analytic?: boolean; sigma?: number } = {}) {
  const variables: PlantVariable[] = HX_Y.map((v, j) => ({
    name: `F${j + 1}`,
    start: 50,
    lower: 0,
    measured: measured.includes(j) ? { value: v, sigma: opts.sigma ?? 1 } : undefined,
  }));
  return { variables, constraints: linearBalances(HX_A, HX_NAMES, undefined, opts.analytic ?? true) };
}

const ALL = [0, 1, 2, 3, 4, 5];

/**
 * The Lagrange solution of min (x - y)' V^-1 (x - y) subject to A x = b:
 * x = y - V A' (A V A')^-1 (A y - b), and Cov(x) = V - V A' (A V A')^-1 A V.
 * Null when A V A' is singular or the balances cannot be met (rows that contradict each other).
 */
function closedForm(a: number[][], y: number[], sigma: number[], b: number[] = a.map(() => 0)) {
  const A = new Matrix(a);
  const V = Matrix.diag(sigma.map((s) => s * s));
  const Y = Matrix.columnVector(y);
  let inv: Matrix;
  try {
    inv = inverse(A.mmul(V).mmul(A.transpose()));
  } catch {
    return null;
  }
  const K = V.mmul(A.transpose()).mmul(inv);
  const x = Y.sub(K.mmul(A.mmul(Y).sub(Matrix.columnVector(b)))).to1DArray();
  for (let i = 0; i < a.length; i++) {
    if (Math.abs(a[i].reduce((s, aij, j) => s + aij * x[j], -b[i])) > 1e-8) return null;
  }
  const covAdj = K.mmul(A).mmul(V);
  const covX = V.sub(covAdj);
  return { x, covX, covAdj };
}

function estimate(r: ReconcileResult, name: string) {
  const e = r.estimates.find((v) => v.name === name);
  if (!e) throw new Error(`no estimate ${name}`);
  return e;
}

describe('Narasimhan and Jordache (2000), Example 1.1: heat exchanger with bypass, all six flows measured', () => {
  const r = reconcile(hxProblem(ALL));

  it('reconciles to the published values 100.22, 64.50, 35.72, 64.50, 35.72, 100.22 (from memory)', () => {
    expect(r.status).toBe('reconciled');
    const published = [100.22, 64.5, 35.72, 64.5, 35.72, 100.22];
    published.forEach((v, j) => expect(r.x[j]).toBeCloseTo(v, 2));
  });

  it('equals the Lagrange closed form x = y - V A\'(A V A\')^-1 A y, computed here with plain matrix algebra', () => {
    const cf = closedForm(HX_A, HX_Y, HX_Y.map(() => 1))!;
    cf.x.forEach((v, j) => expect(Math.abs(r.x[j] - v)).toBeLessThan(1e-9));
    // The balances close exactly.
    expect(r.scaledResidual).toBeLessThan(1e-12);
  });

  it('gives the covariance V - V A\'(A V A\')^-1 A V of the reconciled values and the adjustments\' variances', () => {
    const cf = closedForm(HX_A, HX_Y, HX_Y.map(() => 1))!;
    const { indices, matrix } = r.covariance;
    expect(indices).toEqual(ALL);
    for (let a = 0; a < 6; a++) for (let b = 0; b < 6; b++) expect(matrix[a * 6 + b]).toBeCloseTo(cf.covX.get(a, b), 10);
    for (let j = 0; j < 6; j++) {
      const e = r.estimates[j];
      expect(e.classification).toBe('redundant');
      expect(e.adjustmentSigma!).toBeCloseTo(Math.sqrt(cf.covAdj.get(j, j)), 10);
      expect(e.test!.statistic).toBeCloseTo(Math.abs(e.adjustment!) / Math.sqrt(cf.covAdj.get(j, j)), 9);
    }
  });

  it('runs the global test with dof 4 (chi-square 9.4877 at 95 %, NIST/SEMATECH e-Handbook Table 1.3.6.7.4)', () => {
    expect(r.redundancy).toBe(4);
    const t = r.globalTest!;
    expect(t.dof).toBe(4);
    expect(t.critical).toBeCloseTo(9.4877, 4);
    // gamma is the weighted sum of squares of the adjustments.
    const gamma = HX_Y.reduce((s, y, j) => s + (r.x[j] - y) ** 2, 0);
    expect(t.statistic).toBeCloseTo(gamma, 10);
    expect(t.status).toBe(gamma > 9.4877 ? 'failed' : 'passed');
    expect(t.pValue).toBeCloseTo(chiSquarePValue(gamma, 4), 12);
  });

  it('runs six measurement tests at the Sidak level 1 - 0.95^(1/6)', () => {
    const mt = r.measurementTest!;
    expect(mt.count).toBe(6);
    expect(mt.level).toBeCloseTo(1 - 0.95 ** (1 / 6), 14);
    expect(mt.critical).toBeCloseTo(normalCritical(1 - 0.95 ** (1 / 6)), 12);
    expect(mt.critical).toBeGreaterThan(2.6);
    expect(mt.critical).toBeLessThan(2.7);
  });

  it('gives the same answer with finite differences instead of the analytic Jacobian', () => {
    const fd = reconcile(hxProblem(ALL, { analytic: false }));
    expect(fd.status).toBe('reconciled');
    for (let j = 0; j < 6; j++) expect(Math.abs(fd.x[j] - r.x[j])).toBeLessThan(1e-6);
    expect(fd.evaluations).toBeGreaterThan(r.evaluations);
  });
});

describe('classification on the same network (expected classes derived by hand)', () => {
  it('flows 1, 3 and 5 measured: 3 and 5 redundant, 1 non-redundant, 2, 4 and 6 observable', () => {
    // By hand: the bypass balance F3 - F5 = 0 holds measured flows only, so it checks F3 against
    // F5 (both redundant, redundancy 1). F1 appears only in the splitter balance beside the
    // unmeasured F2, which takes up any change in F1: nothing checks F1 (non-redundant).
    // F2 = F1 - F3, F4 = F2, F6 = F4 + F5: all unmeasured flows are determined (observable).
    // Weighted least squares with equal sigmas: F3 = F5 = (34.65 + 36.44) / 2 = 35.545,
    // F1 = 101.91 unadjusted, F2 = F4 = 101.91 - 35.545 = 66.365, F6 = 101.91.
    // Uncertainties: u(F3) = 1/sqrt(2); u(F2) = sqrt(1 + 1/2) (F1 and F3 independent).
    const r = reconcile(hxProblem([0, 2, 4]));
    expect(r.status).toBe('reconciled');
    expect(r.redundancy).toBe(1);
    expect(r.estimates.map((e) => e.classification)).toEqual(['non-redundant', 'observable', 'redundant', 'observable', 'redundant', 'observable']);
    const f1 = estimate(r, 'F1');
    expect(f1.value).toBe(101.91);
    expect(f1.adjustment).toBe(0);
    expect(f1.test).toBeUndefined();
    expect(f1.note).toMatch(/non-redundant/);
    expect(r.notes.some((n) => n.startsWith('"F1": non-redundant'))).toBe(true);
    expect(estimate(r, 'F3').value!).toBeCloseTo(35.545, 10);
    expect(estimate(r, 'F5').value!).toBeCloseTo(35.545, 10);
    expect(estimate(r, 'F2').value!).toBeCloseTo(66.365, 10);
    expect(estimate(r, 'F4').value!).toBeCloseTo(66.365, 10);
    expect(estimate(r, 'F6').value!).toBeCloseTo(101.91, 10);
    expect(estimate(r, 'F3').uncertainty!).toBeCloseTo(Math.SQRT1_2, 10);
    expect(estimate(r, 'F2').uncertainty!).toBeCloseTo(Math.sqrt(1.5), 10);
    expect(estimate(r, 'F6').uncertainty!).toBeCloseTo(1, 10);
    // Only the two redundant readings are tested.
    expect(r.measurementTest!.count).toBe(2);
  });

  it('flows 1 and 6 measured: both redundant, 2 to 5 unobservable and given no number', () => {
    // By hand: adding the four balances gives F1 - F6 = 0 (redundancy 1: F1 checks F6). The
    // unmeasured flows can move along F2 = F4 = t, F3 = F5 = F1 - t for any t: none is
    // determined. Reconciled: F1 = F6 = (101.91 + 98.88) / 2 = 100.395.
    const r = reconcile(hxProblem([0, 5]));
    expect(r.status).toBe('reconciled');
    expect(r.redundancy).toBe(1);
    expect(r.estimates.map((e) => e.classification)).toEqual(['redundant', 'unobservable', 'unobservable', 'unobservable', 'unobservable', 'redundant']);
    for (const j of [1, 2, 3, 4]) {
      expect(r.estimates[j].value).toBeNull();
      expect(r.estimates[j].uncertainty).toBeNull();
      expect(Number.isNaN(r.x[j])).toBe(true);
    }
    expect(r.covariance.indices).toEqual([0, 5]);
    expect(r.x[0]).toBeCloseTo(100.395, 10);
    expect(r.x[5]).toBeCloseTo(100.395, 10);
    expect(r.notes.filter((n) => /unobservable/.test(n))).toHaveLength(4);
  });

  it('flows 1 and 3 measured: nothing is redundant, status not-redundant, readings pass through', () => {
    // By hand: F2 = F1 - F3, F4 = F2, F5 = F3, F6 = F4 + F5 use every balance; no balance is left
    // to check a reading (redundancy 0).
    const r = reconcile(hxProblem([0, 2]));
    expect(r.status).toBe('not-redundant');
    expect(r.message).toMatch(/not redundant/);
    expect(r.globalTest!.status).toBe('not-redundant');
    expect(r.globalTest!.dof).toBe(0);
    expect(r.measurementTest).toBeUndefined();
    expect(r.x[0]).toBe(101.91);
    expect(r.x[2]).toBe(34.65);
    expect(r.x[1]).toBeCloseTo(101.91 - 34.65, 10);
    expect(r.x[5]).toBeCloseTo(101.91, 10);
    expect(r.estimates.filter((e) => e.role === 'measured').every((e) => e.classification === 'non-redundant' && e.adjustment === 0)).toBe(true);
    const serial = serialElimination(prepareReconciliation(hxProblem([0, 2])));
    expect(serial.status).toBe('not-redundant');
    expect(serial.suspects).toEqual([]);
  });

  it('one flow unmeasured leaves redundancy 3: the critical value is 7.8147 (NIST/SEMATECH e-Handbook Table 1.3.6.7.4)', () => {
    const r = reconcile(hxProblem([0, 2, 3, 4, 5]));
    expect(r.redundancy).toBe(3);
    expect(r.globalTest!.critical).toBeCloseTo(7.8147, 4);
  });
});

describe('serial elimination on the heat exchanger network', () => {
  it('flows 1 and 6: a failed test that the data cannot pin on either meter says so', () => {
    // gamma = 2 * ((101.91 - 98.88) / 2)^2 = 4.59 > 3.841 (chi-square, 1 dof, 95 %): the test
    // fails. F1 and F6 have the same measurement-test statistic: either could be wrong.
    const s = serialElimination(prepareReconciliation(hxProblem([0, 5])));
    expect(s.initial.globalTest!.statistic).toBeCloseTo(4.59045, 4);
    expect(s.initial.globalTest!.status).toBe('failed');
    expect(s.suspects).toHaveLength(1);
    expect(s.suspects[0].name).toBe('F1');
    expect(s.suspects[0].indistinguishableFrom).toEqual(['F6']);
    // Without F1 nothing is redundant: the bias is F1's reading minus the F6 reading.
    expect(s.suspects[0].bias).toBeCloseTo(101.91 - 98.88, 10);
    expect(s.suspects[0].biasUncertainty).toBeCloseTo(Math.SQRT2, 10);
    expect(s.status).toBe('not-resolved');
    expect(s.stopReason).toBe('no-redundancy');
  });

  it('a planted 8-sigma error on flow 3 is found, with its size, when every flow is measured', () => {
    // Exact flows 100 = 64 + 36, readings exact except F3 read 8 high (sigma 1): the bias is
    // known exactly, and without F3 the remaining readings close exactly.
    const exact = [100, 64, 36, 64, 36, 100];
    const p = hxProblem(ALL);
    const values = exact.slice();
    values[2] += 8;
    const s = serialElimination(prepareReconciliation(p), { values });
    expect(s.status).toBe('suspects-found');
    expect(s.suspects.map((x) => x.name)).toEqual(['F3']);
    expect(s.suspects[0].bias).toBeCloseTo(8, 8);
    expect(s.suspects[0].relativeBias).toBeCloseTo(8 / 44, 8);
    expect(s.final.globalTest!.statistic).toBeLessThan(1e-12);
    expect(s.final.estimates[2].classification).toBe('observable');
    expect(s.message).toMatch(/"F3"/);
  });
});

describe('distribution values wired to the stdlib packages', () => {
  it('chi-square 3 dof at 95 % is 7.8147 (NIST/SEMATECH e-Handbook of Statistical Methods, Table 1.3.6.7.4)', () => {
    expect(chiSquareCritical(3, 0.95)).toBeCloseTo(7.8147, 4);
    expect(chiSquarePValue(7.8147, 3)).toBeCloseTo(0.05, 5);
  });

  it('a gross error\'s tiny p-value keeps its digits: the even-dof chi-square tail in closed form', () => {
    // For an even number of degrees of freedom 2m the upper tail is exp(-x/2) sum_{i<m} (x/2)^i / i!
    // (Abramowitz and Stegun, Handbook of Mathematical Functions, 1964, eq. 26.4.21). 1 - cdf
    // gives 0 for both and a multiple of 2^-52 near 1e-15.
    expect(chiSquarePValue(100, 2) / Math.exp(-50)).toBeCloseTo(1, 12);
    const h = 45;
    const tail8 = Math.exp(-h) * (1 + h + (h * h) / 2 + (h * h * h) / 6);
    expect(chiSquarePValue(90, 8) / tail8).toBeCloseTo(1, 12);
    const h2 = 36;
    const tail6 = Math.exp(-h2) * (1 + h2 + (h2 * h2) / 2);
    expect(chiSquarePValue(72, 6) / tail6).toBeCloseTo(1, 12);
    expect(chiSquarePValue(0, 4)).toBe(1);
  });

  it('a p-value below the smallest double is said as p < 1e-300, never p = 0', () => {
    // The bypass network read with sigma 0.01 instead of 1: gamma grows 1e4-fold (to about 8e4),
    // and its chi-square tail underflows (exp(-4e4) is far below 1e-308).
    const r = reconcile(hxProblem(ALL, { sigma: 0.01 }));
    expect(r.globalTest!.statistic).toBeGreaterThan(1e4);
    expect(r.globalTest!.pValue).toBeLessThan(1e-300);
    expect(r.message).toContain('p < 1e-300');
    expect(r.message).not.toMatch(/p = 0/);
    expect(pValueText(2.2e-6, 2)).toBe('p = 0.0000022');
    expect(pValueText(0, 2)).toBe('p < 1e-300');
  });

  it('two-sided normal critical value at 5 % is 1.960 (NIST/SEMATECH e-Handbook, Sec. 1.3.6.7.1, normal table)', () => {
    expect(normalCritical(0.05)).toBeCloseTo(1.95996, 5);
  });

  it('the Sidak level keeps its digits for many tests', () => {
    expect(sidakLevel(0.95, 1)).toBeCloseTo(0.05, 15);
    expect(sidakLevel(0.95, 1000)).toBeCloseTo(1 - Math.exp(Math.log(0.95) / 1000), 15);
  });
});

describe('bounds', () => {
  // A splitter: in = main + side, side is a small flow read by a coarse meter.
  const split = (values: [number, number, number], sigmas: [number, number, number]) => ({
    variables: ['in', 'main', 'side'].map((name, j) => ({ name, start: values[j], lower: 0, measured: { value: values[j], sigma: sigmas[j] } })),
    constraints: linearBalances([[1, -1, -1]], ['splitter']),
  });

  it('a flow that would reconcile negative is held at zero, and the rest reconcile around it', () => {
    // Without the bound: side = 0.05 - (10 - 10.2 - 0.05) ... = 0.05 + (-0.25) * 1/1.02 < 0.
    // With side held at 0 (by hand): in = main, each moved half of 0.2: 10.1.
    const unbounded = reconcile({ ...split([10, 10.2, 0.05], [0.1, 0.1, 1]), variables: split([10, 10.2, 0.05], [0.1, 0.1, 1]).variables.map((v) => ({ ...v, lower: undefined })) });
    expect(unbounded.x[2]).toBeLessThan(0);
    const r = reconcile(split([10, 10.2, 0.05], [0.1, 0.1, 1]));
    expect(r.status).toBe('reconciled');
    expect(r.x[2]).toBe(0);
    expect(r.x[0]).toBeCloseTo(10.1, 10);
    expect(r.x[1]).toBeCloseTo(10.1, 10);
    expect(r.estimates[2].atBound).toBe('lower');
    expect(r.notes.some((n) => /held at its lower bound/.test(n))).toBe(true);
  });

  it('matches the best of every choice of bounds held, on seeded random readings (brute force)', () => {
    // Two balances over three bounded flows and one free term, readings drawn around zero so
    // that bounds are held, released and sometimes contradict the balances when all are held:
    //   F0 - F1 - F2 - F3 = 0,   F1 - 0.5 F2 + F3 = 0.2,   F0, F1, F2 >= 0.
    // The exact optimum of this convex problem is the feasible closed-form solution of least
    // weighted sum of squares over every subset of bounds held as equalities.
    let seed = 777;
    const rand = () => {
      seed = (seed * 1103515245 + 12345) % 2147483648;
      return seed / 2147483648;
    };
    const rowsBase = [
      [1, -1, -1, -1],
      [0, 1, -0.5, 1],
    ];
    let released = 0;
    for (let trial = 0; trial < 300; trial++) {
      const y = [rand() * 3 - 1.5, rand() * 3 - 1.5, rand() * 3 - 1.5, rand() * 4 - 2];
      const sigma = y.map(() => 0.1 + rand());
      const r = reconcile({
        variables: y.map((v, j) => ({ name: `F${j}`, start: v, lower: j < 3 ? 0 : undefined, measured: { value: v, sigma: sigma[j] } })),
        constraints: linearBalances(rowsBase, ['first', 'second'], [0, 0.2], trial % 2 === 0),
      });
      expect(r.status).toBe('reconciled');
      const held = r.history.map((h) => h.activeBounds);
      if (held.some((v, i) => i > 0 && v < held[i - 1])) released++;
      let best = { obj: Infinity, x: [] as number[] };
      for (let mask = 0; mask < 8; mask++) {
        const rows = rowsBase.map((row) => row.slice());
        const b = [0, 0.2];
        for (let j = 0; j < 3; j++) {
          if (mask & (1 << j)) {
            rows.push([0, 1, 2, 3].map((k) => (k === j ? 1 : 0)));
            b.push(0);
          }
        }
        const x = closedForm(rows, y, sigma, b)?.x;
        if (!x || x.slice(0, 3).some((v) => v < -1e-9)) continue;
        const obj = x.reduce((s, v, j) => s + ((v - y[j]) / sigma[j]) ** 2, 0);
        if (obj < best.obj) best = { obj, x };
      }
      for (let j = 0; j < 4; j++) expect(Math.abs(r.x[j] - best.x[j])).toBeLessThan(1e-8);
      expect(r.objective).toBeCloseTo(best.obj, 8);
    }
    // The release rule was exercised, not only the holding rule.
    expect(released).toBeGreaterThan(10);
  });
});

describe('bad problems and failures are results, not exceptions', () => {
  it('a zero sigma, a repeated name and a wrong name count each get one message', () => {
    const p = hxProblem(ALL);
    p.variables[1] = { ...p.variables[1], measured: { value: 64.45, sigma: 0 } };
    p.variables[4] = { ...p.variables[4], name: 'F1' };
    const bad = { variables: p.variables, constraints: { ...p.constraints, names: ['splitter'] } };
    const r = reconcile(bad);
    expect(r.status).toBe('invalid');
    expect(r.issues, r.issues.join("\n")).toHaveLength(3);
    expect(r.issues.join('\n')).toMatch(/"F1" appears twice/);
    expect(r.issues.join('\n')).toMatch(/1 names for 4 constraints/);
    expect(r.issues.join('\n')).toMatch(/"F2": standard uncertainty 0/);
    expect(r.estimates).toEqual([]);
  });

  it('a balance that is not a number at the start is invalid, naming the balance', () => {
    const r = reconcile({
      variables: [{ name: 'a', start: 0, measured: { value: 1, sigma: 0.1 } }, { name: 'b', start: 0 }],
      constraints: { count: 1, names: ['ratio'], evaluate: (x, out) => void (out[0] = Math.log(x[1]) - x[0]) },
    });
    expect(r.status).toBe('invalid');
    expect(r.message).toMatch(/"ratio" is not a finite number at the start/);
  });

  it('balances that contradict each other end not-converged, with no estimates', () => {
    const r = reconcile({
      variables: [{ name: 'a', start: 0 }, { name: 'b', start: 1, measured: { value: 1, sigma: 0.1 } }],
      constraints: linearBalances([[1, 0], [1, 0]], ['a is 1', 'a is 2'], [1, 2]),
    });
    expect(r.status).toBe('not-converged');
    expect(r.message).toMatch(/cannot all be met/);
    expect(r.estimates).toEqual([]);
    expect(r.globalTest).toBeUndefined();
  });

  it('a negative constraint count and a confidence above 1 are reported, not thrown', () => {
    const p = hxProblem(ALL);
    const r = reconcile({ variables: p.variables, constraints: { ...p.constraints, count: -1, names: [] } }, { confidence: 1.5 });
    expect(r.status).toBe('invalid');
    expect(r.issues.join('\n')).toMatch(/count -1 is not a whole number/);
    expect(r.issues.join('\n')).toMatch(/confidence 1.5 is not between 0 and 1/);
  });

  it('snapshots with the wrong length are invalid', () => {
    const prep = prepareReconciliation(hxProblem(ALL));
    const r = prep.solve({ values: [1, 2, 3] });
    expect(r.status).toBe('invalid');
    expect(r.issues[0]).toMatch(/values has 3 entries, the problem has 6 variables/);
  });
});

describe('a prepared problem over many snapshots', () => {
  it('gives the same answer as a fresh solve, and a missing reading makes its variable unmeasured', () => {
    const prep = prepareReconciliation(hxProblem(ALL));
    for (let row = 0; row < 5; row++) {
      const values = HX_Y.map((v, j) => v + 0.3 * Math.sin(row + j));
      const a = prep.solve({ values });
      const fresh = reconcile({ ...hxProblem(ALL), variables: hxProblem(ALL).variables.map((v, j) => ({ ...v, measured: { value: values[j], sigma: 1 } })) });
      for (let j = 0; j < 6; j++) expect(a.x[j]).toBeCloseTo(fresh.x[j], 12);
    }
    const values = HX_Y.slice();
    values[1] = NaN;
    const missing = prep.solve({ values });
    expect(missing.estimates[1].role).toBe('unmeasured');
    expect(missing.estimates[1].classification).toBe('observable');
    expect(missing.redundancy).toBe(3);
  });
});
