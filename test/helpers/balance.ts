/**
 * An independent check of a solved flowsheet's closure: the atoms of every element in the
 * fresh feeds against the atoms in the products, counted here from the reported stream flows
 * and the component formulas (not from the solver's own balance).
 */
import type { FlowsheetResult } from '../../src/flowsheet/solve.js';
import { parseFormula } from '../../src/thermo/formula.js';

export function elementClosure(r: FlowsheetResult): number {
  const counts = r.model.components.map((c) => {
    const f = parseFormula(c.formula) as unknown;
    return f instanceof Map ? Object.fromEntries(f as Map<string, number>) : (f as Record<string, number>);
  });
  const feeds = new Set(r.feeds.map((f) => f.name));
  const atoms = (names: Iterable<string>) => {
    const a: Record<string, number> = {};
    for (const name of names) {
      const s = r.streams.get(name)!;
      s.flows.forEach((v, i) => {
        for (const [el, k] of Object.entries(counts[i])) a[el] = (a[el] ?? 0) + k * v;
      });
    }
    return a;
  };
  const inA = atoms(feeds);
  const outA = atoms(r.products.filter((p) => !feeds.has(p)));
  let worst = 0;
  for (const el of new Set([...Object.keys(inA), ...Object.keys(outA)])) {
    const a = inA[el] ?? 0;
    const b = outA[el] ?? 0;
    if (a === 0 && b === 0) continue;
    worst = Math.max(worst, Math.abs(a - b) / Math.max(a, b));
  }
  return worst;
}
