import { describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { DiagnosticBag, InputError } from '../../src/diagnostics.js';
import { loadFlowsheet } from '../../src/flowsheet/load.js';
import { checkStructure } from '../../src/flowsheet/structure.js';
import { parameter, withValues } from '../../src/study/parameters.js';
import { ROOT } from '../helpers/cli.js';

/**
 * withValues skips the structure checks when a unit's structureKey says nothing they read has
 * changed: its verdict must be the checks' own, for every value, in any order (the zero
 * values and full conversions are where the structure changes).
 */
function verdicts(file: string, path: string, values: number[]): { memo: boolean[]; full: boolean[] } {
  const { model } = loadFlowsheet(join(ROOT, 'flowsheets', file));
  const p = parameter(model, path);
  const memo: boolean[] = [];
  const full: boolean[] = [];
  for (const value of values) {
    let ok = true;
    try {
      withValues(model, [{ parameter: p, value }]);
    } catch (e) {
      if (!(e instanceof InputError)) throw e;
      ok = false;
    }
    memo.push(ok);
    const bag = new DiagnosticBag();
    checkStructure(withValues(model, [{ parameter: p, value }], { structure: false }), bag);
    full.push(!bag.hasErrors);
  }
  return { memo, full };
}

describe('structure checks of a changed value, skipped only where the structure is the same', () => {
  it('a splitter: a recycle of 1 (no purge) is refused where the condenser lets H2 out nowhere else, after and before values that pass', () => {
    const r = verdicts('methanol-pilot-split.yaml', 'purge-split.out.recycle', [0.95, 0.96, 1, 0.97, 1]);
    expect(r.memo).toEqual(r.full);
    expect(r.memo).toEqual([true, true, false, true, false]);
  });

  it('a condenser split: every verdict the checks\' own, through a recovery of 0 and 1', () => {
    const r = verdicts('methanol-pilot-split.yaml', 'cooler.split.CO2', [0.01, 0.02, 0, 0.5, 1, 0.01]);
    expect(r.memo).toEqual(r.full);
  });

  it('a reactor: conversions from 0 (no reaction) to 1 (the key used up) give the checks\' own verdicts', () => {
    const r = verdicts('methanol-pilot.yaml', 'reactor.reactions.0.conversion', [0.25, 0.3, 0, 0.2, 1, 0.5]);
    expect(r.memo).toEqual(r.full);
  });

  it('the ammonia loop\'s purge, down to zero and back', () => {
    const r = verdicts('ammonia-loop.yaml', 'purge-split.out.purge', [0.025, 0.03, 0, 0.02]);
    expect(r.memo).toEqual(r.full);
  });
});
