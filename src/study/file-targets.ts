/**
 * Targets written in the file:
 *   targets:
 *     - { output: streams.recycle.fractions.N2, value: 0.10, by: purge-split.out.recycle, within: "0.8:0.999" }
 * `value` carries a unit where the output has one ("2 kmol/h"); `within` is LOW:HIGH with an
 * optional unit (the file's unit of the adjusted input when absent); `tolerance` is optional.
 */
import type { Node } from 'yaml';
import { InputError, type Diagnostic } from '../diagnostics.js';
import type { ParametricFlowsheet } from './params.js';
import { parseTarget, type TargetSpec } from './point.js';

export function fileTargets(p: ParametricFlowsheet): TargetSpec[] {
  const node: Node | null = p.base.targetsNode;
  if (!node) return [];
  const r = p.base.reader;
  const items = r.list(node, '`targets`');
  const problems: Diagnostic[] = [];
  const out: TargetSpec[] = [];
  for (const item of items ?? []) {
    const f = r.entries(item, 'a target');
    if (!f) continue;
    r.checkKeys(f, ['output', 'value', 'by', 'within', 'tolerance'], 'a target');
    const get = (k: string) => r.find(f, k);
    const need = (k: string) => {
      const e = get(k);
      if (!e) problems.push({ severity: 'error', message: `a target has no \`${k}\``, span: r.at(item), help: 'write `{ output: PATH, value: V, by: INPUT, within: "LOW:HIGH" }`' });
      return e;
    };
    const o = need('output');
    const v = need('value');
    const b = need('by');
    if (!o || !v || !b) continue;
    const output = r.string(o.value, 'the target output');
    const value = r.scalar(v.value, 'the target value');
    const by = r.string(b.value, 'the adjusted input');
    const w = get('within');
    let within: string | undefined;
    if (w) {
      if (r.isSeq(w.value)) {
        const parts = (r.list(w.value, '`within`') ?? []).map((n) => r.scalar(n, 'a bound'));
        if (parts.length !== 2) problems.push({ severity: 'error', message: '`within` needs two bounds', span: r.at(w.value), help: 'write `within: [0.001, 0.2]` or `within: "0.001:0.2"`' });
        else within = `${parts[0]}:${parts[1]}`;
      } else within = String(r.scalar(w.value, '`within`'));
    }
    const tol = get('tolerance') ? r.number(get('tolerance')!.value, 'the target tolerance', '1e-8') : undefined;
    if (output === undefined || value === undefined || value === null || by === undefined) continue;
    try {
      out.push(parseTarget(p, `${output} = ${value}`, by, within, tol));
    } catch (e) {
      if (!(e instanceof InputError)) throw e;
      for (const d of e.diagnostics) problems.push({ ...d, span: d.span ?? r.at(item) });
    }
  }
  problems.push(...r.bag.errors());
  if (problems.length) throw new InputError(problems);
  return out;
}
