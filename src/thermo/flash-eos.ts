/**
 * The two calls of an equation of state that the flashes make in their inner loops, without the
 * RootResult object that `Eos.lnPhi` and `Eos.z` return: the cubic's allocation-free entry
 * points (`CubicEos.lnPhiInto`, `zValue` with `lastRoot`), and the general ones for any other
 * model. Same numbers either way.
 */
import { CubicEos } from './eos.js';
import type { Eos, RootChoice } from './types.js';

/** ln phi of composition x at T, P on the chosen root, into out. */
export function lnPhiInto(eos: Eos, T: number, P: number, x: ArrayLike<number>, which: RootChoice, out: Float64Array): void {
  if (eos instanceof CubicEos) eos.lnPhiInto(T, P, x, which, out);
  else eos.lnPhi(T, P, x, which, out);
}

/** The label of the stable root of composition x at T, P. */
export function stableRootOf(eos: Eos, T: number, P: number, x: ArrayLike<number>): 'vapor' | 'liquid' {
  if (eos instanceof CubicEos) {
    eos.zValue(T, P, x, 'stable');
    return eos.lastRoot;
  }
  return eos.z(T, P, x, 'stable').root;
}
