/**
 * The runnable flowsheet: blocks built from the model, streams allocated once, the plan
 * (calculation order and tears) from the graph. One `pass` evaluates the whole sequence.
 */
import { computeFeed, type FeedResult } from '../blocks/feed.js';
import { BLOCKS } from '../blocks/registry.js';
import { newStream, type BlockRuntime, type Stream } from '../blocks/types.js';
import type { EvaluationFailure } from '../solve/types.js';
import { makeEos } from '../thermo/eos.js';
import type { Eos } from '../thermo/types.js';
import { planFlowsheet, type Plan } from './graph.js';
import type { Model } from './model.js';

export interface Runtime {
  model: Model;
  eos: Eos;
  n: number;
  feeds: FeedResult[];
  /** Every stream by name. */
  streams: Map<string, Stream>;
  /** Stream names in the order they are made (feeds, then units in file order). */
  streamOrder: string[];
  blocks: BlockRuntime[];
  byName: Map<string, BlockRuntime>;
  plan: Plan;
  /** Blocks in calculation order, with their inlet and outlet streams resolved. */
  sequence: { block: BlockRuntime; ins: Stream[]; outs: Stream[] }[];
  /** Streams that no unit takes. */
  products: string[];
  /** Recycle streams: in a loop, entering a unit that also takes a stream from outside the loop. */
  recycles: string[];
  /** Tear streams' states. */
  tearStreams: Stream[];
  /** Unknowns per tear stream: n flows, then T and P. */
  perTear: number;
  /** Runs all blocks in order with the tear streams as they are. */
  pass(): void;
  /** The first block issue of the last pass, if any. */
  issues(): { unit: string; failure: EvaluationFailure }[];
}

export function buildRuntime(model: Model, eos?: Eos): Runtime {
  const n = model.ids.length;
  const theEos = eos ?? makeEos(model.thermo.eos, model.components, model.thermo.kij);
  const streams = new Map<string, Stream>();
  const streamOrder: string[] = [];
  const feeds = model.feeds.map((f) => computeFeed(f, theEos));
  for (const f of feeds) {
    const s = newStream(n);
    s.flows.set(f.flows);
    s.T = f.T;
    s.P = f.P;
    s.vf = f.phase === 'vapor' ? 1 : f.phase === 'liquid' ? 0 : Number.NaN;
    streams.set(f.name, s);
    streamOrder.push(f.name);
  }
  const blocks: BlockRuntime[] = [];
  const byName = new Map<string, BlockRuntime>();
  for (const u of model.units) {
    const b = BLOCKS[u.type].build(u, { model, eos: theEos });
    blocks.push(b);
    byName.set(u.name, b);
    for (const o of u.outlets) {
      streams.set(o, newStream(n));
      streamOrder.push(o);
    }
  }
  const taken = new Set(model.units.flatMap((u) => u.inlets));
  const products = streamOrder.filter((s) => !taken.has(s));
  const plan = planFor(model);
  const sequence = plan.order.map((name) => {
    const block = byName.get(name)!;
    return { block, ins: block.spec.inlets.map((s) => streams.get(s)!), outs: block.spec.outlets.map((s) => streams.get(s)!) };
  });
  const recycles = findRecycles(model, plan);
  // Start the tears at zero flow, at the conditions of the first feed.
  const tearStreams = plan.tears.map((t) => streams.get(t)!);
  for (const s of tearStreams) {
    s.T = feeds[0]?.T ?? 298.15;
    s.P = feeds[0]?.P ?? 101325;
  }
  const issues = () => {
    const out: { unit: string; failure: EvaluationFailure }[] = [];
    for (const { block } of sequence) {
      const f = block.issue();
      if (f) out.push({ unit: block.spec.name, failure: f });
    }
    return out;
  };
  return {
    model, eos: theEos, n, feeds, streams, streamOrder, blocks, byName, plan, sequence, products, recycles, tearStreams,
    perTear: n + 2,
    pass() {
      for (let k = 0; k < sequence.length; k++) {
        const s = sequence[k];
        s.block.compute(s.ins, s.outs);
      }
    },
    issues,
  };
}

/**
 * Plans by topology: a study builds a runtime per point on the same stream graph, so the plan
 * (loops, tears, order) is kept for the last few topologies seen (it depends on nothing else).
 */
const PLANS = new Map<string, Plan>();
const MAX_PLANS = 32;

function planFor(model: Model): Plan {
  const key = JSON.stringify([model.tears, model.units.map((u) => [u.name, u.inlets, u.outlets])]);
  const hit = PLANS.get(key);
  if (hit) return hit;
  const plan = planFlowsheet(model.units.map((u) => ({ name: u.name, inlets: u.inlets, outlets: u.outlets })), model.tears.length ? model.tears : preferredTears(model));
  if (PLANS.size >= MAX_PLANS) PLANS.delete(PLANS.keys().next().value!);
  PLANS.set(key, plan);
  return plan;
}

/**
 * Tears an engineer would choose: streams that close a loop back into a mixer from a
 * splitter, separator, condenser or flash. Offered to the planner only when they are as few
 * as the fewest that break every loop; the planner keeps its own choice otherwise.
 */
function preferredTears(model: Model): string[] | undefined {
  const plain = planFlowsheet(model.units.map((u) => ({ name: u.name, inlets: u.inlets, outlets: u.outlets })));
  if (plain.tears.length === 0) return undefined;
  const recycles = findRecycles(model, plain);
  if (recycles.length !== plain.tears.length) return undefined;
  try {
    const alt = planFlowsheet(model.units.map((u) => ({ name: u.name, inlets: u.inlets, outlets: u.outlets })), recycles);
    return alt.tears.length === plain.tears.length ? recycles : undefined;
  } catch {
    return undefined;
  }
}

function findRecycles(model: Model, plan: Plan): string[] {
  const loopOf = new Map<string, number>();
  plan.loops.forEach((units, k) => units.forEach((u) => loopOf.set(u, k)));
  const maker = new Map<string, string>();
  for (const u of model.units) for (const o of u.outlets) maker.set(o, u.name);
  const out: string[] = [];
  for (const u of model.units) {
    const k = loopOf.get(u.name);
    if (k === undefined) continue;
    const inside = u.inlets.filter((s) => maker.has(s) && loopOf.get(maker.get(s)!) === k);
    const outside = u.inlets.filter((s) => !maker.has(s) || loopOf.get(maker.get(s)!) !== k);
    if (inside.length > 0 && outside.length > 0) out.push(...inside);
  }
  return out;
}
