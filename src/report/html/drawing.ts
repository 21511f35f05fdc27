/**
 * The flowsheet drawn as SVG from an elkjs layout: unit symbols of this project's own design,
 * streams as routed arrows with their names, recycle loops and tear streams marked and
 * explained in a legend. Every stream and unit carries an SVG <title> (the browser's own
 * tooltip, no script needed) and a data- attribute that the report's small script uses.
 */
import { esc } from './markup.js';
import type { ReportInput } from './input.js';
import { FONT, layoutFlowsheet, shapeSize, textWidth, type Layout, type PlacedEdge, type PlacedNode } from './layout.js';
import { Display, factsText, streamFacts, unitFacts } from './values.js';

const INK = '#222222';
const LOOP = '#0b6e75';
const MARGIN = 12;
const HEAD = 30;

const STYLE = `
.lc-svg text{font-family:${FONT.family};fill:${INK}}
.lc-svg .lbl-stream{font-size:${FONT.stream}px}
.lc-svg .lbl-unit{font-size:${FONT.unit}px;font-weight:bold}
.lc-svg .lbl-flag{font-size:${FONT.flag}px}
.lc-svg .lbl-head{font-size:13px;font-weight:bold}
.lc-svg .lbl-legend{font-size:${FONT.stream}px}
.lc-svg .lbl-type{font-size:10px}
.lc-svg .shape{fill:#ffffff;stroke:${INK};stroke-width:1.6}
.lc-svg .detail{fill:none;stroke:${INK};stroke-width:1.1}
.lc-svg .flag-feed{fill:#e8eef4;stroke:${INK};stroke-width:1.2}
.lc-svg .flag-product{fill:#f4efe2;stroke:${INK};stroke-width:1.2}
.lc-svg .line{fill:none;stroke:${INK};stroke-width:1.6}
.lc-svg .loop .line{stroke:${LOOP};stroke-width:2.2}
.lc-svg .recycle .line{stroke-dasharray:7 4}
.lc-svg .tear-mark{stroke:${LOOP};stroke-width:2}
.lc-svg .hit{fill:none;stroke:transparent;stroke-width:12}
.lc-svg .stream:hover .line,.lc-svg .stream.picked .line{stroke-width:3.4}
.lc-svg .unit:hover .shape,.lc-svg .unit.picked .shape{stroke-width:2.8}
.lc-svg .label-bg{fill:#ffffff;fill-opacity:0.85}
`;

function f1(v: number): string {
  return String(Math.round(v * 10) / 10);
}

/** The symbol of one unit inside its box. */
function unitShape(n: PlacedNode): string {
  const { x, y, w, h } = n;
  const cx = x + w / 2;
  const cy = y + h / 2;
  switch (n.type) {
    case 'mixer':
      // A circle with two lines that meet: streams coming together.
      return `<ellipse class="shape" cx="${f1(cx)}" cy="${f1(cy)}" rx="${f1(w / 2 - 1)}" ry="${f1(h / 2 - 1)}"/>` +
        `<path class="detail" d="M${f1(x + 8)} ${f1(cy - 7)} L${f1(cx + 7)} ${f1(cy)} L${f1(x + 8)} ${f1(cy + 7)}"/>`;
    case 'splitter':
      // A diamond with two lines that part: one stream divided.
      return `<path class="shape" d="M${f1(cx)} ${f1(y)} L${f1(x + w)} ${f1(cy)} L${f1(cx)} ${f1(y + h)} L${f1(x)} ${f1(cy)} Z"/>` +
        `<path class="detail" d="M${f1(x + w - 9)} ${f1(cy - h / 2 + 11)} L${f1(cx - 6)} ${f1(cy)} L${f1(x + w - 9)} ${f1(cy + h / 2 - 11)}"/>`;
    case 'reactor': {
      // An upright vessel with a fixed bed (two lines and a cross between them).
      const b1 = y + h * 0.3;
      const b2 = y + h * 0.7;
      return `<rect class="shape" x="${f1(x)}" y="${f1(y)}" width="${f1(w)}" height="${f1(h)}" rx="${f1(w / 2)}" ry="12"/>` +
        `<path class="detail" d="M${f1(x)} ${f1(b1)} H${f1(x + w)} M${f1(x)} ${f1(b2)} H${f1(x + w)} M${f1(x + 3)} ${f1(b1)} L${f1(x + w - 3)} ${f1(b2)} M${f1(x + w - 3)} ${f1(b1)} L${f1(x + 3)} ${f1(b2)}"/>`;
    }
    case 'condenser':
    case 'flash': {
      // An upright drum with a liquid level; a condenser also shows a cooling coil.
      const level = y + h * 0.72;
      let d = `M${f1(x + 4)} ${f1(level)} H${f1(x + w - 4)} M${f1(x + 10)} ${f1(level + 5)} H${f1(x + w - 10)}`;
      if (n.type === 'condenser') {
        const cyc = y + h * 0.38;
        const step = (w - 8) / 6;
        d += ` M${f1(x)} ${f1(cyc)}`;
        for (let k = 1; k <= 6; k++) d += ` L${f1(x + 4 + k * step - step / 2)} ${f1(cyc + (k % 2 ? -6 : 6))}`;
        d += ` L${f1(x + w)} ${f1(cyc)}`;
      }
      return `<rect class="shape" x="${f1(x)}" y="${f1(y)}" width="${f1(w)}" height="${f1(h)}" rx="${f1(w / 2)}" ry="10"/>` +
        `<path class="detail" d="${d}"/>`;
    }
    case 'separator': {
      // A column with trays.
      let d = '';
      for (let k = 1; k <= 6; k++) {
        const ty = y + (h * k) / 7;
        d += k % 2 ? ` M${f1(x)} ${f1(ty)} H${f1(x + w * 0.7)}` : ` M${f1(x + w * 0.3)} ${f1(ty)} H${f1(x + w)}`;
      }
      return `<rect class="shape" x="${f1(x)}" y="${f1(y)}" width="${f1(w)}" height="${f1(h)}" rx="8"/>` +
        `<path class="detail" d="${d.trim()}"/>`;
    }
    default:
      return `<rect class="shape" x="${f1(x)}" y="${f1(y)}" width="${f1(w)}" height="${f1(h)}" rx="3"/>` +
        `<text class="lbl-type" x="${f1(cx)}" y="${f1(cy + 4)}" text-anchor="middle">${esc(n.type ?? '')}</text>`;
  }
}

function flag(n: PlacedNode): string {
  const { x, y, w, h } = n;
  const cy = y + h / 2;
  if (n.kind === 'feed') {
    return `<path class="flag-feed" d="M${f1(x)} ${f1(y)} H${f1(x + w - 8)} L${f1(x + w)} ${f1(cy)} L${f1(x + w - 8)} ${f1(y + h)} H${f1(x)} Z"/>` +
      `<text class="lbl-flag lbl" x="${f1(x + 5)}" y="${f1(cy + 4)}">${esc(n.name)}</text>`;
  }
  return `<path class="flag-product" d="M${f1(x)} ${f1(y)} H${f1(x + w - 8)} L${f1(x + w)} ${f1(cy)} L${f1(x + w - 8)} ${f1(y + h)} H${f1(x)} L${f1(x + 6)} ${f1(cy)} Z"/>` +
    `<text class="lbl-flag lbl" x="${f1(x + 8)}" y="${f1(cy + 4)}">${esc(n.name)}</text>`;
}

/** Where a tear is marked: two short bars across the longest segment of its route, near its start. */
function tearMark(e: PlacedEdge): string {
  let best = -1;
  let len = 0;
  for (let k = 0; k + 1 < e.points.length; k++) {
    const a = e.points[k];
    const b = e.points[k + 1];
    const l = Math.abs(b.x - a.x) + Math.abs(b.y - a.y);
    if (l > len + 1e-9) {
      len = l;
      best = k;
    }
  }
  if (best < 0 || len < 24) return '';
  const a = e.points[best];
  const b = e.points[best + 1];
  const horizontal = Math.abs(b.y - a.y) < 1e-6;
  const dir = horizontal ? Math.sign(b.x - a.x) : Math.sign(b.y - a.y);
  // 22 px from the segment's start, away from bends and from the centred name label.
  const at = Math.min(22, len / 4);
  const parts: string[] = [];
  for (const off of [-3, 3]) {
    if (horizontal) {
      const px = a.x + dir * (at + off);
      parts.push(`M${f1(px - 3)} ${f1(a.y + 7)} L${f1(px + 3)} ${f1(a.y - 7)}`);
    } else {
      const py = a.y + dir * (at + off);
      parts.push(`M${f1(a.x - 7)} ${f1(py + 3)} L${f1(a.x + 7)} ${f1(py - 3)}`);
    }
  }
  return `<path class="tear-mark" d="${parts.join(' ')}"/>`;
}

function loopStreams(input: ReportInput, layout: Layout): Set<string> {
  const set = new Set<string>();
  const loopOf = new Map<string, number>();
  input.topology.loops.forEach((units, k) => units.forEach((u) => loopOf.set(u, k)));
  for (const e of layout.edges) {
    const a = e.fromKind === 'unit' ? loopOf.get(e.from) : undefined;
    if (a !== undefined && e.toKind === 'unit' && a === loopOf.get(e.to)) set.add(e.stream);
  }
  return set;
}

interface LegendItem {
  sample: (x: number, y: number) => string;
  text: string;
}

/** The legend: what the line styles and marks mean, and the symbols of the unit types present. */
function legend(input: ReportInput, width: number, top: number): { svg: string; height: number } {
  const items: LegendItem[] = [
    { sample: (x, y) => `<path class="line" d="M${x} ${y} h34" marker-end="url(#lc-arrow)"/>`, text: 'stream (arrow: direction of flow)' },
  ];
  if (input.topology.loops.length) {
    items.push({ sample: (x, y) => `<g class="loop"><path class="line" d="M${x} ${y} h34" marker-end="url(#lc-arrow-loop)"/></g>`, text: 'stream inside a recycle loop' });
  }
  if (input.topology.recycles.length) {
    items.push({ sample: (x, y) => `<g class="loop recycle"><path class="line" d="M${x} ${y} h34" marker-end="url(#lc-arrow-loop)"/></g>`, text: 'recycle stream (dashed)' });
  }
  if (input.topology.tears.length) {
    items.push({
      sample: (x, y) => `<g class="loop"><path class="line" d="M${x} ${y} h34" marker-end="url(#lc-arrow-loop)"/><path class="tear-mark" d="M${x + 11} ${y + 7} L${x + 17} ${y - 7} M${x + 17} ${y + 7} L${x + 23} ${y - 7}"/></g>`,
      text: 'tear stream (two bars: where the solver cuts the loop)',
    });
  }
  items.push({ sample: (x, y) => `<path class="flag-feed" d="M${x} ${y - 8} h26 l8 8 l-8 8 h-26 Z"/>`, text: 'feed (left edge)' });
  items.push({ sample: (x, y) => `<path class="flag-product" d="M${x} ${y - 8} h26 l8 8 l-8 8 h-26 l6 -8 Z"/>`, text: 'product (right edge)' });
  const seen = new Set<string>();
  for (const u of input.topology.units) {
    if (seen.has(u.type)) continue;
    seen.add(u.type);
    const type = u.type;
    items.push({
      sample: (x, y) => {
        const size = shapeSize(type);
        const k = Math.min(24 / size.h, 34 / size.w);
        const g = unitShape({ kind: 'unit', name: '', type, x: 0, y: 0, w: size.w, h: size.h });
        return `<g transform="translate(${f1(x + 17 - (size.w * k) / 2)} ${f1(y - (size.h * k) / 2)}) scale(${Math.round(k * 1000) / 1000})">${g}</g>`;
      },
      text: type,
    });
  }
  const sampleW = 40;
  const gap = 22;
  const rowH = 30;
  const widths = items.map((it) => sampleW + 6 + textWidth(it.text, FONT.stream));
  let x = MARGIN;
  let y = top + 20;
  const parts: string[] = [`<text class="lbl-head lbl" x="${MARGIN}" y="${top + 4}">Legend</text>`];
  widths.forEach((w, k) => {
    if (x > MARGIN && x + w > width - MARGIN) {
      x = MARGIN;
      y += rowH;
    }
    parts.push(`<g class="legend-item">${items[k].sample(x, y)}<text class="lbl-legend lbl" x="${x + sampleW + 6}" y="${y + 4}">${esc(items[k].text)}</text></g>`);
    x += w + gap;
  });
  return { svg: `<g class="legend">${parts.join('')}</g>`, height: y - top + 18 };
}

/** The drawing as an SVG element (no XML prolog), from a layout made by layoutFlowsheet. */
export function drawLayout(input: ReportInput, layout: Layout): string {
  const d = new Display(input);
  const head = `${input.title ? `${input.title} - ` : ''}${input.file} (${input.status})`;
  const width = Math.max(layout.width + 2 * MARGIN, 720, textWidth(head, 13) + 2 * MARGIN);
  const oy = HEAD;
  const inLoop = loopStreams(input, layout);
  const recycles = new Set(input.topology.recycles);
  const tears = new Set(input.topology.tears);
  const body: string[] = [];

  for (const e of layout.edges) {
    if (e.points.length < 2) continue;
    const cls = ['stream', ...(inLoop.has(e.stream) ? ['loop'] : []), ...(recycles.has(e.stream) ? ['recycle'] : []), ...(tears.has(e.stream) ? ['tear'] : [])];
    const path = `M${e.points.map((p) => `${f1(p.x)} ${f1(p.y)}`).join(' L')}`;
    const facts = streamFacts(input, d, e.stream, e.from, e.to);
    body.push(
      `<g class="${cls.join(' ')}" data-stream="${esc(e.stream)}" tabindex="0"><title>${esc(factsText(facts))}</title>` +
        `<path class="hit" d="${path}"/>` +
        `<path class="line" d="${path}" marker-end="url(#${inLoop.has(e.stream) ? 'lc-arrow-loop' : 'lc-arrow'})"/>` +
        (tears.has(e.stream) ? tearMark(e) : '') +
        (e.label ? `<rect class="label-bg" x="${f1(e.label.x)}" y="${f1(e.label.y)}" width="${f1(e.label.w)}" height="${f1(e.label.h)}"/><text class="lbl-stream lbl" x="${f1(e.label.x + 2)}" y="${f1(e.label.y + e.label.h - 4)}">${esc(e.label.text)}</text>` : '') +
        `</g>`,
    );
  }
  const streamOf = new Map<string, PlacedEdge>();
  for (const e of layout.edges) streamOf.set(e.stream, e);
  for (const n of layout.nodes) {
    if (n.kind === 'unit') {
      const facts = unitFacts(input, d, n.name);
      body.push(
        `<g class="unit" data-unit="${esc(n.name)}" tabindex="0"><title>${esc(factsText(facts))}</title>${unitShape(n)}` +
          (n.label ? `<text class="lbl-unit lbl" x="${f1(n.label.x + n.label.w / 2)}" y="${f1(n.label.y + n.label.h - 4)}" text-anchor="middle">${esc(n.label.text)}</text>` : '') +
          `</g>`,
      );
    } else {
      const e = streamOf.get(n.name);
      const facts = streamFacts(input, d, n.name, e?.from ?? n.name, e?.to ?? n.name);
      body.push(`<g class="${n.kind}" data-stream="${esc(n.name)}" tabindex="0"><title>${esc(factsText(facts))}</title>${flag(n)}</g>`);
    }
  }
  const leg = legend(input, width, oy + layout.height + 18);
  const height = oy + layout.height + 18 + leg.height + MARGIN;
  return [
    `<svg xmlns="http://www.w3.org/2000/svg" class="lc-svg" width="${f1(width)}" height="${f1(height)}" viewBox="0 0 ${f1(width)} ${f1(height)}" role="img" aria-label="${esc(`flowsheet of ${head}`)}">`,
    `<title>${esc(`Flowsheet: ${head}`)}</title>`,
    `<style>${STYLE}</style>`,
    '<defs>',
    `<marker id="lc-arrow" viewBox="0 0 10 10" refX="9" refY="5" markerWidth="7" markerHeight="7" orient="auto"><path d="M0 0 L10 5 L0 10 Z" fill="${INK}"/></marker>`,
    `<marker id="lc-arrow-loop" viewBox="0 0 10 10" refX="9" refY="5" markerWidth="6" markerHeight="6" orient="auto"><path d="M0 0 L10 5 L0 10 Z" fill="${LOOP}"/></marker>`,
    '</defs>',
    `<rect x="0" y="0" width="${f1(width)}" height="${f1(height)}" fill="#ffffff"/>`,
    `<text class="lbl-head lbl" x="${MARGIN}" y="19">${esc(head)}</text>`,
    `<g class="flowsheet" transform="translate(0 ${oy})">${body.join('')}</g>`,
    leg.svg,
    '</svg>',
  ].join('\n');
}

/** Lays the flowsheet out (elkjs) and draws it. */
export async function drawFlowsheet(input: ReportInput): Promise<string> {
  return drawLayout(input, await layoutFlowsheet(input.topology));
}

