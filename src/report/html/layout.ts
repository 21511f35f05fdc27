/**
 * Layout of the flowsheet drawing by elkjs (layered algorithm, fixed ports, orthogonal edge
 * routing). Feeds are placed in the first layer, products in the last; every label has a size
 * so that the layout keeps them apart. The graph is built in a fixed order (feeds, units in the
 * file's order, products; streams in the order they are met), so one file always gives one
 * drawing. elkjs is loaded when a drawing is made, not when the CLI starts.
 */
import type { ReportTopology } from './input.js';

/** Label fonts: monospace, so that a label's width is known without a browser. */
export const FONT = {
  family: "'DejaVu Sans Mono', 'Liberation Mono', Menlo, Consolas, monospace",
  /** Advance of one character as a share of the font size (DejaVu Sans Mono: 0.602; a little spare). */
  advance: 0.62,
  stream: 11,
  unit: 12,
  flag: 11,
};

export function textWidth(text: string, size: number): number {
  return Math.ceil(text.length * size * FONT.advance) + 4;
}

export interface Box {
  x: number;
  y: number;
  w: number;
  h: number;
}

export interface Label extends Box {
  text: string;
}

export interface PlacedNode extends Box {
  kind: 'feed' | 'product' | 'unit';
  name: string;
  /** Unit type (units only). */
  type?: string;
  /** The unit's name below its shape (units; flags carry their name inside). */
  label?: Label;
}

export interface PlacedEdge {
  stream: string;
  /** The routed line, start to end (arrow at the end). */
  points: { x: number; y: number }[];
  label?: Label;
  /** Names of the nodes at its ends (a feed's and a product's node has the stream's name). */
  from: string;
  to: string;
  fromKind: PlacedNode['kind'];
  toKind: PlacedNode['kind'];
}

export interface Layout {
  width: number;
  height: number;
  nodes: PlacedNode[];
  edges: PlacedEdge[];
}

/**
 * Size of a unit symbol (w x h, see drawing.ts): by type, made taller when it has many
 * streams on one side so that their ports stay apart.
 */
export function unitSize(type: string, inlets: number, outlets: number): { w: number; h: number } {
  const s = shapeSize(type);
  return { w: s.w, h: Math.max(s.h, 14 * (Math.max(inlets, outlets) + 1)) };
}

/** Size of a unit symbol by type alone. */
export function shapeSize(type: string): { w: number; h: number } {
  switch (type) {
    case 'mixer':
      return { w: 34, h: 34 };
    case 'splitter':
      return { w: 34, h: 34 };
    case 'reactor':
      return { w: 44, h: 76 };
    case 'condenser':
    case 'flash':
      return { w: 44, h: 68 };
    case 'separator':
      return { w: 36, h: 84 };
    default:
      return { w: Math.max(56, textWidth(type, 10) + 10), h: 40 };
  }
}

export const FLAG_HEIGHT = 22;

export function flagWidth(name: string): number {
  return textWidth(name, FONT.flag) + 16;
}

const ids = {
  feed: (n: string) => `feed:${n}`,
  product: (n: string) => `product:${n}`,
  unit: (n: string) => `unit:${n}`,
};

interface ElkLabelIn {
  id?: string;
  text?: string;
  width?: number;
  height?: number;
  x?: number;
  y?: number;
}
interface ElkPortIn {
  id: string;
  width?: number;
  height?: number;
  x?: number;
  y?: number;
  layoutOptions?: Record<string, string>;
}
interface ElkNodeIn {
  id: string;
  width?: number;
  height?: number;
  x?: number;
  y?: number;
  labels?: ElkLabelIn[];
  ports?: ElkPortIn[];
  layoutOptions?: Record<string, string>;
  children?: ElkNodeIn[];
  edges?: ElkEdgeIn[];
}
interface ElkEdgeIn {
  id: string;
  sources: string[];
  targets: string[];
  labels?: ElkLabelIn[];
  sections?: { startPoint: { x: number; y: number }; endPoint: { x: number; y: number }; bendPoints?: { x: number; y: number }[] }[];
}

const ROOT_OPTIONS: Record<string, string> = {
  'elk.algorithm': 'layered',
  'elk.direction': 'RIGHT',
  'elk.edgeRouting': 'ORTHOGONAL',
  'elk.padding': '[top=16,left=12,bottom=16,right=12]',
  'elk.spacing.nodeNode': '34',
  'elk.layered.spacing.nodeNodeBetweenLayers': '46',
  'elk.spacing.edgeNode': '16',
  'elk.spacing.edgeEdge': '12',
  'elk.layered.spacing.edgeNodeBetweenLayers': '16',
  'elk.layered.spacing.edgeEdgeBetweenLayers': '12',
  'elk.spacing.edgeLabel': '3',
  'elk.spacing.labelNode': '4',
  'elk.spacing.labelLabel': '6',
  'elk.edgeLabels.placement': 'CENTER',
  'elk.layered.edgeLabels.sideSelection': 'ALWAYS_UP',
  // The file's order decides where the layout has a free choice (loops are broken against it).
  'elk.layered.cycleBreaking.strategy': 'MODEL_ORDER',
  'elk.layered.considerModelOrder.strategy': 'NODES_AND_EDGES',
  'elk.layered.nodePlacement.strategy': 'NETWORK_SIMPLEX',
  'elk.layered.thoroughness': '20',
  'elk.randomSeed': '1',
};

/** The ELK graph of a flowsheet (exported for tests: the input order is what makes the layout repeatable). */
export function elkGraph(t: ReportTopology): ElkNodeIn {
  const children: ElkNodeIn[] = [];
  const edges: ElkEdgeIn[] = [];
  const producer = new Map<string, string>(); // stream -> port id
  const consumer = new Map<string, string>();
  const products = new Set(t.products);
  const feeds = new Set(t.feeds);

  for (const f of t.feeds) {
    const id = ids.feed(f);
    children.push({
      id, width: flagWidth(f), height: FLAG_HEIGHT,
      ports: [{ id: `${id}:out`, width: 0, height: 0, layoutOptions: { 'elk.port.side': 'EAST' } }],
      layoutOptions: { 'elk.portConstraints': 'FIXED_SIDE', 'elk.layered.layering.layerConstraint': 'FIRST_SEPARATE' },
    });
    producer.set(f, `${id}:out`);
  }
  for (const u of t.units) {
    const id = ids.unit(u.name);
    const { w, h } = unitSize(u.type, u.inlets.length, u.outlets.length);
    const ports: ElkPortIn[] = [];
    // FIXED_ORDER numbers ports clockwise from the top left: east side top to bottom, then
    // west side bottom to top. Inlets are listed top to bottom, so they are numbered backwards.
    u.outlets.forEach((s, k) => {
      const pid = `${id}:out:${k}`;
      ports.push({ id: pid, width: 0, height: 0, layoutOptions: { 'elk.port.side': 'EAST', 'elk.port.index': String(k) } });
      producer.set(s, pid);
    });
    u.inlets.forEach((s, k) => {
      const pid = `${id}:in:${k}`;
      ports.push({ id: pid, width: 0, height: 0, layoutOptions: { 'elk.port.side': 'WEST', 'elk.port.index': String(u.outlets.length + u.inlets.length - 1 - k) } });
      consumer.set(s, pid);
    });
    children.push({
      id, width: w, height: h, ports,
      labels: [{ id: `${id}:label`, text: u.name, width: textWidth(u.name, FONT.unit), height: FONT.unit + 4 }],
      layoutOptions: {
        'elk.portConstraints': 'FIXED_ORDER',
        'elk.nodeLabels.placement': 'OUTSIDE V_BOTTOM H_CENTER',
        'elk.spacing.portPort': '10',
      },
    });
  }
  for (const p of t.products) {
    const id = ids.product(p);
    children.push({
      id, width: flagWidth(p), height: FLAG_HEIGHT,
      ports: [{ id: `${id}:in`, width: 0, height: 0, layoutOptions: { 'elk.port.side': 'WEST' } }],
      layoutOptions: { 'elk.portConstraints': 'FIXED_SIDE', 'elk.layered.layering.layerConstraint': 'LAST_SEPARATE' },
    });
    consumer.set(p, `${id}:in`);
  }
  // Streams in a fixed order: feeds, then unit outlets in the file's order.
  const streams = [...t.feeds, ...t.units.flatMap((u) => u.outlets)];
  for (const s of streams) {
    const from = producer.get(s);
    const to = consumer.get(s);
    if (!from || !to) continue; // a stream no unit takes and that is not listed as a product
    const named = !feeds.has(s) && !products.has(s);
    edges.push({
      id: `stream:${s}`, sources: [from], targets: [to],
      ...(named ? { labels: [{ id: `stream:${s}:label`, text: s, width: textWidth(s, FONT.stream), height: FONT.stream + 4 }] } : {}),
    });
  }
  return { id: 'flowsheet', layoutOptions: ROOT_OPTIONS, children, edges };
}

const r1 = (v: number) => Math.round(v * 10) / 10;

function nodeOf(id: string): { kind: PlacedNode['kind']; name: string } {
  const k = id.indexOf(':');
  return { kind: id.slice(0, k) as PlacedNode['kind'], name: id.slice(k + 1) };
}

function endNode(portId: string): string {
  // feed:NAME:out, product:NAME:in, unit:NAME:in:K / unit:NAME:out:K -> node id
  const m = /^(feed|product):(.*):(out|in)$/.exec(portId) ?? /^(unit):(.*):(in|out):\d+$/.exec(portId);
  return m ? `${m[1]}:${m[2]}` : portId;
}

/** Lays the flowsheet out with elkjs (loaded on first use). */
export async function layoutFlowsheet(t: ReportTopology): Promise<Layout> {
  const mod = await import('elkjs/lib/elk.bundled.js');
  // A CommonJS module: its constructor is the default export, or that export's `default`.
  const cjs = mod.default as unknown as { default?: unknown };
  const ELK = (cjs.default ?? cjs) as new () => { layout(graph: unknown): Promise<unknown> };
  const elk = new ELK();
  const graph = elkGraph(t);
  const types = new Map(t.units.map((u) => [u.name, u.type]));
  const out = (await elk.layout(graph)) as ElkNodeIn;
  const nodes: PlacedNode[] = (out.children ?? []).map((c) => {
    const { kind, name } = nodeOf(c.id);
    const x = c.x ?? 0;
    const y = c.y ?? 0;
    const l = c.labels?.[0];
    return {
      kind, name, x: r1(x), y: r1(y), w: r1(c.width ?? 0), h: r1(c.height ?? 0),
      ...(kind === 'unit' ? { type: types.get(name) } : {}),
      ...(l ? { label: { text: l.text ?? name, x: r1(x + (l.x ?? 0)), y: r1(y + (l.y ?? 0)), w: r1(l.width ?? 0), h: r1(l.height ?? 0) } } : {}),
    };
  });
  const edges: PlacedEdge[] = (out.edges ?? []).map((e) => {
    const sec = e.sections?.[0];
    const points = sec ? [sec.startPoint, ...(sec.bendPoints ?? []), sec.endPoint].map((p) => ({ x: r1(p.x), y: r1(p.y) })) : [];
    const l = e.labels?.[0];
    const from = nodeOf(endNode(e.sources[0]));
    const to = nodeOf(endNode(e.targets[0]));
    return {
      stream: e.id.slice('stream:'.length),
      points,
      from: from.name,
      to: to.name,
      fromKind: from.kind,
      toKind: to.kind,
      ...(l ? { label: { text: l.text ?? '', x: r1(l.x ?? 0), y: r1(l.y ?? 0), w: r1(l.width ?? 0), h: r1(l.height ?? 0) } } : {}),
    };
  });
  return { width: r1(out.width ?? 0), height: r1(out.height ?? 0), nodes, edges };
}
