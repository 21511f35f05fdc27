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
 * Where a component can go, per unit:
 *  - mixer, reactor: everything to the one outlet (a reactor also forms the products of its
 *    reactions whose reactants all reach it, and uses up its reactants);
 *  - splitter: to every outlet with a fraction above zero;
 *  - separator: to every outlet with a recovery of that component above zero;
 *  - condenser / flash, `model: split`: to the liquid when its split is above zero, to the
 *    vapour when it is below one; `model: equilibrium`: either way (any component dissolves a
 *    little), except under the ideal-gas model, where the flash gives no liquid;
 *  - a unit type not known here: everything to every outlet (no false alarms).
 * "Can carry" is a reachability fixpoint over the streams (least fixpoint from the feeds), and
 * the loops of one component are the strongly connected components (Tarjan, via graph.ts) of
 * the graph of streams that can carry it.
 */
import type { Diagnostic, DiagnosticBag, SourceSpan } from '../diagnostics.js';
import type { Model, UnitSpecBase } from './model.js';
import { planFlowsheet, stronglyConnected } from './graph.js';
import type { ReactorSpec } from '../blocks/reactor.js';
import type { SplitterSpec } from '../blocks/splitter.js';
import type { SeparatorSpec } from '../blocks/separator.js';
import type { CondenserSpec } from '../blocks/condenser.js';

/** A fraction at or below this is "nothing goes there". */
const ZERO = 0;

interface Net {
  units: readonly UnitSpecBase[];
  /** Stream -> index of the unit that makes it (-1: a feed). */
  maker: Map<string, number>;
  /** Stream -> index of the unit that takes it (-1: a product). */
  taker: Map<string, number>;
  feedNames: Set<string>;
}

/** Whether unit u can send component i to its k-th outlet. */
function passes(model: Model, u: UnitSpecBase, k: number, i: number): boolean {
  switch (u.type) {
    case 'mixer':
    case 'reactor':
      return true;
    case 'splitter':
      return (u as SplitterSpec).fractions[k] > ZERO;
    case 'separator':
      return (u as SeparatorSpec).recovery[k][i] > ZERO;
    case 'condenser':
    case 'flash': {
      const c = u as CondenserSpec;
      // outlets: [vapour, liquid]
      if (c.model === 'split' && c.split) return k === 1 ? c.split[i] > ZERO : c.split[i] < 1;
      if (model.thermo.eos === 'ideal') return k === 0;
      return true;
    }
    default:
      return true;
  }
}

/** Whether a reaction runs at all (a zero conversion or extent does nothing). */
function active(rx: ReactorSpec['reactions'][number]): boolean {
  return rx.conversion !== undefined ? rx.conversion > 0 : (rx.extent ?? 0) > 0;
}

/**
 * What a reactor's outlet can carry, given what reaches its inlet: the inlet's components,
 * the products of reactions whose reactants all reach it, less a key used up completely
 * (conversion 1) and not formed again. Also returns what the reactions use up.
 */
function reactorOutlet(spec: ReactorSpec, inlet: Uint8Array): { out: Uint8Array; consumed: Uint8Array; formed: Uint8Array } {
  const n = inlet.length;
  const cur = Uint8Array.from(inlet);
  const consumed = new Uint8Array(n);
  const formed = new Uint8Array(n);
  const canRun = (rx: ReactorSpec['reactions'][number], have: Uint8Array) => {
    if (!active(rx)) return false;
    for (let i = 0; i < n; i++) if (rx.nu[i] < 0 && !have[i]) return false;
    return true;
  };
  if (spec.sequence) {
    for (const rx of spec.reactions) {
      if (!canRun(rx, cur)) continue;
      for (let i = 0; i < n; i++) {
        if (rx.nu[i] < 0) consumed[i] = 1;
        if (rx.nu[i] > 0) {
          cur[i] = 1;
          formed[i] = 1;
        }
      }
      if (rx.conversion !== undefined && rx.conversion >= 1) cur[rx.key] = 0;
    }
  } else {
    const fullKey = new Float64Array(n);
    for (const rx of spec.reactions) {
      if (!canRun(rx, inlet)) continue;
      for (let i = 0; i < n; i++) {
        if (rx.nu[i] < 0) consumed[i] = 1;
        if (rx.nu[i] > 0) formed[i] = 1;
      }
      if (rx.conversion !== undefined) fullKey[rx.key] += rx.conversion;
    }
    for (let i = 0; i < n; i++) {
      if (formed[i]) cur[i] = 1;
      else if (fullKey[i] >= 1 - 1e-12) cur[i] = 0;
    }
  }
  return { out: cur, consumed, formed };
}

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
      const src = u.type === 'reactor' ? reactorOutlet(u as ReactorSpec, have).out : have;
      u.outlets.forEach((o, j) => {
        const c = carry.get(o)!;
        for (let i = 0; i < n; i++) {
          if (src[i] && !c[i] && passes(model, u, j, i)) {
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
 * The checks depend only on the file, the names and connections, and which numbers are zero,
 * one or in between; a study solving many points of one file asks the same question over and
 * over, so the answers (the diagnostics) are kept for the last few such signatures.
 */
const ANSWERS = new Map<string, Diagnostic[]>();
const MAX_ANSWERS = 32;

function signature(model: Model): string {
  const cls = (v: number) => (v === 0 ? 0 : v === 1 ? 1 : Number.isNaN(v) ? 3 : 2);
  return JSON.stringify([model.file, model.ids, model.thermo.eos, model.tears, [...model.unitSpans], model.feeds.map((f) => [f.name, Array.from(f.composition, cls), f.span]), model.units], (_k, v) => {
    if (typeof v === 'number') return cls(v);
    if (v instanceof Float64Array) return Array.from(v, cls);
    return v;
  });
}

export function checkStructure(model: Model, bag: DiagnosticBag): void {
  const key = signature(model);
  const known = ANSWERS.get(key);
  if (known) {
    bag.items.push(...known);
    return;
  }
  const before = bag.items.length;
  checkStructureNow(model, bag);
  if (ANSWERS.size >= MAX_ANSWERS) ANSWERS.delete(ANSWERS.keys().next().value!);
  ANSWERS.set(key, bag.items.slice(before));
}

function checkStructureNow(model: Model, bag: DiagnosticBag): void {
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
  const net: Net = { units, maker, taker, feedNames };

  // Calculation order, for naming loops the way the report shows them.
  let rank = new Map<string, number>(units.map((u, k) => [u.name, k]));
  try {
    const plan = planFlowsheet(units.map((u) => ({ name: u.name, inlets: u.inlets, outlets: u.outlets })), model.tears);
    rank = new Map(plan.order.map((name, k) => [name, k]));
  } catch {
    /* connection problems are reported elsewhere; file order will do */
  }
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
      if (b !== undefined && carry.get(o)![i] && passes(model, u, j, i)) edges.push([a, b]);
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
        if (u.type === 'reactor' && reactorOutlet(u as ReactorSpec, inlet[v]).consumed[i]) exit = true;
        u.outlets.forEach((o, j) => {
          const b = taker.get(o);
          if ((b === undefined || sc.component[b] !== c) && passes(model, u, j, i)) exit = true;
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
        if (u.type === 'reactor' && reactorOutlet(u as ReactorSpec, inlet[v]).formed[i]) {
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
          if (u.type === 'splitter') blocked = { unit: v, help: `give the outlet \`${o}\` of splitter \`${u.name}\` a fraction above zero (a purge), e.g. 0.01` };
          else if (u.type === 'separator') blocked = { unit: v, help: `give \`${id}\` a recovery above zero to the outlet \`${o}\` of separator \`${u.name}\`` };
          else if (u.type === 'condenser' || u.type === 'flash') blocked = { unit: v, help: `let some \`${id}\` go to \`${o}\` in the \`split\` of \`${u.name}\`` };
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

  // 3. Reactants that never reach their reactor.
  units.forEach((u, v) => {
    if (u.type !== 'reactor') return;
    if (dead[whole.component[v]]) return;
    const have = Uint8Array.from(inlet[v]);
    if (!have.some((x) => x) && bag.hasErrors) return; // nothing reaches it: reported upstream
    const spec = u as ReactorSpec;
    for (const rx of spec.reactions) {
      if (active(rx)) {
        const missing: number[] = [];
        for (let i = 0; i < n; i++) if (rx.nu[i] < 0 && !have[i]) missing.push(i);
        if (missing.includes(rx.key)) {
          bag.error(`the key reactant \`${model.ids[rx.key]}\` of reaction \`${rx.equation}\` never reaches reactor \`${u.name}\`: no feed carries it and no reaction upstream forms it`,
            spanOf(v), `add \`${model.ids[rx.key]}\` to the composition of a feed upstream of \`${u.name}\`, or remove the reaction`);
        } else if (missing.length > 0) {
          const names = missing.map((i) => `\`${model.ids[i]}\``).join(', ');
          bag.error(`reactant${missing.length > 1 ? 's' : ''} ${names} of reaction \`${rx.equation}\` never reach${missing.length > 1 ? '' : 'es'} reactor \`${u.name}\`: no feed carries ${missing.length > 1 ? 'them' : 'it'} and no reaction upstream forms ${missing.length > 1 ? 'them' : 'it'}`,
            spanOf(v), `feed ${names} upstream of \`${u.name}\`, or change the equation`);
        }
      }
      if (spec.sequence && active(rx) && rx.nu.every((x, i) => x >= 0 || have[i])) {
        for (let i = 0; i < n; i++) if (rx.nu[i] > 0) have[i] = 1;
      }
    }
  });
}
