/**
 * The HTML report of a solve: one self-contained file (no network access when opened: the
 * style and a small script are inline, no fonts are fetched), readable on screen and printable
 * on A4 and letter. The status comes first; a result that is not a solution is shown as a
 * diagnosis with its last iterate labelled as such, never as a stream table.
 */
import { num, otherMethods } from '../format.js';
import { flowNote } from '../solve.js';
import { drawFlowsheet } from './drawing.js';
import type { ReportInput } from './input.js';
import { esc, scriptJson } from './markup.js';
import { Display, numberOr, obj, streamFacts, unitFacts, unitFigures, type Facts, type Obj } from './values.js';

export const PAGE_STYLE = `
:root{--ink:#1d1d1d;--muted:#555;--rule:#c9c9c9;--ok:#1c6b2a;--bad:#9b1c1c;--warn:#7a5200;--band:#f3f5f7}
*{box-sizing:border-box}
body{margin:0;padding:18px 22px;font-family:'DejaVu Sans','Liberation Sans',Arial,sans-serif;font-size:14px;line-height:1.4;color:var(--ink);background:#fff}
h1{font-size:20px;margin:0 0 4px}
h2{font-size:16px;margin:22px 0 6px;border-bottom:1px solid var(--rule);padding-bottom:2px}
h3{font-size:14px;margin:14px 0 4px}
p{margin:4px 0}
.meta{color:var(--muted);margin:0 0 10px}
.status{padding:8px 12px;border-left:6px solid;background:var(--band);margin:8px 0}
.status strong{font-size:16px}
.status.converged{border-color:var(--ok)}
.status.not-converged,.status.infeasible,.status.invalid{border-color:var(--bad)}
.caution{border:1px solid var(--warn);padding:6px 10px;margin:8px 0;color:#3b2a00;background:#fffaf0}
.notsolution{border:2px dashed var(--bad);padding:8px 12px;margin:8px 0}
.notsolution h3{color:var(--bad)}
figure{margin:8px 0}
.drawing{overflow-x:auto;border:1px solid var(--rule)}
.drawing svg{display:block;max-width:100%;height:auto}
.panel{min-height:3em;border:1px solid var(--rule);background:var(--band);padding:6px 10px;margin-top:6px}
.panel table{margin:4px 0 0}
figcaption{color:var(--muted);font-size:12px}
.scroll{overflow-x:auto}
table{border-collapse:collapse;margin:4px 0 10px;font-size:13px}
th,td{padding:2px 8px;border-bottom:1px solid #e3e3e3;vertical-align:top}
thead th{border-bottom:1.5px solid var(--ink);text-align:right;white-space:nowrap}
thead th:first-child,tbody th{text-align:left}
tbody th{font-weight:normal;white-space:nowrap}
td.n{text-align:right;font-variant-numeric:tabular-nums;white-space:nowrap}
td.t{text-align:left}
ul{margin:4px 0;padding-left:20px}
.warning{color:var(--warn)}
footer{margin-top:24px;color:var(--muted);font-size:12px}
@media print{
  @page{size:auto;margin:12mm}
  body{padding:0;font-size:10pt}
  .drawing{overflow:visible;border:none}
  .panel,.noprint{display:none}
  .scroll{overflow:visible}
  table{font-size:8.5pt;page-break-inside:auto}
  tr,figure{page-break-inside:avoid}
  thead{display:table-header-group}
  h2{page-break-after:avoid}
}
`;

/** The script that fills the panel below the drawing: text only, no markup from the data. */
const PANEL_SCRIPT = `
(function(){
  var data=JSON.parse(document.getElementById('lc-data').textContent);
  var panel=document.getElementById('lc-panel');
  var picked=null;
  function show(f){
    panel.textContent='';
    var h=document.createElement('strong');h.textContent=f.heading;panel.appendChild(h);
    if(f.rows.length){
      var t=document.createElement('table');
      f.rows.forEach(function(r){var tr=document.createElement('tr');var a=document.createElement('th');a.textContent=r[0];var b=document.createElement('td');b.className='n';b.textContent=r[1];tr.appendChild(a);tr.appendChild(b);t.appendChild(tr);});
      panel.appendChild(t);
    }
    if(f.note){var p=document.createElement('p');p.textContent=f.note;panel.appendChild(p);}
  }
  function factsOf(el){
    if(!el||!el.getAttribute)return null;
    var s=el.getAttribute('data-stream');if(s!==null)return data.streams[s]||null;
    var u=el.getAttribute('data-unit');if(u!==null)return data.units[u]||null;
    return null;
  }
  function target(e){var el=e.target;while(el&&el!==document){if(el.getAttribute&&(el.hasAttribute('data-stream')||el.hasAttribute('data-unit')))return el;el=el.parentNode;}return null;}
  var svg=document.querySelector('.drawing svg');
  if(!svg)return;
  svg.addEventListener('mouseover',function(e){var el=target(e);var f=factsOf(el);if(f&&!picked)show(f);});
  svg.addEventListener('focusin',function(e){var el=target(e);var f=factsOf(el);if(f)show(f);});
  svg.addEventListener('click',function(e){var el=target(e);if(picked)picked.classList.remove('picked');if(!el||el===picked){picked=null;return;}picked=el;el.classList.add('picked');var f=factsOf(el);if(f)show(f);});
  document.addEventListener('keydown',function(e){if(e.key==='Escape'&&picked){picked.classList.remove('picked');picked=null;}});
})();
`;

interface Cell {
  text: string;
  numeric?: boolean;
}

function tableHtml(head: string[], rows: (string | Cell)[][], rowHeaders = true): string {
  const cell = (c: string | Cell, k: number) => {
    const o = typeof c === 'string' ? { text: c, numeric: k > 0 } : c;
    if (k === 0 && rowHeaders) return `<th scope="row">${esc(o.text)}</th>`;
    return `<td class="${o.numeric === false ? 't' : 'n'}">${esc(o.text)}</td>`;
  };
  return `<div class="scroll"><table><thead><tr>${head.map((h) => `<th scope="col">${esc(h)}</th>`).join('')}</tr></thead>` +
    `<tbody>${rows.map((r) => `<tr>${r.map(cell).join('')}</tr>`).join('')}</tbody></table></div>`;
}

const text = (s: string): Cell => ({ text: s, numeric: false });

function statusBlock(input: ReportInput): string {
  const r = input.result;
  const stats = [
    `method ${input.method}`,
    `${numberOr(r.passes) ?? '-'} passes`,
    `${numberOr(r.iterations) ?? '-'} iterations`,
    ...(numberOr(r.jacobians) ? [`${r.jacobians} Jacobians`] : []),
    `residual ${numberOr(r.residual) !== undefined ? (r.residual as number).toExponential(2) : '-'}`,
  ].join(', ');
  return `<div class="status ${esc(input.status)}" id="status"><strong>Status: ${esc(input.status)}</strong> <span>(${esc(stats)})</span>` +
    (input.message ? `<p>${esc(input.message)}</p>` : '') + '</div>';
}

/** Streams as columns (at most `per` to a table, so that it prints), quantities as rows with their units. */
function streamTables(input: ReportInput, d: Display, per = 7): string {
  const streams = obj(input.result.streams) ?? {};
  const names = Object.keys(streams);
  const first = obj(streams[names[0]]);
  const ids = Object.keys(obj(first?.flows) ?? {});
  const out: string[] = [];
  for (let k = 0; k < names.length; k += per) {
    const group = names.slice(k, k + per);
    const s = (n: string) => obj(streams[n]) ?? {};
    const rows: string[][] = [];
    for (const id of ids) rows.push([`${id} [${d.flowUnit}]`, ...group.map((n) => d.flow(obj(s(n).flows)?.[id]))]);
    rows.push([`total [${d.flowUnit}]`, ...group.map((n) => d.flow(s(n).total))]);
    for (const id of ids) rows.push([`x ${id} [mole fraction]`, ...group.map((n) => d.fraction(obj(s(n).fractions)?.[id]))]);
    rows.push([`T [${d.temperatureUnit}]`, ...group.map((n) => d.T(s(n).T))]);
    rows.push([`P [${d.pressureUnit}]`, ...group.map((n) => d.P(s(n).P))]);
    rows.push(['vapor fraction', ...group.map((n) => d.fraction(s(n).vaporFraction))]);
    rows.push(['mass flow [kg/h]', ...group.map((n) => d.mass(s(n).massFlow))]);
    if (group.some((n) => numberOr(s(n).enthalpy) !== undefined)) rows.push(['enthalpy flow [kW]', ...group.map((n) => d.power(s(n).enthalpy))]);
    out.push(tableHtml(['stream', ...group], rows));
  }
  return out.join('');
}

function unitsSection(input: ReportInput, d: Display): string {
  const units = obj(input.result.units) ?? {};
  const parts: string[] = [];
  for (const u of input.topology.units) {
    const o = obj(units[u.name]);
    const rows: (string | Cell)[][] = [];
    const reactions = Array.isArray(o?.reactions) ? (o!.reactions as Obj[]) : [];
    for (const rx of reactions) {
      rows.push([`extent of ${String(rx.equation)} [${d.flowUnit}]`, d.flow(rx.extent)]);
      rows.push([`conversion of ${String(rx.key)} per pass`, d.fraction(rx.conversion, 5)]);
      if (rx.equilibrium === true) rows.push([`approach to equilibrium of ${String(rx.equation)} [K]`, typeof rx.approach === 'number' ? String(rx.approach) : '0']);
    }
    for (const [label, value] of unitFigures(input, d, u.name)) rows.push([label, value]);
    const notes = Array.isArray(o?.notes) ? (o!.notes as unknown[]).map(String) : [];
    parts.push(`<h3>${esc(u.name)} <small>(${esc(u.type)}: ${esc(u.inlets.join(', '))} -&gt; ${esc(u.outlets.join(', '))})</small></h3>` +
      (rows.length ? tableHtml(['figure', 'value'], rows) : '<p>no figures</p>') +
      (notes.length ? `<ul>${notes.map((n) => `<li>${esc(n)}</li>`).join('')}</ul>` : ''));
  }
  return parts.join('');
}

function loopSection(input: ReportInput, d: Display): string {
  const loop = obj(input.result.loop);
  if (!loop) return '';
  const rows: (string | Cell)[][] = [
    [`fresh feed [${d.flowUnit}]`, d.flow(loop.freshFeed)],
    ['recycle ratio (recycle / fresh feed, molar)', d.fraction(loop.recycleRatio, 5)],
    ['recycle streams', text((Array.isArray(loop.recycles) ? (loop.recycles as string[]) : []).join(', ') || '-')],
    ['tear streams', text(input.topology.tears.join(', ') || '-')],
    ['products', text(input.topology.products.join(', ') || '-')],
  ];
  const conv = obj(loop.conversions) ?? {};
  for (const [key, c0] of Object.entries(conv)) {
    const c = obj(c0) ?? {};
    const byUnit = obj(c.byUnit);
    if (byUnit) for (const [u, x] of Object.entries(byUnit)) rows.push([`${key}: single-pass conversion (${u})`, d.fraction(x, 5)]);
    else rows.push([`${key}: single-pass conversion (${String(c.unit)})`, d.fraction(c.singlePass, 5)]);
    rows.push([`${key}: overall conversion (fresh feed to products)`, d.fraction(c.overall, 5)]);
  }
  return tableHtml(['loop figure', 'value'], rows);
}

function balanceSection(input: ReportInput, d: Display): string {
  const b = obj(input.result.balance);
  if (!b) return '';
  const out: string[] = ['<p>closure = (in + generated - out) / scale</p>'];
  const comps = obj(b.components) ?? {};
  out.push('<h3>Components</h3>' + tableHtml(['component', `in [${d.flowUnit}]`, `out [${d.flowUnit}]`, `generated [${d.flowUnit}]`, 'closure'],
    Object.entries(comps).map(([id, c0]) => {
      const c = obj(c0) ?? {};
      return [id, d.flow(c.in), d.flow(c.out), d.flow(c.generated), num(c.closure as number, 2)];
    })));
  const els = obj(b.elements) ?? {};
  out.push('<h3>Elements</h3>' + tableHtml(['element', `in [${d.flowUnit} of atoms]`, `out [${d.flowUnit} of atoms]`, 'closure'],
    Object.entries(els).map(([el, e0]) => {
      const e = obj(e0) ?? {};
      return [el, d.flow(e.in), d.flow(e.out), num(e.closure as number, 2)];
    })));
  const mass = obj(b.mass);
  if (mass) out.push('<h3>Mass</h3>' + tableHtml(['', 'in [kg/h]', 'out [kg/h]', 'closure'], [['total mass', d.mass(mass.in), d.mass(mass.out), num(mass.closure as number, 2)]]));
  const energy = obj(b.energy);
  if (energy) {
    const rows = Object.entries(energy).filter(([, v]) => typeof v === 'number').map(([k, v]) => (k === 'closure' ? ['closure', num(v as number, 2)] : [`${k} [kW]`, d.power(v)]));
    out.push('<h3>Energy</h3>' + tableHtml(['', 'value'], rows));
  }
  if (numberOr(b.worst) !== undefined) out.push(`<p>largest closure: ${esc(num(b.worst as number, 2))}</p>`);
  return out.join('');
}

function feedsSection(input: ReportInput, d: Display): string {
  const feeds = obj(input.result.feeds) ?? {};
  const names = Object.keys(feeds);
  if (!names.length) return '';
  const rows = names.map((n) => {
    const f = obj(feeds[n]) ?? {};
    const ref = obj(f.reference);
    return [n, d.flow(f.molarFlow), text(String(f.basis ?? '-')), d.fraction(f.Z, 5), d.percent(f.idealError), d.T(f.T), d.P(f.P), text(String(f.phase ?? '-')), text(ref ? String(ref.label) : '-')] as (string | Cell)[];
  });
  return tableHtml(['feed', `molar flow [${d.flowUnit}]`, 'given as', 'Z', 'ideal-gas error', `T [${d.temperatureUnit}]`, `P [${d.pressureUnit}]`, 'phase', 'standard reference'], rows) +
    '<p>ideal-gas error: how far the ideal-gas law would have put the molar flow from the real-gas one.</p>';
}

function targetsSection(input: ReportInput): string {
  const targets = Array.isArray(input.result.targets) ? (input.result.targets as Obj[]) : [];
  if (!targets.length) return '';
  // As the text report says them: the output in the unit of the target's value (else the display
  // unit), the input in the unit of its bounds; the SI numbers only where those are missing.
  return '<h2>Targets</h2>' + tableHtml(['target', 'reached', 'adjusted input', 'value', 'met'], targets.map((t) => {
    const shown = obj(t.shown);
    // Without a steady state there is no output to give (a bound's state was solved: it has one).
    const noState = input.status !== 'converged' && !t.met && !t.bound;
    return [
      String(t.text), noState ? 'no solution at the last value tried' : typeof shown?.output === 'string' ? shown.output : num(t.output as number, 8), text(String(t.inputPath)),
      typeof shown?.input === 'string' ? shown.input : num(t.input as number, 8), text(t.met ? 'yes' : `no${t.bound ? ` (stopped by its ${String(t.bound)} bound)` : ''}`),
    ];
  }));
}

function notSolutionSection(input: ReportInput, d: Display): string {
  const r = input.result;
  const heading = input.status === 'infeasible' ? 'No steady state exists as specified' : input.status === 'invalid' ? 'The specification cannot be computed as given' : 'The loop did not converge';
  const out: string[] = [`<section class="notsolution" id="not-a-solution"><h3>${esc(heading)}: this is not a solution</h3>`];
  if (input.message) out.push(`<p>${esc(input.message)}</p>`);
  const failure = obj(r.failure);
  if (failure?.help) out.push(`<p>to change: ${esc(String(failure.help))}</p>`);
  const worst = Array.isArray(r.worst) ? (r.worst as Obj[]) : [];
  if (worst.length) {
    out.push('<h3>Largest residuals at the last iterate</h3>' + tableHtml(['variable', 'residual', 'times the tolerance'],
      worst.map((w) => [String(w.name ?? `#${String(w.index)}`), (w.residual as number).toExponential(3), num(w.scaled as number, 3)])));
  }
  const tears = obj(r.lastTears) ?? {};
  const names = Object.keys(tears);
  if (names.length) {
    const ids = Object.keys(obj(obj(tears[names[0]])?.flows) ?? {});
    const rows: string[][] = ids.map((id) => [`${id} [${d.flowUnit}]`, ...names.map((n) => d.flow(obj(obj(tears[n])?.flows)?.[id]))]);
    rows.push([`T [${d.temperatureUnit}]`, ...names.map((n) => d.T(obj(tears[n])?.T))]);
    rows.push([`P [${d.pressureUnit}]`, ...names.map((n) => d.P(obj(tears[n])?.P))]);
    out.push('<h3>Last iterate of the tear streams (NOT A SOLUTION)</h3>' + tableHtml(['tear stream (last iterate)', ...names], rows));
  }
  if (input.status === 'not-converged') out.push(`<p>to try: ${esc(otherMethods(String(r.method ?? '')))}more passes (--max-passes), or check the specifications.</p>`);
  out.push('</section>');
  return out.join('');
}

function historySection(input: ReportInput): string {
  const h = Array.isArray(input.result.history) ? (input.result.history as Obj[]) : [];
  if (!h.length) return '';
  return '<h2>Convergence</h2>' + tableHtml(['pass', 'method', 'residual', 'scaled residual (1 = tolerance)'],
    h.map((e) => [String(e.pass), text(String(e.method)), num(e.residual as number, 3), num(e.scaled as number, 3)]));
}

function panelData(input: ReportInput, d: Display): { streams: Record<string, Facts>; units: Record<string, Facts> } {
  const t = input.topology;
  const producer = new Map<string, string>();
  const consumer = new Map<string, string>();
  for (const f of t.feeds) producer.set(f, f);
  for (const u of t.units) {
    u.outlets.forEach((s) => producer.set(s, u.name));
    u.inlets.forEach((s) => consumer.set(s, u.name));
  }
  const streams: Record<string, Facts> = {};
  for (const s of [...t.feeds, ...t.units.flatMap((u) => u.outlets)]) streams[s] = streamFacts(input, d, s, producer.get(s) ?? s, consumer.get(s) ?? s);
  const units: Record<string, Facts> = {};
  for (const u of t.units) units[u.name] = unitFacts(input, d, u.name);
  return { streams, units };
}

/** The report as one HTML document. */
export async function reportHtml(input: ReportInput): Promise<string> {
  const d = new Display(input);
  const svg = await drawFlowsheet(input);
  const ok = input.status === 'converged';
  const title = input.title ?? input.file;
  const warnings = Array.isArray(input.result.warnings) ? (input.result.warnings as unknown[]).map(String) : [];
  const body: string[] = [
    `<h1>${esc(title)}</h1>`,
    `<p class="meta">${esc(input.file)}; equation of state ${esc(input.eos)}; flows in ${esc(d.flowUnit)}${esc(flowNote(d.flowUnit, { atmosphere: input.display.atmosphere }))}, T in ${esc(d.temperatureUnit)}, P in ${esc(d.pressureUnit)}${input.generated ? `; made ${esc(input.generated)}` : ''}</p>`,
    statusBlock(input),
    `<p class="caution"><strong>Caution.</strong> ${esc(input.caution)}</p>`,
    '<h2>Flowsheet</h2>',
    `<figure><div class="drawing">${svg}</div>`,
    `<div class="panel" id="lc-panel" aria-live="polite">Point at, or click, a stream or a unit to see its figures here (without JavaScript, the browser's own tooltip shows them).</div>`,
    `<figcaption>Drawn from the file's topology: feeds at the left edge, products at the right edge; the legend below the drawing explains the marks.${ok ? '' : ' The result is not a solution, so the drawing carries no values.'}</figcaption></figure>`,
  ];
  if (ok) {
    body.push(`<h2>Streams</h2>${streamTables(input, d)}`);
    body.push(`<h2>Units</h2>${unitsSection(input, d)}`);
    body.push(`<h2>Loop</h2>${loopSection(input, d)}`);
    body.push(`<h2>Balance</h2>${balanceSection(input, d)}`);
  } else {
    body.push(`<h2>Diagnosis</h2>${notSolutionSection(input, d)}`);
  }
  const feeds = feedsSection(input, d);
  if (feeds) body.push(`<h2>Feeds</h2>${feeds}`);
  body.push(targetsSection(input));
  body.push(`<h2>Warnings</h2>${warnings.length ? `<ul>${warnings.map((w) => `<li class="warning">${esc(w)}</li>`).join('')}</ul>` : '<p>none</p>'}`);
  body.push(historySection(input));
  body.push(`<h2>Caution</h2><p class="caution">${esc(input.caution)}</p>`);
  body.push(`<footer>Report made by loopclose from ${esc(input.file)}.</footer>`);
  return [
    '<!DOCTYPE html>',
    '<html lang="en">',
    '<head>',
    '<meta charset="utf-8">',
    '<meta name="viewport" content="width=device-width, initial-scale=1">',
    `<title>${esc(`${title} (${input.status})`)}</title>`,
    `<style>${PAGE_STYLE}</style>`,
    '</head>',
    '<body>',
    ...body,
    `<script type="application/json" id="lc-data">${scriptJson(panelData(input, d))}</script>`,
    `<script>${PANEL_SCRIPT}</script>`,
    '</body>',
    '</html>',
    '',
  ].join('\n');
}

/** The drawing alone, as a standalone SVG file. */
export async function reportSvg(input: ReportInput): Promise<string> {
  return `<?xml version="1.0" encoding="UTF-8"?>\n${await drawFlowsheet(input)}\n`;
}
