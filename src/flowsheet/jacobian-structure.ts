/**
 * Sparsity of the tear Jacobian from the flowsheet graph, for Newton's finite differences.
 *
 * One pass of the calculation order maps the tear values x to recomputed tears g(x). A change
 * in tear stream t can only reach the units downstream of t's consumer along streams that are
 * not torn (within one pass the other tears are read, not recomputed). So g's rows for tear
 * stream u depend on tear t only when u is made by such a unit. Every variable of t (flows,
 * T, P) is given the rows of every variable of each tear it reaches (no finer structure is
 * assumed inside a stream: reactors and flashes couple components, T and P).
 * Newton then leaves the unreachable entries at exactly zero and perturbs together columns
 * whose row sets do not overlap (independent loops: one pass for several columns).
 */
import type { JacobianStructure } from '../solve/types.js';
import type { Runtime } from './runtime.js';

/**
 * rows[j] for x = g(x) over the tear vector of rt (tears in rt.plan.tears order, rt.perTear
 * variables each). Returns undefined when every tear reaches every tear (dense: nothing to gain).
 */
export function tearStructure(rt: Pick<Runtime, 'plan' | 'sequence' | 'perTear'>): JacobianStructure | undefined {
  const tears = rt.plan.tears;
  const T = tears.length;
  if (T === 0) return undefined;
  const m = rt.perTear;
  const torn = new Set(tears);
  // Stream -> units (sequence positions) that take it; unit -> its outlet streams.
  const takers = new Map<string, number[]>();
  rt.sequence.forEach(({ block }, k) => {
    for (const s of block.spec.inlets) {
      const list = takers.get(s);
      if (list) list.push(k);
      else takers.set(s, [k]);
    }
  });
  const tearIndex = new Map(tears.map((s, t) => [s, t] as const));
  const reach: number[][] = [];
  let dense = true;
  for (let t = 0; t < T; t++) {
    const seen = new Uint8Array(rt.sequence.length);
    const stack = [...(takers.get(tears[t]) ?? [])];
    for (const k of stack) seen[k] = 1;
    const reached = new Uint8Array(T);
    while (stack.length > 0) {
      const k = stack.pop()!;
      for (const out of rt.sequence[k].block.spec.outlets) {
        const u = tearIndex.get(out);
        if (u !== undefined) reached[u] = 1;
        if (torn.has(out)) continue; // read as a guess within the pass, not recomputed
        for (const next of takers.get(out) ?? []) {
          if (!seen[next]) {
            seen[next] = 1;
            stack.push(next);
          }
        }
      }
    }
    const list: number[] = [];
    for (let u = 0; u < T; u++) if (reached[u]) list.push(u);
    if (list.length < T) dense = false;
    reach.push(list);
  }
  if (dense) return undefined;
  const rows: number[][] = [];
  for (let t = 0; t < T; t++) {
    const r: number[] = [];
    for (const u of reach[t]) for (let i = 0; i < m; i++) r.push(u * m + i);
    for (let i = 0; i < m; i++) rows.push(r);
  }
  return { rows };
}
