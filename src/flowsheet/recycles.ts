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

/**
 * The recycle streams the recycle ratio sums. Where fresh material joins one loop at several
 * points in series (makeup hydrogen after the separator, the other reactant at the reactor's
 * mixer), each joining point has a recycle stream by the rule above, yet they carry the same
 * circulating gas, and summing them would count it twice. A recycle stream is left out when the
 * loop takes its material, through no reactor and without a branch inside the loop, into another
 * recycle stream: that one, nearer the reactor, is the recycle. If that would leave a loop none
 * (a loop without a reactor), its first is kept.
 */
export function ratioRecycles(units: readonly (GraphUnit & { type?: string })[], plan: Pick<Plan, 'loops'>, recycles: readonly string[]): string[] {
  if (recycles.length < 2) return [...recycles];
  const loopOf = new Map<string, number>();
  plan.loops.forEach((names, k) => names.forEach((u) => loopOf.set(u, k)));
  const taker = new Map<string, GraphUnit & { type?: string }>();
  for (const u of units) for (const s of u.inlets) taker.set(s, u);
  const set = new Set(recycles);
  const joinsAnother = (s: string): boolean => {
    let u = taker.get(s);
    const k = u && loopOf.get(u.name);
    for (let steps = 0; u && steps <= units.length; steps++) {
      if (u.type === 'reactor') return false;
      const inLoop = u.outlets.filter((o) => {
        const t = taker.get(o);
        return t !== undefined && loopOf.get(t.name) === k;
      });
      if (inLoop.length !== 1 || inLoop[0] === s) return false;
      if (set.has(inLoop[0])) return true;
      u = taker.get(inLoop[0]);
    }
    return false;
  };
  const kept = recycles.filter((s) => !joinsAnother(s));
  const loopOfStream = (s: string) => loopOf.get(taker.get(s)?.name ?? '');
  for (const s of recycles) {
    const k = loopOfStream(s);
    if (!kept.some((t) => loopOfStream(t) === k)) kept.push(s);
  }
  return recycles.filter((s) => kept.includes(s));
}
