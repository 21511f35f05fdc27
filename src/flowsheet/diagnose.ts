/**
 * Why a loop that did not converge has no steady state, when the iterate shows it: a component
 * that enters the loop faster than it can leave builds up without bound. The structure checks
 * (structure.ts) find the components that cannot leave at all; this finds the ones that can
 * leave only a little, however much of them there is (a light gas that leaves only dissolved
 * in a condensate: the dissolved amount is capped by the gas's solubility, so a feed above the
 * cap has nowhere to go).
 *
 * Test: from the last iterate, direct passes of the loop. A component builds up when, over the
 * last passes,
 *  - less than half of what enters it (fresh feed plus net generation) leaves in the products,
 *  - its inventory in the tear streams grows by about what enters and does not leave (within a
 *    quarter), every pass,
 *  - and what leaves grows far more slowly than the inventory (it is capped: in a loop that is
 *    merely slow to converge, what leaves grows in proportion to what circulates).
 */
import { setTears, readTears } from './tear-problem.js';
import type { Runtime } from './runtime.js';

/** Passes run from the last iterate before judging. */
const PASSES = 40;
/** Passes judged at the end of the run. */
const WINDOW = 15;

export interface BuildUp {
  component: string;
  /** mol/s entering (fresh feed plus net generation) and leaving in the products, at the last pass. */
  entering: number;
  leaving: number;
  /** The units of the loop it builds up in, in calculation order. */
  loop: string[];
  /** Product streams it leaves by, if any. */
  exits: string[];
}

export function findBuildUp(rt: Runtime, x: Float64Array): BuildUp | undefined {
  if (rt.tearStreams.length === 0) return undefined;
  try {
    return judgeBuildUp(rt, x);
  } finally {
    // Leave the streams as the last iterate makes them (what a report of the result shows).
    setTears(rt, x);
    rt.pass();
  }
}

function judgeBuildUp(rt: Runtime, x: Float64Array): BuildUp | undefined {
  const n = rt.n;
  const cur = Float64Array.from(x);
  const next = new Float64Array(x.length);
  const inv = Array.from({ length: PASSES }, () => new Float64Array(n));
  const out = Array.from({ length: PASSES }, () => new Float64Array(n));
  const enter = Array.from({ length: PASSES }, () => new Float64Array(n));
  const feed = new Float64Array(n);
  for (const f of rt.feeds) for (let i = 0; i < n; i++) feed[i] += f.flows[i];
  const feedNames = new Set(rt.feeds.map((f) => f.name));
  for (let k = 0; k < PASSES; k++) {
    for (let i = 0; i < cur.length; i++) if (!Number.isFinite(cur[i])) return undefined;
    setTears(rt, cur);
    rt.pass();
    readTears(rt, next);
    for (const s of rt.tearOutputs) for (let i = 0; i < n; i++) inv[k][i] += s.flows[i];
    for (const p of rt.products) {
      if (feedNames.has(p)) continue;
      const s = rt.streams.get(p)!;
      for (let i = 0; i < n; i++) out[k][i] += s.flows[i];
    }
    for (let i = 0; i < n; i++) enter[k][i] = feed[i];
    for (const b of rt.blocks) {
      const g = b.generation?.();
      if (g) for (let i = 0; i < n; i++) enter[k][i] += g[i];
    }
    cur.set(next);
  }
  const a = PASSES - WINDOW;
  const z = PASSES - 1;
  let best: BuildUp | undefined;
  let bestExcess = 0;
  for (let i = 0; i < n; i++) {
    let ok = true;
    for (let k = a; k < z && ok; k++) {
      const excess = enter[k][i] - out[k][i];
      if (!(enter[k][i] > 0 && out[k][i] < 0.5 * enter[k][i])) ok = false;
      const grow = inv[k + 1][i] - inv[k][i];
      if (!(Math.abs(grow - excess) <= 0.25 * excess)) ok = false;
    }
    if (!ok) continue;
    const invGrowth = inv[z][i] / inv[a][i] - 1;
    const outGrowth = out[a][i] > 0 ? out[z][i] / out[a][i] - 1 : 0;
    if (!(invGrowth > 0) || !(outGrowth < 0.25 * invGrowth)) continue;
    const excess = enter[z][i] - out[z][i];
    if (excess > bestExcess) {
      bestExcess = excess;
      const id = rt.model.ids[i];
      const exits = rt.products.filter((p) => !feedNames.has(p) && rt.streams.get(p)!.flows[i] > 0);
      let t = 0;
      rt.tearOutputs.forEach((ts, k) => {
        if (ts.flows[i] > rt.tearOutputs[t].flows[i]) t = k;
      });
      const tear = rt.plan.tears[t];
      const loop = rt.plan.loops[rt.plan.loopTears.findIndex((l) => l.includes(tear))] ?? rt.plan.loops[0] ?? [];
      best = { component: id, entering: enter[z][i], leaving: out[z][i], loop, exits };
    }
  }
  return best;
}

/** The message of a build-up, with what to change. */
export function buildUpMessage(b: BuildUp): { message: string; help: string } {
  const fmt = (v: number) => Number(v.toPrecision(4)).toString();
  const way = b.exits.length ? `it leaves only in ${b.exits.map((e) => `\`${e}\``).join(', ')}, at most about ${fmt(b.leaving)} mol/s however much circulates` : 'nothing takes it out';
  return {
    message: `\`${b.component}\` builds up in the recycle loop ${b.loop.join(' -> ')}: ${fmt(b.entering)} mol/s enters (fresh feed and reactions) but ${way}, so there is no steady state`,
    help: `add a purge (a splitter in the loop with an outlet that leaves it, e.g. \`out: { purge: 0.01, recycle: rest }\`), or feed less \`${b.component}\``,
  };
}
