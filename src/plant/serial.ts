/**
 * Serial elimination of gross errors (Ripps, "Adjustment of experimental data", Chem. Eng.
 * Prog. Symp. Ser. 61 (1965) 8-13; Serth and Heenan, "Gross error detection and data
 * reconciliation in steam-metering systems", AIChE J. 32 (1986) 733-742; as set out in
 * Narasimhan and Jordache, "Data Reconciliation and Gross Error Detection", Gulf 2000, ch. 8).
 *
 * While the global test fails: the redundant reading with the largest measurement-test
 * statistic is taken out (its variable becomes unmeasured), the rest are reconciled again, and
 * the reading's bias is estimated as the reading minus the value the other readings and the
 * balances now imply, with the uncertainty sqrt(sigma^2 + u^2(implied)). The search stops when
 * the global test passes, when taking the next reading out would leave a variable the caller
 * needs unobservable, when no redundant reading is left, or when a reconciliation does not
 * converge. Readings whose test statistic equals the largest one (to 1e-6 relative) are named
 * beside the suspect: the balances cannot tell which of them is wrong (their columns of the
 * projected balance matrix are parallel, so any bias in one shows the same in the others).
 */
import type { PreparedReconciliation } from './reconcile.js';
import type { ReconcileResult, Snapshot } from './types.js';

export interface Suspect {
  index: number;
  name: string;
  reading: number;
  sigma: number;
  /** Its measurement-test statistic and critical value when it was taken out. */
  statistic: number;
  critical: number;
  /** The value the other readings and the balances imply, and its standard uncertainty. */
  implied: number;
  impliedUncertainty: number;
  /** reading - implied, its standard uncertainty, and bias / reading. */
  bias: number;
  biasUncertainty: number;
  relativeBias: number;
  /** Readings with the same test statistic: the data cannot tell them apart from this one. */
  indistinguishableFrom: string[];
}

export type SerialStopReason =
  | 'global-test-passed'
  | 'no-redundancy'
  | 'would-lose-observability'
  | 'nothing-left'
  | 'limit'
  | 'not-converged'
  | 'invalid';

export interface SerialEliminationResult {
  /**
   * clean: the global test passes with every reading; suspects-found: it passes once the
   * suspects are out; not-resolved: it still fails (see stopReason) or the problem has no
   * redundancy left to test; not-redundant: no reading is checked by another, so there is
   * nothing to test; not-converged / invalid: a reconciliation failed.
   */
  status: 'clean' | 'suspects-found' | 'not-resolved' | 'not-redundant' | 'not-converged' | 'invalid';
  stopReason: SerialStopReason;
  message: string;
  /** In the order taken out. */
  suspects: Suspect[];
  /** The reconciliation with every reading. */
  initial: ReconcileResult;
  /** The reconciliation without the suspects (the initial one when there are none). */
  final: ReconcileResult;
}

export interface SerialOptions {
  /** Most readings to take out (default: no limit but the redundancy). */
  maxSuspects?: number;
  /** Variable indices that must stay determined (measured or observable). Default: every
   *  variable determined in the reconciliation with all readings. */
  required?: readonly number[];
  /** The reconciliation of this snapshot with every reading, when the caller has it already
   *  (prepared.solve(snapshot)): it is not solved again. */
  initial?: ReconcileResult;
}

const TIE = 1e-6;

export function serialElimination(prepared: PreparedReconciliation, snapshot: Snapshot = {}, options: SerialOptions = {}): SerialEliminationResult {
  const baseUnmeasured = snapshot.unmeasured ?? [];
  const removed: number[] = [];
  const solveWithout = () => prepared.solve({ ...snapshot, unmeasured: [...baseUnmeasured, ...removed] });
  const initial = options.initial ?? solveWithout();
  if (initial.status === 'invalid' || initial.status === 'not-converged') {
    return { status: initial.status, stopReason: initial.status, message: initial.message, suspects: [], initial, final: initial };
  }
  const required = options.required ?? initial.estimates.filter((e) => e.value !== null).map((e) => e.index);
  const maxSuspects = options.maxSuspects ?? Infinity;
  const suspects: Suspect[] = [];
  let current = initial;
  let stopReason: SerialStopReason;
  for (;;) {
    const test = current.globalTest!;
    if (test.status === 'passed') {
      stopReason = 'global-test-passed';
      break;
    }
    if (test.status === 'not-redundant') {
      stopReason = 'no-redundancy';
      break;
    }
    if (suspects.length >= maxSuspects) {
      stopReason = 'limit';
      break;
    }
    const candidates = current.estimates.filter((e) => e.test);
    if (candidates.length === 0) {
      stopReason = 'nothing-left';
      break;
    }
    // The largest statistic; among readings tied with it (to rounding), the first in problem order.
    const largest = Math.max(...candidates.map((e) => e.test!.statistic));
    const tied = candidates.filter((e) => e.test!.statistic >= largest * (1 - TIE));
    const top = tied[0];
    removed.push(top.index);
    const trial = solveWithout();
    if (trial.status === 'invalid' || trial.status === 'not-converged') {
      removed.pop();
      stopReason = trial.status;
      break;
    }
    const lost = required.filter((j) => trial.estimates[j].value === null);
    const implied = trial.estimates[top.index];
    if (lost.length > 0 || implied.value === null) {
      removed.pop();
      stopReason = 'would-lose-observability';
      break;
    }
    const bias = top.reading! - implied.value;
    suspects.push({
      index: top.index,
      name: top.name,
      reading: top.reading!,
      sigma: top.sigma!,
      statistic: top.test!.statistic,
      critical: top.test!.critical,
      implied: implied.value,
      impliedUncertainty: implied.uncertainty!,
      bias,
      biasUncertainty: Math.sqrt(top.sigma! ** 2 + implied.uncertainty! ** 2),
      relativeBias: bias / top.reading!,
      indistinguishableFrom: tied.slice(1).map((e) => e.name),
    });
    current = trial;
  }
  const passed = current.globalTest?.status === 'passed';
  let status: SerialEliminationResult['status'];
  if (stopReason === 'not-converged' || stopReason === 'invalid') status = stopReason;
  else if (initial.status === 'not-redundant') status = 'not-redundant';
  else if (passed) status = suspects.length === 0 ? 'clean' : 'suspects-found';
  else status = 'not-resolved';
  const names = suspects.map((s) => `"${s.name}" (bias ${formatPercent(s.relativeBias)} of its reading)`).join(', ');
  let message: string;
  switch (status) {
    case 'clean':
      message = 'no gross error found: the global test passes with every reading';
      break;
    case 'not-redundant':
      message = 'no test possible: no reading is checked by another (redundancy 0)';
      break;
    case 'suspects-found':
      message = `suspect reading${suspects.length === 1 ? '' : 's'}: ${names}; the global test passes without ${suspects.length === 1 ? 'it' : 'them'}`;
      break;
    case 'not-resolved': {
      const why = current.globalTest?.status === 'not-redundant' ? 'cannot be run (no redundancy left)' : 'still fails';
      message = `not resolved (${stopReason})${suspects.length > 0 ? `: taken out so far ${names}` : ''}; the global test ${why}`;
      break;
    }
    default:
      message = `stopped: a reconciliation was ${stopReason}${suspects.length > 0 ? ` after taking out ${names}` : ''}`;
  }
  return { status, stopReason, message, suspects, initial, final: current };
}

function formatPercent(f: number): string {
  const s = (f * 100).toFixed(1);
  return `${f >= 0 ? '+' : ''}${s} %`;
}
