/**
 * Reading the report input: SI numbers from the result object turned into display text, and
 * the facts shown for a stream or a unit (tooltips, hover panels, tables).
 */
import { toUnit } from '../../units/index.js';
import { num, pct } from '../format.js';
import type { FigureInfo, ReportInput } from './input.js';

export type Obj = Record<string, unknown>;

export function obj(v: unknown): Obj | undefined {
  return v !== null && typeof v === 'object' && !Array.isArray(v) ? (v as Obj) : undefined;
}

export function numberOr(v: unknown): number | undefined {
  return typeof v === 'number' && Number.isFinite(v) ? v : undefined;
}

/** Converts SI numbers to the report's display units and formats them. */
export class Display {
  readonly flowUnit: string;
  readonly pressureUnit: string;
  readonly temperatureUnit: string;
  private readonly ctx: { atmosphere: number };

  constructor(input: ReportInput) {
    this.flowUnit = input.display.flowUnit;
    this.pressureUnit = input.display.pressureUnit;
    this.temperatureUnit = input.display.temperatureUnit;
    this.ctx = { atmosphere: input.display.atmosphere };
  }

  flow(v: unknown, sig = 5): string {
    const x = numberOr(v);
    return x === undefined ? '-' : num(toUnit(x, 'molarFlow', this.flowUnit, this.ctx), sig);
  }

  T(v: unknown): string {
    const x = numberOr(v);
    return x === undefined ? '-' : num(toUnit(x, 'temperature', this.temperatureUnit, this.ctx), 5);
  }

  P(v: unknown): string {
    const x = numberOr(v);
    return x === undefined ? '-' : num(toUnit(x, 'pressure', this.pressureUnit, this.ctx), 5);
  }

  fraction(v: unknown, sig = 4): string {
    const x = numberOr(v);
    return x === undefined ? '-' : num(x, sig);
  }

  /** kg/s shown as kg/h. */
  mass(v: unknown): string {
    const x = numberOr(v);
    return x === undefined ? '-' : num(x * 3600, 5);
  }

  /** W shown in kW. */
  power(v: unknown): string {
    const x = numberOr(v);
    return x === undefined ? '-' : num(x / 1000, 5);
  }

  /** A unit figure with its unit. */
  figure(v: unknown, kind: FigureInfo['kind']): string {
    if (numberOr(v) === undefined) return '-';
    switch (kind) {
      case 'molarFlow':
        return `${this.flow(v)} ${this.flowUnit}`;
      case 'temperature':
        return `${this.T(v)} ${this.temperatureUnit}`;
      case 'pressure':
        return `${this.P(v)} ${this.pressureUnit}`;
      case 'power':
        return `${this.power(v)} kW`;
      case 'count':
        return String(v);
      case 'fraction':
        return this.fraction(v, 5);
      default:
        return num(v as number, 5);
    }
  }

  percent(v: unknown): string {
    const x = numberOr(v);
    return x === undefined ? '-' : pct(x);
  }
}

/** Label and kind of a unit figure: from the solver where it gave them, else from the key. */
export function figureInfo(input: ReportInput, unit: string, key: string): FigureInfo {
  const given = input.figures[unit]?.[key];
  if (given) return given;
  if (key === 'duty') return { label: 'duty', kind: 'power' };
  if (key === 'power') return { label: 'power', kind: 'power' };
  if (/duty$|power$/i.test(key)) return { label: words(key), kind: 'power' };
  if (key === 'vaporFraction') return { label: 'vapor fraction', kind: 'fraction' };
  let m = /^fraction\.(.+)$/.exec(key);
  if (m) return { label: `to ${m[1]}`, kind: 'fraction' };
  m = /^extent\.(\d+)$/.exec(key);
  if (m) return { label: `extent of reaction ${Number(m[1]) + 1}`, kind: 'molarFlow' };
  return { label: words(key), kind: 'number' };
}

/** camelCase and dotted keys as words: `flashIterations` -> `flash iterations`. */
export function words(key: string): string {
  return key.replace(/([a-z0-9])([A-Z])/g, '$1 $2').replace(/[._]/g, ' ').toLowerCase();
}

/** Facts about one stream or unit: a heading and label/value rows (plain text). */
export interface Facts {
  heading: string;
  rows: [string, string][];
  /** One line below the rows (e.g. "not a solution"). */
  note?: string;
}

export function streamFacts(input: ReportInput, d: Display, name: string, from: string, to: string): Facts {
  const t = input.topology;
  const kind = t.feeds.includes(name) ? 'feed' : t.products.includes(name) ? 'product' : t.recycles.includes(name) ? 'recycle stream' : 'stream';
  const tear = t.tears.includes(name) ? ', tear stream' : '';
  const heading = `${name} (${kind}${tear}): ${from === name ? 'feed' : from} -> ${to === name ? 'product' : to}`;
  const s = obj(obj(input.result.streams)?.[name]);
  if (!s || input.status !== 'converged') {
    return { heading, rows: [], note: `no values: the result is ${input.status}, not a solution` };
  }
  const rows: [string, string][] = [
    [`total [${d.flowUnit}]`, d.flow(s.total)],
    [`T [${d.temperatureUnit}]`, d.T(s.T)],
    [`P [${d.pressureUnit}]`, d.P(s.P)],
    ['vapor fraction', d.fraction(s.vaporFraction)],
    ['mass flow [kg/h]', d.mass(s.massFlow)],
  ];
  if (numberOr(s.enthalpy) !== undefined) rows.push(['enthalpy flow [kW]', d.power(s.enthalpy)]);
  const flows = obj(s.flows) ?? {};
  const fr = obj(s.fractions) ?? {};
  for (const id of Object.keys(flows)) rows.push([`${id} [${d.flowUnit}] (mole fraction)`, `${d.flow(flows[id])} (${d.fraction(fr[id])})`]);
  return { heading, rows };
}

/** The numeric figures of a unit, in the order the result gives them (each with its label). */
export function unitFigures(input: ReportInput, d: Display, name: string): [string, string][] {
  const u = obj(obj(input.result.units)?.[name]);
  if (!u) return [];
  const rows: [string, string][] = [];
  for (const [key, v] of Object.entries(u)) {
    if (typeof v !== 'number' && v !== null) continue;
    if (key.startsWith('extent.') && Array.isArray(u.reactions)) continue; // shown with its reaction
    const info = figureInfo(input, name, key);
    rows.push([info.label, d.figure(v, info.kind)]);
  }
  return rows;
}

export function unitFacts(input: ReportInput, d: Display, name: string): Facts {
  const spec = input.topology.units.find((u) => u.name === name);
  const heading = `${name} (${spec?.type ?? 'unit'})`;
  const rows: [string, string][] = [];
  if (spec) {
    rows.push(['in', spec.inlets.join(', ') || '-']);
    rows.push(['out', spec.outlets.join(', ') || '-']);
  }
  if (input.status !== 'converged') return { heading, rows, note: `no figures: the result is ${input.status}, not a solution` };
  const u = obj(obj(input.result.units)?.[name]);
  const reactions = Array.isArray(u?.reactions) ? (u!.reactions as Obj[]) : [];
  for (const rx of reactions) {
    const eq = rx.equilibrium === true ? `; at equilibrium${typeof rx.approach === 'number' && rx.approach > 0 ? ` less an approach of ${rx.approach} K` : ''}` : '';
    rows.push([String(rx.equation), `extent ${d.flow(rx.extent)} ${d.flowUnit}; conversion of ${String(rx.key)} ${d.fraction(rx.conversion, 5)}${eq}`]);
  }
  rows.push(...unitFigures(input, d, name));
  const notes = Array.isArray(u?.notes) ? (u!.notes as unknown[]).map(String) : [];
  for (const n of notes) rows.push(['note', n]);
  return { heading, rows };
}

/** Facts as plain text (an SVG <title>: the browser's own tooltip, no script needed). */
export function factsText(f: Facts): string {
  return [f.heading, ...f.rows.map(([k, v]) => `${k}: ${v}`), ...(f.note ? [f.note] : [])].join('\n');
}
