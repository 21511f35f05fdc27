/**
 * Recycle streams: streams inside a recycle loop that enter a unit which also takes a stream
 * from outside that loop (the gas returned to the makeup mixer, say). They give the recycle
 * ratio and are the tears an engineer would choose.
 */
import type { GraphUnit, Plan } from './graph.js';

export function findRecycles(units: readonly GraphUnit[], plan: Pick<Plan, 'loops'>): string[] {
  const loopOf = new Map<string, number>();
  plan.loops.forEach((names, k) => names.forEach((u) => loopOf.set(u, k)));
  const maker = new Map<string, string>();
  for (const u of units) for (const o of u.outlets) maker.set(o, u.name);
  const out: string[] = [];
  for (const u of units) {
    const k = loopOf.get(u.name);
    if (k === undefined) continue;
    const inside = u.inlets.filter((s) => maker.has(s) && loopOf.get(maker.get(s)!) === k);
    const outside = u.inlets.filter((s) => !maker.has(s) || loopOf.get(maker.get(s)!) !== k);
    if (inside.length > 0 && outside.length > 0) out.push(...inside);
  }
  return out;
}
