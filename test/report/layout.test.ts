import { describe, expect, it } from 'vitest';
import type { ReportTopology } from '../../src/report/html/input.js';
import { elkGraph, layoutFlowsheet, type Box, type Layout } from '../../src/report/html/layout.js';
import { DEMOS, inputOf, streamNames, TRAIN } from './solved.js';


function overlap(a: Box, b: Box): boolean {
  return a.x < b.x + b.w && b.x < a.x + a.w && a.y < b.y + b.h && b.y < a.y + a.h;
}

/** Every box that holds text or a symbol: edge labels, unit names, unit symbols, feed and product flags. */
function boxes(l: Layout): { what: string; box: Box }[] {
  const out: { what: string; box: Box }[] = [];
  for (const n of l.nodes) {
    out.push({ what: `${n.kind} ${n.name}`, box: n });
    if (n.label) out.push({ what: `name of ${n.name}`, box: n.label });
  }
  for (const e of l.edges) if (e.label) out.push({ what: `label of stream ${e.label.text}`, box: e.label });
  return out;
}

function overlaps(l: Layout): string[] {
  const b = boxes(l);
  const found: string[] = [];
  for (let i = 0; i < b.length; i++) for (let j = i + 1; j < b.length; j++) if (overlap(b[i].box, b[j].box)) found.push(`${b[i].what} / ${b[j].what}`);
  return found;
}

function checkLayout(t: ReportTopology, l: Layout): void {
  expect(overlaps(l)).toEqual([]);
  const units = l.nodes.filter((n) => n.kind === 'unit');
  const left = Math.min(...units.map((n) => n.x));
  const right = Math.max(...units.map((n) => n.x + n.w));
  for (const n of l.nodes) {
    if (n.kind === 'feed') expect(n.x + n.w).toBeLessThanOrEqual(left);
    if (n.kind === 'product') expect(n.x).toBeGreaterThanOrEqual(right);
  }
  // Every stream is routed from its source to its target, with right-angled segments only.
  const names = streamNames({ ...t } as never);
  expect(l.edges.map((e) => e.stream).sort()).toEqual([...names].sort());
  for (const e of l.edges) {
    expect(e.points.length).toBeGreaterThanOrEqual(2);
    for (let k = 0; k + 1 < e.points.length; k++) {
      const a = e.points[k];
      const b = e.points[k + 1];
      expect(a.x === b.x || a.y === b.y).toBe(true);
    }
  }
  // Every stream that is neither a feed nor a product carries its name as a label; all have a size.
  for (const e of l.edges) {
    const named = !t.feeds.includes(e.stream) && !t.products.includes(e.stream);
    expect(e.label !== undefined).toBe(named);
    if (e.label) expect(e.label.w).toBeGreaterThan(e.label.text.length * 6);
  }
}

describe('flowsheet layout (elkjs, layered, orthogonal)', () => {
  for (const file of DEMOS) {
    it(`${file}: no label overlaps another label or a symbol; feeds left, products right`, async () => {
      const t = inputOf(file).topology;
      checkLayout(t, await layoutFlowsheet(t));
    });
  }

  it('a larger train with nested recycles, long names and an unknown unit type lays out without overlaps', async () => {
    const l = await layoutFlowsheet(TRAIN);
    checkLayout(TRAIN, l);
    expect(l.nodes.find((n) => n.name === 'recycle-compressor')!.type).toBe('booster');
  });

  it('the same topology gives the same layout (input order fixed)', async () => {
    const a = await layoutFlowsheet(TRAIN);
    const b = await layoutFlowsheet(JSON.parse(JSON.stringify(TRAIN)) as ReportTopology);
    expect(b).toEqual(a);
    const g = elkGraph(TRAIN);
    expect(g.children!.map((c) => c.id)).toEqual([
      ...TRAIN.feeds.map((f) => `feed:${f}`), ...TRAIN.units.map((u) => `unit:${u.name}`), ...TRAIN.products.map((p) => `product:${p}`),
    ]);
  });

  it('ports keep the file\'s order: a unit\'s inlets top to bottom, its outlets top to bottom', async () => {
    const l = await layoutFlowsheet(TRAIN);
    const mixer = TRAIN.units[0];
    const ends = mixer.inlets.map((s) => l.edges.find((e) => e.stream === s)!.points.at(-1)!.y);
    expect([...ends].sort((p, q) => p - q)).toEqual(ends);
    const column = TRAIN.units.find((u) => u.name === 'product-column')!;
    const starts = column.outlets.map((s) => l.edges.find((e) => e.stream === s)!.points[0].y);
    expect([...starts].sort((p, q) => p - q)).toEqual(starts);
  });
});
