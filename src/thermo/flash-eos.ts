/**
 * The two calls of an equation of state that the flashes make in their inner loops, without the
 * RootResult object that `Eos.lnPhi` and `Eos.z` return: the cubic's allocation-free entry
 * points (`CubicEos.lnPhiInto`, `zValue` with `lastRoot`), and the general ones for any other
 * model. Same numbers either way. The short cut is taken only when the object's `lnPhi` (`z`)
 * is the cubic's own: a wrapper that changes them (a test's, a model built on a cubic) is
 * called through them.
 */
import { CubicEos } from './eos.js';
import type { Eos, RootChoice } from './types.js';

const CUBIC_LN_PHI = CubicEos.prototype.lnPhi;
const CUBIC_Z = CubicEos.prototype.z;

/** ln phi of composition x at T, P on the chosen root, into out. */
export function lnPhiInto(eos: Eos, T: number, P: number, x: ArrayLike<number>, which: RootChoice, out: Float64Array): void {
  if (eos instanceof CubicEos && eos.lnPhi === CUBIC_LN_PHI) eos.lnPhiInto(T, P, x, which, out);
  else eos.lnPhi(T, P, x, which, out);
}

/** The label of the stable root of composition x at T, P. */
export function stableRootOf(eos: Eos, T: number, P: number, x: ArrayLike<number>): 'vapor' | 'liquid' {
  if (eos instanceof CubicEos && eos.z === CUBIC_Z) {
    eos.zValue(T, P, x, 'stable');
    return eos.lastRoot;
  }
  return eos.z(T, P, x, 'stable').root;
}
