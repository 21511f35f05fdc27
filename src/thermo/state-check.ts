/** Cheap argument checks shared by the equations of state (no allocation on success). */

export function checkState(T: number, P: number, x: ArrayLike<number>, n: number): void {
  if (!(T > 0) || T === Infinity) throw new RangeError(`temperature must be a finite positive number of kelvin, got ${T}`);
  if (!(P > 0) || P === Infinity) throw new RangeError(`pressure must be a finite positive number of pascal, got ${P}`);
  if (x.length !== n) throw new RangeError(`composition has ${x.length} entries, expected ${n}`);
}
