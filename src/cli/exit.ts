/** Exit codes of loopclose. */
import type { Status } from '../solve/types.js';

export const EXIT = {
  ok: 0,
  internal: 1,
  input: 2,
  notConverged: 3,
  infeasible: 4,
} as const;

export function exitCodeOf(status: Status): number {
  switch (status) {
    case 'converged':
      return EXIT.ok;
    case 'not-converged':
      return EXIT.notConverged;
    case 'infeasible':
      return EXIT.infeasible;
    case 'invalid':
      return EXIT.input;
  }
}
