/**
 * Real roots of the monic cubic Z^3 + c2 Z^2 + c1 Z + c0 = 0.
 *
 * Method: reduce to the depressed cubic t^3 + p t + q = 0 with Z = t - c2/3, then
 *  - one real root (discriminant D = (q/2)^2 + (p/3)^3 > 0): Cardano's formula written in the
 *    cancellation-free form u = cbrt(-q/2 - sign(q) sqrt(D)), t = u - p/(3u);
 *  - three real roots (D <= 0): Viete's trigonometric form
 *    t_k = 2 sqrt(-p/3) cos( (1/3) acos( (3q/(2p)) sqrt(-3/p) ) - 2 pi k / 3 ), k = 0, 1, 2.
 * (e.g. Press, Teukolsky, Vetterling and Flannery, Numerical Recipes, 3rd ed., section 5.6.)
 * Two roots far below the third are taken from the quadratic left by dividing the third out
 * (with D > 0 this also finds them when rounding gave D the wrong sign).
 * Each real root is then polished by Newton's method on the original cubic until the relative
 * step is at most 1e-12 (or the step stops shrinking), which removes the rounding error of the
 * closed forms near double roots and for widely separated roots.
 */

const TWO_PI_3 = (2 * Math.PI) / 3;

/** Newton-polish one root of the monic cubic. */
export function polishCubicRoot(c2: number, c1: number, c0: number, z: number): number {
  for (let it = 0; it < 8; it++) {
    const f = ((z + c2) * z + c1) * z + c0;
    const df = (3 * z + 2 * c2) * z + c1;
    if (df === 0 || !Number.isFinite(df)) break;
    const dz = f / df;
    z -= dz;
    if (Math.abs(dz) <= 1e-12 * Math.max(Math.abs(z), 1e-300)) break;
  }
  return z;
}

/**
 * Given a root z0 of the monic cubic, the other two are the roots of z^2 + e1 z + e0 with
 * e1 = c2 + z0 (so their sum is -e1) and e0 = -c0/z0 (their product). z0 is first sharpened by
 * one more Newton step, as e1 is a difference of nearly equal numbers when the two lie far below
 * z0. When they are real, writes all three roots, ascending, to out and returns true;
 * otherwise leaves out untouched and returns false.
 */
function deflatedRoots(c2: number, c1: number, c0: number, z0: number, out: Float64Array): boolean {
  if (z0 === 0) return false;
  const f = ((z0 + c2) * z0 + c1) * z0 + c0;
  const df = (3 * z0 + 2 * c2) * z0 + c1;
  if (df !== 0 && Number.isFinite(df)) z0 -= f / df;
  const e1 = c2 + z0;
  const e0 = -c0 / z0;
  const disc = e1 * e1 - 4 * e0;
  if (!(disc >= 0)) return false;
  const h = -0.5 * (e1 + (e1 >= 0 ? Math.sqrt(disc) : -Math.sqrt(disc)));
  if (h === 0) return false;
  storeSorted(out, polishCubicRoot(c2, c1, c0, h), polishCubicRoot(c2, c1, c0, e0 / h), z0);
  return true;
}

/**
 * Writes the real roots, ascending, to out[0..k-1] and returns k (1 or 3). With three real
 * roots of which two coincide (D = 0 exactly), the double root is written twice.
 * Allocation-free.
 */
export function solveCubic(c2: number, c1: number, c0: number, out: Float64Array): 1 | 3 {
  const s = c2 / 3;
  const p = c1 - c2 * s;
  const q = ((2 * s * s - c1) * s) + c0; // = 2 c2^3/27 - c1 c2/3 + c0
  const D = 0.25 * q * q + (p * p * p) / 27;
  if (D > 0) {
    const sq = Math.sqrt(D);
    const u = Math.cbrt(q >= 0 ? -0.5 * q - sq : -0.5 * q + sq);
    const t = u === 0 ? 0 : u - p / (3 * u);
    const z0 = polishCubicRoot(c2, c1, c0, t - s);
    out[0] = z0;
    // D is a difference of nearly equal terms when two roots lie close together far below the
    // third (the liquid and middle roots of an equation of state at a few mPa, Z ~ 1e-12
    // against Z ~ 1): its sign is lost to rounding there. The quadratic left by dividing out
    // z0 keeps the precision and says whether the other two are real after all.
    return deflatedRoots(c2, c1, c0, z0, out) ? 3 : 1;
  }
  if (p === 0) {
    // triple root (q = 0 as well since D <= 0)
    const z = -s;
    out[0] = z;
    out[1] = z;
    out[2] = z;
    return 3;
  }
  const r = Math.sqrt(-p / 3);
  let arg = (1.5 * q) / (p * r); // = (3q/(2p)) sqrt(-3/p)
  if (arg > 1) arg = 1;
  else if (arg < -1) arg = -1;
  const phi = Math.acos(arg) / 3;
  const twoR = 2 * r;
  // phi is in [0, pi/3]: k = 0 gives the largest, k = 1 the middle, k = 2 the smallest root
  const t3 = twoR * Math.cos(phi) - s;
  const t2 = twoR * Math.cos(phi - TWO_PI_3) - s;
  const t1 = twoR * Math.cos(phi - 2 * TWO_PI_3) - s;
  // Two roots far below the third in magnitude carry its absolute rounding error (and when D
  // rounds to about 0 they can be lost altogether): take them from the quadratic left by
  // dividing out the largest.
  const big = Math.abs(t1) > Math.abs(t3) ? t1 : t3;
  const other = Math.max(Math.abs(big === t1 ? t3 : t1), Math.abs(t2));
  if (other < 1e-2 * Math.abs(big) && deflatedRoots(c2, c1, c0, polishCubicRoot(c2, c1, c0, big), out)) return 3;
  let z3 = polishCubicRoot(c2, c1, c0, t3);
  // sorted ascending (polishing near a double root can swap neighbours)
  storeSorted(out, polishCubicRoot(c2, c1, c0, t1), polishCubicRoot(c2, c1, c0, t2), z3);
  return 3;
}

/** Three roots into out[0..2] in ascending order. */
function storeSorted(out: Float64Array, a: number, b: number, c: number): void {
  let tmp: number;
  if (a > b) { tmp = a; a = b; b = tmp; }
  if (b > c) { tmp = b; b = c; c = tmp; }
  if (a > b) { tmp = a; a = b; b = tmp; }
  out[0] = a;
  out[1] = b;
  out[2] = c;
}
