/**
 * Raw closure of a balance from readings, before any reconciliation: how far in and out differ,
 * (in - out) / in, and its uncertainty by first-order propagation for uncorrelated inputs (JCGM
 * 100:2008, "Guide to the expression of uncertainty in measurement", Sec. 5.1, law of
 * propagation of uncertainty, eq. (10)), expanded with a coverage factor k = 2 (about 95 % for a
 * normal distribution, JCGM 100:2008 Sec. 6.3.3).
 *
 * Each side is a sum of terms; a term is a coefficient times a product of readings (a flow, or a
 * flow times a fraction times atoms per molecule for an element balance). A reading that appears
 * in several terms (the same purge meter in two element balances, the same flow on both sides)
 * is one input quantity: its sensitivity collects every appearance.
 *     f = (I - O) / I = 1 - O / I,  df/dq = (O dI/dq - I dO/dq) / I^2,
 *     u^2(f) = sum_q (df/dq)^2 u^2(q).
 */

export interface ClosureQuantity {
  name: string;
  value: number;
  /** Standard uncertainty (coverage factor already divided out), >= 0. */
  sigma: number;
}

export interface ClosureTerm {
  /** Default 1. */
  coefficient?: number;
  /** Indices into quantities, multiplied together. */
  factors: readonly number[];
}

export interface ClosureInput {
  quantities: readonly ClosureQuantity[];
  inflow: readonly ClosureTerm[];
  outflow: readonly ClosureTerm[];
}

export interface ClosureResult {
  status: 'ok' | 'invalid';
  issues: string[];
  inflow: number;
  outflow: number;
  /** in - out and its standard uncertainty. */
  imbalance: number;
  imbalanceUncertainty: number;
  /** (in - out) / in, its standard uncertainty, the coverage factor and k times it. */
  relative: number;
  relativeUncertainty: number;
  coverageFactor: number;
  relativeExpanded: number;
  /** Per quantity: sensitivity of (in - out) / in and its share of the variance. */
  contributions: { name: string; index: number; sensitivity: number; share: number }[];
}

/** `contributions: false` leaves the per-quantity contributions out (an empty list): the figures are the same. */
export function closure(input: ClosureInput, options: { coverageFactor?: number; contributions?: boolean } = {}): ClosureResult {
  const k = options.coverageFactor ?? 2;
  const { quantities } = input;
  const issues: string[] = [];
  quantities.forEach((q) => {
    if (!Number.isFinite(q.value)) issues.push(`quantity "${q.name}": value ${q.value} is not a finite number`);
    if (!(Number.isFinite(q.sigma) && q.sigma >= 0)) issues.push(`quantity "${q.name}": standard uncertainty ${q.sigma} is not a number >= 0`);
  });
  for (const [side, terms] of [['inflow', input.inflow], ['outflow', input.outflow]] as const) {
    terms.forEach((t, i) => {
      if (t.factors.length === 0) issues.push(`${side} term ${i + 1}: no factors; give at least one quantity index`);
      for (const f of t.factors) {
        if (!Number.isInteger(f) || f < 0 || f >= quantities.length) issues.push(`${side} term ${i + 1}: factor ${f} is not a quantity index (0..${quantities.length - 1})`);
      }
      if (t.coefficient !== undefined && !Number.isFinite(t.coefficient)) issues.push(`${side} term ${i + 1}: coefficient ${t.coefficient} is not a finite number`);
    });
  }
  if (!(Number.isFinite(k) && k > 0)) issues.push(`coverage factor ${k} is not a positive number`);
  const empty: ClosureResult = {
    status: 'invalid',
    issues,
    inflow: NaN,
    outflow: NaN,
    imbalance: NaN,
    imbalanceUncertainty: NaN,
    relative: NaN,
    relativeUncertainty: NaN,
    coverageFactor: k,
    relativeExpanded: NaN,
    contributions: [],
  };
  if (issues.length > 0) return empty;

  const nq = quantities.length;
  const side = (terms: readonly ClosureTerm[]) => {
    let total = 0;
    // Plain arrays: typed arrays this small cost more to allocate than to use.
    const d: number[] = new Array<number>(nq).fill(0);
    for (let t = 0; t < terms.length; t++) {
      const factors = terms[t].factors;
      const c = terms[t].coefficient ?? 1;
      let prod = c;
      for (let a = 0; a < factors.length; a++) prod *= quantities[factors[a]].value;
      total += prod;
      // Product rule: for each appearance, the product of the other factors.
      for (let pos = 0; pos < factors.length; pos++) {
        let other = c;
        for (let p2 = 0; p2 < factors.length; p2++) if (p2 !== pos) other *= quantities[factors[p2]].value;
        d[factors[pos]] += other;
      }
    }
    return { total, d };
  };
  const I = side(input.inflow);
  const O = side(input.outflow);
  if (!(I.total > 0)) {
    issues.push(`the inflow is ${I.total}, not positive: (in - out) / in needs a positive inflow`);
    return { ...empty, inflow: I.total, outflow: O.total };
  }
  let varImb = 0;
  let varRel = 0;
  const sens: number[] = new Array<number>(nq).fill(0);
  for (let q = 0; q < nq; q++) {
    const u2 = quantities[q].sigma ** 2;
    const dImb = I.d[q] - O.d[q];
    sens[q] = (O.total * I.d[q] - I.total * O.d[q]) / (I.total * I.total);
    varImb += dImb * dImb * u2;
    varRel += sens[q] * sens[q] * u2;
  }
  const relativeUncertainty = Math.sqrt(varRel);
  return {
    status: 'ok',
    issues,
    inflow: I.total,
    outflow: O.total,
    imbalance: I.total - O.total,
    imbalanceUncertainty: Math.sqrt(varImb),
    relative: (I.total - O.total) / I.total,
    relativeUncertainty,
    coverageFactor: k,
    relativeExpanded: k * relativeUncertainty,
    contributions: options.contributions === false ? [] : quantities.map((q, index) => ({
      name: q.name,
      index,
      sensitivity: sens[index],
      share: varRel > 0 ? (sens[index] ** 2 * q.sigma ** 2) / varRel : 0,
    })),
  };
}
