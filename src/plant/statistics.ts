/**
 * Distribution values for the gross-error tests, from the stdlib distribution packages
 * (no distribution function of our own).
 *
 *  - global test: chi-square with dof = redundancy; critical value at the confidence, p-value;
 *  - measurement test: standard normal with the Sidak correction for N simultaneous tests,
 *    level beta = 1 - (1 - alpha)^(1/N), critical value the quantile 1 - beta/2
 *    (Narasimhan and Jordache, "Data Reconciliation and Gross Error Detection", 2000, ch. 7).
 */
import gammainc from '@stdlib/math-base-special-gammainc';
import chisquareQuantile from '@stdlib/stats-base-dists-chisquare-quantile';
import normalQuantile from '@stdlib/stats-base-dists-normal-quantile';

/** Chi-square quantile: P(X <= value) = confidence for X ~ chi-square(dof). */
export function chiSquareCritical(dof: number, confidence: number): number {
  return chisquareQuantile(confidence, dof);
}

/**
 * P(X >= statistic) for X ~ chi-square(dof): the upper regularised incomplete gamma function
 * Q(dof / 2, statistic / 2), evaluated as the upper tail itself. `1 - cdf` would lose every digit
 * below the machine epsilon: a gross error's p-value of 2.48e-15 came out as 2.44e-15 (a
 * multiple of 2^-52), and anything below 1.1e-16 as 0.
 */
export function chiSquarePValue(statistic: number, dof: number): number {
  if (!(statistic > 0)) return statistic === 0 ? 1 : Number.NaN;
  return gammainc(statistic / 2, dof / 2, true, true);
}

/**
 * "p = 2.2e-6" for a message; a p-value below 1e-300 (the tail of a huge gamma, where the double
 * underflows towards 0) as "p < 1e-300" rather than "p = 0.0", which would claim certainty.
 */
export function pValueText(p: number, digits: number): string {
  return p < 1e-300 && p >= 0 ? 'p < 1e-300' : `p = ${p.toPrecision(digits)}`;
}

/** Sidak level of each of `count` tests whose family has the given confidence: 1 - confidence^(1/count). */
export function sidakLevel(confidence: number, count: number): number {
  // -expm1(log(confidence) / count) keeps the digits that 1 - confidence^(1/count) would lose.
  return -Math.expm1(Math.log(confidence) / count);
}

/** Two-sided standard normal critical value at level beta: the quantile 1 - beta/2. */
export function normalCritical(level: number): number {
  return normalQuantile(1 - level / 2, 0, 1);
}
