/**
 * Balance closure of a solved flowsheet: per component (in + generated - out), per element
 * and total mass, from the feeds, the products and the reactors' generation.
 */
import type { Runtime } from './runtime.js';

export interface ComponentBalance {
  in: number;
  out: number;
  generated: number;
  /** (in + generated - out) / max(in + consumed, out, tiny): signed, relative. */
  closure: number;
}

export interface ElementBalance {
  in: number;
  out: number;
  closure: number;
}

export interface Balance {
  components: Record<string, ComponentBalance>;
  elements: Record<string, ElementBalance>;
  /** kg/s */
  mass: { in: number; out: number; closure: number };
  /** Largest |closure| over components, elements and mass. */
  worst: number;
}

const TINY = 1e-300;

export function computeBalance(rt: Runtime): Balance {
  const { model, n } = rt;
  const inF = new Float64Array(n);
  const outF = new Float64Array(n);
  const gen = new Float64Array(n);
  for (const f of rt.feeds) for (let i = 0; i < n; i++) inF[i] += f.flows[i];
  for (const p of rt.products) {
    if (rt.feeds.some((f) => f.name === p)) continue; // a feed no unit takes is counted in and out
    const s = rt.streams.get(p)!;
    for (let i = 0; i < n; i++) outF[i] += s.flows[i];
  }
  for (const f of rt.feeds) {
    if (rt.products.includes(f.name)) for (let i = 0; i < n; i++) outF[i] += f.flows[i];
  }
  for (const b of rt.blocks) {
    const g = b.generation?.();
    if (g) for (let i = 0; i < n; i++) gen[i] += g[i];
  }
  const components: Record<string, ComponentBalance> = {};
  let worst = 0;
  model.ids.forEach((id, i) => {
    const scale = Math.max(inF[i] + Math.max(0, -gen[i]), outF[i], Math.abs(gen[i]), TINY);
    const c = (inF[i] + gen[i] - outF[i]) / scale;
    const closure = inF[i] === 0 && outF[i] === 0 && gen[i] === 0 ? 0 : c;
    components[id] = { in: inF[i], out: outF[i], generated: gen[i], closure };
    worst = Math.max(worst, Math.abs(closure));
  });
  const elements: Record<string, ElementBalance> = {};
  const names = new Set<string>();
  for (const e of model.elements) for (const k of Object.keys(e)) names.add(k);
  for (const el of [...names].sort()) {
    let a = 0;
    let b = 0;
    for (let i = 0; i < n; i++) {
      const k = model.elements[i][el] ?? 0;
      a += k * inF[i];
      b += k * outF[i];
    }
    const closure = a === 0 && b === 0 ? 0 : (a - b) / Math.max(a, b, TINY);
    elements[el] = { in: a, out: b, closure };
    worst = Math.max(worst, Math.abs(closure));
  }
  let mi = 0;
  let mo = 0;
  for (let i = 0; i < n; i++) {
    mi += inF[i] * model.components[i].MW;
    mo += outF[i] * model.components[i].MW;
  }
  const mc = mi === 0 && mo === 0 ? 0 : (mi - mo) / Math.max(mi, mo, TINY);
  worst = Math.max(worst, Math.abs(mc));
  return { components, elements, mass: { in: mi, out: mo, closure: mc }, worst };
}
