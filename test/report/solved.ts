/** Report inputs of the demo flowsheets, solved through the library (no CLI, no clock). */
import { solveFlowsheet } from '../../src/flowsheet/solve.js';
import { reportInputOf } from '../../src/report/html/adapter.js';
import type { ReportInput, ReportTopology } from '../../src/report/html/input.js';
import { loadFlowsheet } from '../../src/flowsheet/validate.js';

export const DEMOS = ['flowsheets/ammonia-loop.yaml', 'flowsheets/benzene-hydrogenation.yaml', 'flowsheets/methanol-pilot.yaml', 'flowsheets/methanol-pilot-split.yaml'];

export function inputOf(file: string, opts: { maxPasses?: number; flowUnit?: string } = {}): ReportInput {
  const model = loadFlowsheet(file).model;
  const r = solveFlowsheet(model, opts.maxPasses ? { maxPasses: opts.maxPasses, method: 'wegstein' } : {});
  return reportInputOf(r, { flowUnit: opts.flowUnit });
}

/** Every stream name of a topology. */
export function streamNames(t: ReportInput['topology']): string[] {
  return [...new Set([...t.feeds, ...t.units.flatMap((u) => [...u.inlets, ...u.outlets]), ...t.products])];
}

/** The text content of every <text> element of an SVG or HTML text. */
export function svgTexts(svg: string): string[] {
  return [...svg.matchAll(/<text\b[^>]*>([^<]*)<\/text>/g)].map((m) => m[1].replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&quot;/g, '"').replace(/&amp;/g, '&'));
}

/** Two stages with nested recycles, long names and a four-way separator: a harder layout than the demos. */
export const TRAIN: ReportTopology = {
  feeds: ['fresh-hydrogen-makeup', 'aromatics-feed', 'quench-gas'],
  units: [
    { name: 'first-stage-mixer', type: 'mixer', inlets: ['fresh-hydrogen-makeup', 'aromatics-feed', 'first-stage-recycle', 'liquid-return'], outlets: ['first-reactor-in'] },
    { name: 'first-reactor', type: 'reactor', inlets: ['first-reactor-in'], outlets: ['first-reactor-out'] },
    { name: 'interstage-cooler', type: 'condenser', inlets: ['first-reactor-out'], outlets: ['interstage-gas', 'interstage-liquid'] },
    { name: 'interstage-split', type: 'splitter', inlets: ['interstage-gas'], outlets: ['first-stage-recycle', 'to-second-stage'] },
    { name: 'second-stage-mixer', type: 'mixer', inlets: ['to-second-stage', 'quench-gas', 'second-stage-recycle'], outlets: ['second-reactor-in'] },
    { name: 'second-reactor', type: 'reactor', inlets: ['second-reactor-in'], outlets: ['second-reactor-out'] },
    { name: 'hp-flash', type: 'flash', inlets: ['second-reactor-out'], outlets: ['hp-gas', 'hp-liquid'] },
    { name: 'purge-split', type: 'splitter', inlets: ['hp-gas'], outlets: ['purge', 'second-stage-recycle', 'overall-recycle'] },
    { name: 'liquid-mixer', type: 'mixer', inlets: ['interstage-liquid', 'hp-liquid'], outlets: ['column-feed'] },
    { name: 'product-column', type: 'separator', inlets: ['column-feed'], outlets: ['light-ends', 'product', 'heavy-ends', 'liquid-return'] },
    { name: 'recycle-compressor', type: 'booster', inlets: ['overall-recycle'], outlets: ['compressed-recycle'] },
  ],
  products: ['purge', 'light-ends', 'product', 'heavy-ends', 'compressed-recycle'],
  tears: ['first-stage-recycle', 'second-stage-recycle', 'liquid-return'],
  loops: [['first-stage-mixer', 'first-reactor', 'interstage-cooler', 'interstage-split', 'second-stage-mixer', 'second-reactor', 'hp-flash', 'purge-split', 'liquid-mixer', 'product-column']],
  recycles: ['first-stage-recycle', 'second-stage-recycle', 'liquid-return'],
};
