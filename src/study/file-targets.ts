/**
 * Targets written in the file:
 *   targets:
 *     - { output: streams.recycle.fractions.N2, value: 0.10, by: purge-split.out.recycle, within: "0.8:0.999" }
 * `value` carries a unit where the output has one ("2 kmol/h"); `within` is LOW:HIGH with an
 * optional unit (the file's unit of the adjusted parameter when absent); `tolerance` is optional.
 * Each problem is reported at the target's position in the file.
 */
import { InputError, type Diagnostic } from '../diagnostics.js';
import type { Model } from '../flowsheet/model.js';
import { parseTarget, type TargetSpec } from './point.js';

export function fileTargets(model: Model): TargetSpec[] {
  const problems: Diagnostic[] = [];
  const out: TargetSpec[] = [];
  for (const t of model.targets) {
    try {
      out.push(parseTarget(model, `${t.output} = ${t.value}`, t.by, t.within, t.tolerance));
    } catch (e) {
      if (!(e instanceof InputError)) throw e;
      for (const d of e.diagnostics) problems.push({ ...d, span: d.span ?? t.span });
    }
  }
  if (problems.length) throw new InputError(problems);
  return out;
}
