/**
 * Structural checks before solving: whether a steady state can exist at all.
 *
 * Nothing here looks at numbers beyond "zero or not": the checks follow where each component
 * can go, unit by unit, and find the three structural reasons for which no (non-zero) steady
 * state exists, before any iteration:
 *  1. A recycle loop that nothing enters (no feed, no stream from outside): its only steady
 *     state is zero flow.
 *  2. A component trapped in a recycle loop: it enters (with a feed, or formed by a reaction)
 *     but no outlet of the loop can carry it and no reaction uses it up, so it builds up
 *     without bound (an inert with no purge, a by-product with no outlet).
 *  3. A reaction whose key reactant (or another reactant) never reaches its reactor: no feed
 *     carries it and no reaction upstream forms it.
 *
 * Where a component can go is each block's own statement (BlockDef.structure in src/blocks):
 * a splitter sends it to every outlet with a fraction above zero, a separator to every outlet
 * with a recovery above zero, a reactor also forms the products of reactions whose reactants
 * all reach it and uses up its reactants, and so on; a block that says nothing sends
 * everything everywhere (no false alarms). Problems that only one kind of block can have (a
 * reactant that never reaches a reactor) are that block's own check, given what reaches it.
 * "Can carry" is a reachability fixpoint over the streams (least fixpoint from the feeds), and
 * the loops of one component are the strongly connected components (Tarjan, via graph.ts) of
 * the graph of streams that can carry it.
 */
import type { DiagnosticBag, SourceSpan } from '../diagnostics.js';
import { blockOf } from '../blocks/registry.js';
import type { StructureRules } from '../blocks/types.js';
import type { Model, UnitSpecBase } from './model.js';
import { stronglyConnected } from './graph.js';

interface Net {
  units: readonly UnitSpecBase[];
  rules: StructureRules[];
  /** Stream -> index of the unit that makes it (-1: a feed). */
  maker: Map<string, number>;
  /** Stream -> index of the unit that takes it (-1: a product). */
  taker: Map<string, number>;
  feedNames: Set<string>;
}

const EVERYWHERE: StructureRules = { passes: () => true };

/** Least fixpoint of "stream s can carry component i", from the feeds. */
function reach(model: Model, net: Net): { carry: Map<string, Uint8Array>; inlet: Uint8Array[] } {
  const n = model.ids.length;
  const carry = new Map<string, Uint8Array>();
  for (const f of model.feeds) carry.set(f.name, Uint8Array.from(f.composition, (x) => (x > 0 ? 1 : 0)));
  for (const u of net.units) for (const o of u.outlets) carry.set(o, new Uint8Array(n));
  const inlet = net.units.map(() => new Uint8Array(n));
  for (let changed = true; changed; ) {
    changed = false;
    net.units.forEach((u, k) => {
      const have = inlet[k];
      for (const s of u.inlets) {
        const c = carry.get(s);
        if (c) for (let i = 0; i < n; i++) have[i] |= c[i];
      }
      const rule = net.rules[k];
      const src = rule.transform ? rule.transform(have).out : have;
      u.outlets.forEach((o, j) => {
        const c = carry.get(o)!;
        for (let i = 0; i < n; i++) {
          if (src[i] && !c[i] && rule.passes(j, i)) {
            c[i] = 1;
            changed = true;
          }
        }
      });
    });
  }
  return { carry, inlet };
}

/** Strongly connected components of the units over the edges kept. */
function components(nu: number, edges: readonly [number, number][]): { component: Int32Array; cyclic: Uint8Array; count: number } {
  const start = new Int32Array(nu + 1);
  for (const [a] of edges) start[a + 1]++;
  for (let v = 0; v < nu; v++) start[v + 1] += start[v];
  const fill = start.slice(0, nu);
  const edge = new Int32Array(edges.length);
  const to = Int32Array.from(edges, (e) => e[1]);
  edges.forEach(([a], k) => (edge[fill[a]++] = k));
  const { component, count } = stronglyConnected(nu, start, edge, to);
  const size = new Int32Array(count);
  for (let v = 0; v < nu; v++) size[component[v]]++;
  const cyclic = new Uint8Array(count);
  for (let c = 0; c < count; c++) if (size[c] > 1) cyclic[c] = 1;
  for (const [a, b] of edges) if (a === b) cyclic[component[a]] = 1;
  return { component, cyclic, count };
}

/**
 * Adds to the bag every structural problem of the model: loops that nothing enters, components
 * trapped in a loop, and what each block finds wrong with what reaches it. Nothing is kept
 * between calls: the answer depends on the model given, all of it.
 */
export function checkStructure(model: Model, bag: DiagnosticBag): void {
  const units = model.units;
  const nu = units.length;
  if (nu === 0) return;
  const n = model.ids.length;
  const maker = new Map<string, number>();
  const taker = new Map<string, number>();
  const feedNames = new Set(model.feeds.map((f) => f.name));
  for (const f of model.feeds) maker.set(f.name, -1);
  units.forEach((u, k) => u.outlets.forEach((o) => maker.set(o, k)));
  units.forEach((u, k) => u.inlets.forEach((s) => taker.set(s, k)));
  const rules = units.map((u) => blockOf(u)?.structure?.(u, model) ?? EVERYWHERE);
  const net: Net = { units, rules, maker, taker, feedNames };

  // Calculation order, for naming loops the way the report shows them.
  const rank = new Map<string, number>(model.plan.order.map((name, k) => [name, k]));
  const byOrder = (a: number, b: number) => rank.get(units[a].name)! - rank.get(units[b].name)!;
  /** The loop's units in calculation order, starting from `first` when given (where material enters). */
  const loopText = (members: number[], first?: number) => {
    const sorted = members.slice().sort(byOrder);
    const k = first === undefined ? 0 : Math.max(0, sorted.indexOf(first));
    return [...sorted.slice(k), ...sorted.slice(0, k)].map((v) => units[v].name).join(' -> ');
  };
  const spanOf = (k: number): SourceSpan | undefined => model.unitSpans.get(units[k].name) ?? units[k].span;

  // 1. Recycle loops that nothing enters.
  const all: [number, number][] = [];
  units.forEach((u, a) => u.outlets.forEach((o) => {
    const b = taker.get(o);
    if (b !== undefined) all.push([a, b]);
  }));
  const whole = components(nu, all);
  const dead = new Uint8Array(whole.count);
  for (let c = 0; c < whole.count; c++) {
    if (!whole.cyclic[c]) continue;
    const members: number[] = [];
    for (let v = 0; v < nu; v++) if (whole.component[v] === c) members.push(v);
    const fed = members.some((v) => units[v].inlets.some((s) => {
      const m = maker.get(s);
      return m === undefined || m < 0 || whole.component[m] !== c;
    }));
    if (fed) continue;
    dead[c] = 1;
    const first = members.slice().sort(byOrder)[0];
    bag.error(`the recycle loop ${loopText(members)} has no feed: nothing enters it, so its only steady state is zero flow`,
      spanOf(first), `take a feed into one of its units (add the feed's name to the \`in\` of \`${units[first].name}\`, for example)`);
  }

  const { carry, inlet } = reach(model, net);

  // 2. Components trapped in a recycle loop.
  for (let i = 0; i < n; i++) {
    const id = model.ids[i];
    const edges: [number, number][] = [];
    units.forEach((u, a) => u.outlets.forEach((o, j) => {
      const b = taker.get(o);
      if (b !== undefined && carry.get(o)![i] && rules[a].passes(j, i)) edges.push([a, b]);
    }));
    const sc = components(nu, edges);
    for (let c = 0; c < sc.count; c++) {
      if (!sc.cyclic[c]) continue;
      const members: number[] = [];
      for (let v = 0; v < nu; v++) if (sc.component[v] === c) members.push(v);
      if (members.some((v) => dead[whole.component[v]])) continue;
      let exit = false;
      for (const v of members) {
        const u = units[v];
        if (rules[v].transform?.(inlet[v]).consumed[i]) exit = true;
        u.outlets.forEach((o, j) => {
          const b = taker.get(o);
          if ((b === undefined || sc.component[b] !== c) && rules[v].passes(j, i)) exit = true;
        });
        if (exit) break;
      }
      if (exit) continue;
      // Where it comes in: with a feed or a stream from outside, or formed by a reaction.
      const sorted = members.slice().sort(byOrder);
      let entry: { unit: number; how: string } | undefined;
      for (const v of sorted) {
        const u = units[v];
        const from = u.inlets.find((s) => {
          const m = maker.get(s);
          return carry.get(s)?.[i] && (m === undefined || m < 0 || sc.component[m] !== c);
        });
        if (from !== undefined) {
          entry = { unit: v, how: feedNames.has(from) ? `with feed \`${from}\` into \`${u.name}\`` : `with stream \`${from}\` into \`${u.name}\`` };
          break;
        }
        if (rules[v].transform?.(inlet[v]).formed[i]) {
          entry = { unit: v, how: `formed in reactor \`${u.name}\`` };
          break;
        }
      }
      // A blocked way out to point at: an outlet that leaves the loop but carries none of it.
      let blocked: { unit: number; help: string } | undefined;
      for (const v of sorted) {
        const u = units[v];
        u.outlets.forEach((o, j) => {
          if (blocked) return;
          const b = taker.get(o);
          if (b !== undefined && sc.component[b] === c) return;
          const help = rules[v].openOutlet?.(j, id);
          if (help) blocked = { unit: v, help };
        });
        if (blocked) break;
      }
      const at = blocked?.unit ?? entry?.unit ?? sorted[0];
      bag.error(
        `\`${id}\` is trapped in the recycle loop ${loopText(members, entry?.unit)}: it comes in${entry ? ` ${entry.how}` : ''} but no outlet of the loop carries it and no reaction uses it up, so it builds up without bound and there is no steady state`,
        spanOf(at),
        blocked?.help ?? `add a purge (a splitter in the loop with an outlet that leaves it, e.g. \`out: { purge: 0.01, recycle: rest }\`) or a separator outlet that takes \`${id}\` out of the loop`,
      );
    }
  }

  // 3. What each block finds wrong with what reaches it (a reactant that never arrives).
  units.forEach((u, v) => {
    const check = rules[v].check;
    if (!check || dead[whole.component[v]]) return;
    if (!inlet[v].some((x) => x) && bag.hasErrors) return; // nothing reaches it: reported upstream
    check(inlet[v], (message, help) => bag.error(message, spanOf(v), help));
  });
}
