/** Report inputs of the demo flowsheets, solved through the library (no CLI, no clock). */
import { solveFlowsheet } from '../../src/flowsheet/solve.js';
import { reportInputOf } from '../../src/report/html/adapter.js';
import type { ReportInput } from '../../src/report/html/input.js';
import { ParametricFlowsheet } from '../../src/study/params.js';

export const DEMOS = ['flowsheets/ammonia-loop.yaml', 'flowsheets/benzene-hydrogenation.yaml', 'flowsheets/methanol-pilot.yaml', 'flowsheets/methanol-pilot-split.yaml'];

export function inputOf(file: string, opts: { maxPasses?: number; flowUnit?: string } = {}): ReportInput {
  const p = new ParametricFlowsheet(file);
  const r = solveFlowsheet(p.base.model, opts.maxPasses ? { maxPasses: opts.maxPasses, method: 'wegstein' } : {});
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
