/**
 * Ideal gas: PV = RT, Z = 1, ln phi_i = 0 for every component and composition.
 */
import type { ComponentData, Eos, EosWork, RootChoice, RootResult } from './types.js';
import { R } from './constants.js';
import { checkState } from './state-check.js';

export class IdealGasEos implements Eos {
  readonly name = 'ideal' as const;
  readonly n: number;
  readonly components: readonly ComponentData[];
  readonly work: EosWork = {};

  constructor(comps: readonly ComponentData[]) {
    this.components = comps;
    this.n = comps.length;
  }

  z(T: number, P: number, x: ArrayLike<number>, _which?: RootChoice): RootResult {
    checkState(T, P, x, this.n);
    return { Z: 1, root: 'vapor', nRoots: 1, A: 0, B: 0 };
  }

  /** Z only, allocation-free. */
  zValue(T: number, P: number, x: ArrayLike<number>, _which?: RootChoice): number {
    checkState(T, P, x, this.n);
    return 1;
  }

  molarVolume(T: number, P: number, x: ArrayLike<number>, _which?: RootChoice): number {
    checkState(T, P, x, this.n);
    return (R * T) / P;
  }

  lnPhi(T: number, P: number, x: ArrayLike<number>, _which: RootChoice, out: Float64Array): RootResult {
    checkState(T, P, x, this.n);
    out.fill(0, 0, this.n);
    return { Z: 1, root: 'vapor', nRoots: 1, A: 0, B: 0 };
  }

  /** Residual Gibbs energy G^R/(RT) = 0. */
  residualGibbs(T: number, P: number, x: ArrayLike<number>, _which?: RootChoice): number {
    checkState(T, P, x, this.n);
    return 0;
  }
}
