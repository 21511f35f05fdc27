/**
 * Distribution values for the gross-error tests, from the stdlib distribution packages
 * (no distribution function of our own).
 *
 *  - global test: chi-square with dof = redundancy; critical value at the confidence, p-value;
 *  - measurement test: standard normal with the Sidak correction for N simultaneous tests,
 *    level beta = 1 - (1 - alpha)^(1/N), critical value the quantile 1 - beta/2
 *    (Narasimhan and Jordache, "Data Reconciliation and Gross Error Detection", 2000, ch. 7).
 */
import chisquareCdf from '@stdlib/stats-base-dists-chisquare-cdf';
import chisquareQuantile from '@stdlib/stats-base-dists-chisquare-quantile';
import normalQuantile from '@stdlib/stats-base-dists-normal-quantile';

/** Chi-square quantile: P(X <= value) = confidence for X ~ chi-square(dof). */
export function chiSquareCritical(dof: number, confidence: number): number {
  return chisquareQuantile(confidence, dof);
}

/** P(X >= statistic) for X ~ chi-square(dof). */
export function chiSquarePValue(statistic: number, dof: number): number {
  return 1 - chisquareCdf(statistic, dof);
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
