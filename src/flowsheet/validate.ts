/**
 * Parsed document -> validated model. Every problem found is reported with its position, and
 * the whole file is checked before anything is computed.
 */
import { readFileSync, statSync } from 'node:fs';
import type { Node } from 'yaml';
import { DiagnosticBag, InputError, didYouMean, type SourceSpan } from '../diagnostics.js';
import { parseQuantity, UnitError, type Dimension, type StandardRef, defineStandard, BUILTIN_STANDARDS } from '../units/index.js';
import { findComponent, componentIds } from '../thermo/components.js';
import { parseFormula, molarMass } from '../thermo/formula.js';
import type { ComponentData, EosName } from '../thermo/types.js';
import { Reader, SourceFile, MAX_FILE_BYTES, type Entry } from './source.js';
import type { FieldReader, NumberRule, OutletEntry } from './fields.js';
import type { FeedBasis, FeedSpec, MeterDesign, Model, UnitSpecBase } from './model.js';
import { BLOCKS, blockTypes } from '../blocks/registry.js';
import { checkStructure } from './structure.js';

const TOP_KEYS = ['title', 'components', 'thermo', 'display', 'feeds', 'units', 'tears', 'solver', 'targets'] as const;
const FEED_KEYS = ['composition', 'mass-composition', 'normalize', 'meter', 'molar-flow', 'mass-flow', 'standard-flow', 'flows', 'T', 'P'];
const FLOW_FORMS = ['meter', 'molar-flow', 'mass-flow', 'standard-flow', 'flows'];

export interface LoadedFile {
  model: Model;
  source: SourceFile;
  /** The model's extra top-level nodes for later stages (targets). */
  targetsNode: Node | null;
  reader: Reader;
}

/** Reads and validates a flowsheet file. Throws InputError with every problem found. */
export function loadFlowsheet(path: string, overrides?: (root: Node, reader: Reader) => void): LoadedFile {
  return validateText(path, readFlowsheetFile(path), new DiagnosticBag(), overrides);
}

/** A flowsheet file's text, refusing folders, missing files and files over the size limit. */
export function readFlowsheetFile(path: string): string {
  try {
    const st = statSync(path);
    if (st.isDirectory()) throw new InputError([{ severity: 'error', message: `${path} is a folder, not a flowsheet file`, help: 'give the path of a .yaml file' }]);
    if (st.size > MAX_FILE_BYTES) {
      throw new InputError([{ severity: 'error', message: `${path} is ${st.size} bytes; the limit is ${MAX_FILE_BYTES}`, help: 'a flowsheet file is a few kilobytes; check that this is the right file' }]);
    }
    return readFileSync(path, 'utf8');
  } catch (e) {
    if (e instanceof InputError) throw e;
    const code = (e as NodeJS.ErrnoException).code;
    throw new InputError([{ severity: 'error', message: `cannot read ${path}${code === 'ENOENT' ? ': no such file' : code ? ` (${code})` : ''}`, help: 'check the path' }]);
  }
}

export function validateText(path: string, text: string, bag = new DiagnosticBag(), overrides?: (root: Node, reader: Reader) => void): LoadedFile {
  const src = parseSource(path, text, bag);
  return validateSource(src, bag, overrides);
}

/** Parses the text; throws InputError on YAML syntax errors. */
export function parseSource(path: string, text: string, bag = new DiagnosticBag()): SourceFile {
  const src = new SourceFile(path, text, bag);
  if (bag.hasErrors) throw new InputError(bag.items);
  return src;
}

/** Validates a parsed (possibly edited) document into a model. Throws InputError with every problem. */
export function validateSource(src: SourceFile, bag = new DiagnosticBag(), overrides?: (root: Node, reader: Reader) => void): LoadedFile {
  src.restart(bag);
  const path = src.path;
  const r = new Reader(src);
  const root = src.root();
  if (root === null || (r.isScalar(root) && (root.value === null || root.value === ''))) {
    throw new InputError([{ severity: 'error', message: `${path} is empty`, span: src.at(null), help: 'a flowsheet needs at least `components:` and `feeds:`' }]);
  }
  if (overrides) overrides(root, r);
  const top = r.entries(root, 'the flowsheet file');
  if (!top) throw new InputError(bag.items);
  r.checkKeys(top, TOP_KEYS, 'the flowsheet file');
  const get = (k: string) => r.find(top, k);

  const title = get('title') ? r.string(get('title')!.value, '`title`') : undefined;

  // Components.
  const compEntry = get('components');
  const components: ComponentData[] = [];
  if (!compEntry) {
    bag.error('the file has no `components:`', src.at(root), 'list the components, e.g. `components: { H2: {}, N2: {} }`');
  } else {
    const list = r.entries(compEntry.value, '`components`', compEntry.keyNode);
    if (list && list.length === 0) bag.error('`components` is empty', r.at(compEntry.keyNode), 'name at least one component, e.g. `H2: {}`');
    for (const e of list ?? []) {
      const c = readComponent(r, e);
      if (c) {
        components.push(c);
      }
    }
  }
  const ids = components.map((c) => c.id);
  const index = new Map(ids.map((id, i) => [id, i]));
  const n = ids.length;
  const elements = components.map((c) => {
    try {
      return toRecord(parseFormula(c.formula));
    } catch {
      return {};
    }
  });

  // Thermo.
  const thermoEntries = get('thermo') ? r.entries(get('thermo')!.value, '`thermo`', get('thermo')!.keyNode) ?? [] : [];
  r.checkKeys(thermoEntries, ['eos', 'kij', 'atmosphere', 'standards'], '`thermo`');
  let eos: EosName = 'SRK';
  const eosE = r.find(thermoEntries, 'eos');
  if (eosE) {
    const v = r.string(eosE.value, '`thermo.eos`', 'SRK');
    if (v !== undefined) {
      const m = matchEos(v);
      if (!m) bag.error(`unknown equation of state \`${v}\``, r.at(eosE.value), 'use `SRK`, `PR` (Peng-Robinson) or `ideal`');
      else eos = m;
    }
  }
  let atmosphere = 101325;
  const atmE = r.find(thermoEntries, 'atmosphere');
  if (atmE) {
    const v = quantityAt(r, atmE.value, 'pressure', '`thermo.atmosphere`', { above: 0, example: '0.95 bar' }, { atmosphere: 101325 });
    if (v !== undefined) {
      if (r.isScalar(atmE.value) && /g\s*$/.test(String(atmE.value.value))) {
        bag.error('`thermo.atmosphere` must be an absolute pressure', r.at(atmE.value), 'write it in bar, kPa, psia or mmHg, not a gauge unit');
      } else atmosphere = v;
    }
  }
  const standards = new Map<string, StandardRef>(BUILTIN_STANDARDS);
  const failedStandards = new Set<string>();
  const stdE = r.find(thermoEntries, 'standards');
  if (stdE) {
    for (const e of r.entries(stdE.value, '`thermo.standards`', stdE.keyNode) ?? []) {
      const f = r.entries(e.value, `standard reference \`${e.key}\``, e.keyNode) ?? [];
      r.checkKeys(f, ['T', 'P', 'temperature', 'pressure'], `standard reference \`${e.key}\``);
      // `T` and `P` as everywhere else in the file; `temperature` and `pressure` as in a meter.
      const tKey = r.find(f, 'T') ? 'T' : 'temperature';
      const pKey = r.find(f, 'P') ? 'P' : 'pressure';
      const T = requiredQuantity(r, f, tKey, 'temperature', `\`${tKey}\` of standard reference \`${e.key}\``, e.keyNode, { above: 0, example: '60 degF' }, { atmosphere });
      const P = requiredQuantity(r, f, pKey, 'pressure', `\`${pKey}\` of standard reference \`${e.key}\``, e.keyNode, { above: 0, example: '14.73 psia' }, { atmosphere });
      if (T !== undefined && P !== undefined) standards.set(e.key, defineStandard(e.key, { T, P }));
      else failedStandards.add(e.key);
    }
  }
  const kij = new Float64Array(n * n);
  const kijE = r.find(thermoEntries, 'kij');
  if (kijE) {
    for (const e of r.entries(kijE.value, '`thermo.kij`', kijE.keyNode) ?? []) {
      const parts = e.key.split('/').map((s) => s.trim());
      if (parts.length !== 2) {
        bag.error(`binary pair \`${e.key}\` must be written \`A/B\``, r.at(e.keyNode), 'for example `CO2/H2: 0.12`');
        continue;
      }
      const ij = parts.map((p) => index.get(p));
      let ok = true;
      parts.forEach((p, k) => {
        if (ij[k] === undefined) {
          ok = false;
          bag.error(`\`${p}\` in binary pair \`${e.key}\` is not a component of this file`, r.at(e.keyNode), didYouMean(p, ids) ?? `the components are: ${ids.join(', ')}`);
        }
      });
      const v = r.number(e.value, `kij of \`${e.key}\``, '0.12');
      if (!ok || v === undefined) continue;
      if (ij[0] === ij[1]) {
        bag.error(`binary pair \`${e.key}\` names one component twice`, r.at(e.keyNode));
        continue;
      }
      if (Math.abs(v) >= 1) bag.error(`kij of \`${e.key}\` is ${v}; it must be between -1 and 1`, r.at(e.value));
      kij[ij[0]! * n + ij[1]!] = v;
      kij[ij[1]! * n + ij[0]!] = v;
    }
  }

  // Display.
  const display = { flowUnit: 'kmol/h', pressureUnit: 'bar', temperatureUnit: 'degC' };
  const dispE = get('display');
  if (dispE) {
    const f = r.entries(dispE.value, '`display`', dispE.keyNode) ?? [];
    r.checkKeys(f, ['flow-unit', 'pressure-unit', 'temperature-unit'], '`display`');
    const check = (key: 'flow-unit' | 'pressure-unit' | 'temperature-unit', dim: Dimension, prop: keyof typeof display) => {
      const e = r.find(f, key);
      if (!e) return;
      const u = r.string(e.value, `\`display.${key}\``);
      if (u === undefined) return;
      try {
        parseQuantity(`1 ${u}`, dim, { atmosphere });
        display[prop] = u;
      } catch (err) {
        reportUnitError(r, e.value, `\`display.${key}\``, err);
      }
    };
    check('flow-unit', 'molarFlow', 'flowUnit');
    check('pressure-unit', 'pressure', 'pressureUnit');
    check('temperature-unit', 'temperature', 'temperatureUnit');
  }

  const streamSpans = new Map<string, SourceSpan | undefined>();
  const unitSpans = new Map<string, SourceSpan | undefined>();

  // Feeds.
  const feeds: FeedSpec[] = [];
  const feedsE = get('feeds');
  // Streams that a feed or unit with errors may make: not reported again as unknown.
  const maybeMade = new Set<string>();
  let feedsUnreadable = false;
  if (!feedsE) {
    bag.error('the file has no `feeds:`', src.at(root), 'give at least one feed with its composition and flow');
  } else {
    const feedEntries = r.entries(feedsE.value, '`feeds`', feedsE.keyNode);
    if (!feedEntries) feedsUnreadable = true;
    for (const e of feedEntries ?? []) {
      if (streamSpans.has(e.key)) {
        bag.error(`stream \`${e.key}\` is made twice`, r.at(e.keyNode), 'give each feed and unit outlet its own stream name');
        continue;
      }
      streamSpans.set(e.key, r.at(e.keyNode));
      unitSpans.set(e.key, r.at(e.keyNode));
      const f = readFeed(r, e, ids, index, components, atmosphere, standards, failedStandards);
      if (f) feeds.push(f);
    }
  }

  // Units.
  const units: UnitSpecBase[] = [];
  const unitsE = get('units');
  if (unitsE && !(r.isScalar(unitsE.value) && unitsE.value.value === null)) {
    for (const e of r.entries(unitsE.value, '`units`', unitsE.keyNode) ?? []) {
      if (unitSpans.has(e.key)) {
        bag.error(`the name \`${e.key}\` is used twice (a feed or unit has it already)`, r.at(e.keyNode), 'give every feed and unit its own name');
        for (const s of guessOutlets(r, e)) maybeMade.add(s);
        continue;
      }
      unitSpans.set(e.key, r.at(e.keyNode));
      const u = readUnit(r, e, ids, index, atmosphere, elements);
      if (!u) {
        for (const s of guessOutlets(r, e)) maybeMade.add(s);
        continue;
      }
      units.push(u);
      u.outlets.forEach((s) => {
        if (streamSpans.has(s)) {
          bag.error(`stream \`${s}\` is made twice (by \`${e.key}\` and earlier)`, r.at(e.keyNode), 'every stream is made by exactly one feed or unit: rename one of them');
        } else streamSpans.set(s, r.at(e.keyNode));
      });
    }
  }

  // Stream connectivity: each stream taken at most once, and only existing streams taken.
  const takenBy = new Map<string, string>();
  for (const u of units) {
    for (const s of u.inlets) {
      if (!streamSpans.has(s) && !maybeMade.has(s) && !feedsUnreadable) {
        bag.error(`unit \`${u.name}\` takes stream \`${s}\`, which no feed or unit makes`, u.span,
          didYouMean(s, streamSpans.keys()) ?? 'add a feed of that name, or take the outlet of another unit');
      }
      const prev = takenBy.get(s);
      if (prev !== undefined) {
        bag.error(`stream \`${s}\` is taken by both \`${prev}\` and \`${u.name}\``, u.span, 'a stream goes to one unit; put a splitter before them to divide it');
      } else takenBy.set(s, u.name);
    }
    for (const s of u.outlets) {
      if (u.inlets.includes(s)) bag.error(`unit \`${u.name}\` takes its own outlet \`${s}\``, u.span, 'an outlet must go to another unit or be a product');
    }
  }

  // Tears.
  const tears: string[] = [];
  const tearsE = get('tears');
  if (tearsE) {
    for (const t of r.list(tearsE.value, '`tears`', true) ?? []) {
      const s = r.string(t, 'a tear stream name');
      if (s === undefined) continue;
      if (!streamSpans.has(s)) {
        if (!maybeMade.has(s) && !feedsUnreadable) bag.error(`tear stream \`${s}\` does not exist`, r.at(t), didYouMean(s, streamSpans.keys()) ?? 'name a stream that a unit makes');
      } else if (!takenBy.has(s)) bag.error(`tear stream \`${s}\` is a product (no unit takes it)`, r.at(t), 'a tear stream must lie in a recycle loop');
      else tears.push(s);
    }
  }

  // Solver.
  const solver: Model['solver'] = { method: 'auto', rtol: 1e-10 };
  const solE = get('solver');
  if (solE) {
    const f = r.entries(solE.value, '`solver`', solE.keyNode) ?? [];
    r.checkKeys(f, ['method', 'tolerance', 'max-passes', 'q-min', 'q-max'], '`solver`');
    const m = r.find(f, 'method');
    if (m) {
      const v = r.string(m.value, '`solver.method`');
      if (v !== undefined) {
        if (!['direct', 'wegstein', 'newton', 'auto'].includes(v)) bag.error(`unknown method \`${v}\``, r.at(m.value), 'use `direct`, `wegstein`, `newton` or `auto`');
        else solver.method = v as Model['solver']['method'];
      }
    }
    const t = r.find(f, 'tolerance');
    if (t) {
      const v = r.number(t.value, '`solver.tolerance`', '1e-10');
      if (v !== undefined && !(v > 0 && v < 0.1)) bag.error('`solver.tolerance` must be between 0 and 0.1', r.at(t.value));
      else if (v !== undefined) solver.rtol = v;
    }
    const mp = r.find(f, 'max-passes');
    if (mp) {
      const v = r.number(mp.value, '`solver.max-passes`', '500');
      if (v !== undefined && !(Number.isInteger(v) && v >= 1)) bag.error('`solver.max-passes` must be a whole number >= 1', r.at(mp.value));
      else if (v !== undefined) solver.maxPasses = v;
    }
    for (const [key, prop] of [['q-min', 'qMin'], ['q-max', 'qMax']] as const) {
      const q = r.find(f, key);
      if (!q) continue;
      const v = r.number(q.value, `\`solver.${key}\``, key === 'q-min' ? '-5' : '0');
      if (v === undefined) continue;
      if (!(v <= 0 && v >= -1000)) r.bag.error(`\`solver.${key}\` is ${v}; Wegstein's q is bounded within -1000 to 0`, r.at(q.value), 'the default bounds are -5 <= q <= 0');
      else solver[prop] = v;
    }
    if (solver.qMin !== undefined && solver.qMax !== undefined && solver.qMin > solver.qMax) {
      r.bag.error('`solver.q-min` is above `solver.q-max`', r.at(solE.keyNode));
    }
  }

  if (bag.hasErrors) throw new InputError(bag.items);
  const model: Model = {
    file: path, title: title ?? undefined, components, ids, index, elements,
    thermo: { eos, kij, atmosphere, standards }, display, feeds, units, tears, solver,
    streamSpans, unitSpans, warnings: [],
  };
  // Structure: whether a steady state can exist at all (see structure.ts).
  checkStructure(model, bag);
  if (bag.hasErrors) throw new InputError(bag.items);
  model.warnings = bag.warnings();
  return { model, source: src, targetsNode: get('targets')?.value ?? null, reader: r };
}

function toRecord(counts: unknown): Record<string, number> {
  if (counts instanceof Map) return Object.fromEntries(counts as Map<string, number>);
  return { ...(counts as Record<string, number>) };
}

function matchEos(v: string): EosName | undefined {
  const s = v.trim().toLowerCase().replace(/[\s_-]/g, '');
  if (s === 'srk' || s === 'soaveredlichkwong') return 'SRK';
  if (s === 'pr' || s === 'pengrobinson') return 'PR';
  if (s === 'ideal' || s === 'idealgas') return 'ideal';
  return undefined;
}

export function reportUnitError(r: Reader, node: Node | null, what: string, err: unknown): void {
  if (err instanceof UnitError) {
    r.bag.error(`${what}: ${err.message}`, r.at(node), err.help);
  } else throw err;
}

/** A dimensional scalar at a node, in SI, with the rule checked. */
export function quantityAt(r: Reader, node: Node | null, dim: Dimension | readonly Dimension[], what: string, rule: NumberRule, ctx: { atmosphere: number; standards?: Map<string, StandardRef> }) {
  const v = r.scalar(node, what);
  if (v === undefined) return undefined;
  if (v === null) {
    r.bag.error(`${what} has no value`, r.at(node), rule.example ? `for example \`${rule.example}\`` : undefined);
    return undefined;
  }
  if (typeof v === 'boolean') {
    r.bag.error(`${what} must be a value with a unit, not \`${v}\``, r.at(node), rule.example ? `for example \`${rule.example}\`` : undefined);
    return undefined;
  }
  let q;
  try {
    q = parseQuantity(v, dim, ctx);
  } catch (err) {
    reportUnitError(r, node, what, err);
    return undefined;
  }
  if (!checkRule(r, node, what, q.value, rule, dim)) return undefined;
  return q.value;
}

function checkRule(r: Reader, node: Node | null, what: string, v: number, rule: NumberRule, dim?: Dimension | readonly Dimension[]): boolean {
  const abs = dim === 'pressure' ? ' (absolute, after any gauge conversion)' : dim === 'temperature' ? ' (absolute)' : '';
  const si = dim === 'pressure' ? `${fmt(v)} Pa` : dim === 'temperature' ? `${fmt(v)} K` : fmt(v);
  if (rule.above !== undefined && !(v > rule.above)) {
    r.bag.error(`${what} is ${si}${abs}; it must be above ${rule.above === 0 && dim ? 'zero' : rule.above}`, r.at(node), rule.example ? `for example \`${rule.example}\`` : undefined);
    return false;
  }
  if (rule.min !== undefined && v < rule.min) {
    r.bag.error(`${what} is ${si}; it must be at least ${rule.min}`, r.at(node), rule.example ? `for example \`${rule.example}\`` : undefined);
    return false;
  }
  if (rule.max !== undefined && v > rule.max) {
    r.bag.error(`${what} is ${si}; it must be at most ${rule.max}`, r.at(node), rule.example ? `for example \`${rule.example}\`` : undefined);
    return false;
  }
  return true;
}

function fmt(v: number): string {
  return Number.isInteger(v) ? String(v) : String(Number(v.toPrecision(6)));
}

function requiredQuantity(r: Reader, entries: Entry[], key: string, dim: Dimension | readonly Dimension[], what: string, parent: Node | null, rule: NumberRule, ctx: { atmosphere: number; standards?: Map<string, StandardRef> }) {
  const e = r.find(entries, key);
  if (!e) {
    if (r.strayNear(entries, key)) return undefined;
    r.bag.error(`${what} is missing`, r.at(parent), rule.example ? `add \`${key}: ${rule.example}\`` : undefined);
    return undefined;
  }
  return quantityAt(r, e.value, dim, what, rule, ctx);
}

function readComponent(r: Reader, e: Entry): ComponentData | undefined {
  const lib = findComponent(e.key);
  const v = e.value;
  const isEmpty = v === null || (r.isScalar(v) && (v.value === null || v.value === '' || v.value === 'library')) || (r.isMap(v) && v.items.length === 0);
  if (isEmpty) {
    if (r.isScalar(v) && typeof v.value === 'string' && v.value !== '' && v.value !== 'library') {
      r.bag.error(`component \`${e.key}\`: \`${v.value}\` is not understood`, r.at(v), 'write `{}` or `library` for the built-in data, or a body with Tc, Pc, omega and formula');
      return undefined;
    }
    if (!lib) {
      r.bag.error(`unknown component \`${e.key}\``, r.at(e.keyNode),
        didYouMean(e.key, componentIds()) ?? 'give its constants inline: `{ Tc: 408.1 K, Pc: 36.5 bar, omega: 0.183, formula: C4H10 }`');
      return undefined;
    }
    // Molar mass from the formula and the standard atomic weights, so that the mass balance
    // closes exactly wherever the element balance does (table values agree to 0.05 %).
    return { ...lib, id: e.key, MW: molarMass(lib.formula) };
  }
  if (r.isScalar(v)) {
    r.bag.error(`component \`${e.key}\` must be \`{}\`, \`library\` or a mapping of constants`, r.at(v));
    return undefined;
  }
  const f = r.entries(v, `component \`${e.key}\``, e.keyNode);
  if (!f) return undefined;
  r.checkKeys(f, ['Tc', 'Pc', 'omega', 'MW', 'formula', 'name'], `component \`${e.key}\``);
  const ctx = { atmosphere: 101325 };
  const need = (key: string) => {
    if (!lib && !r.find(f, key)) {
      r.bag.error(`component \`${e.key}\` is not in the built-in table, so \`${key}\` is required`, r.at(e.keyNode),
        didYouMean(e.key, componentIds()) ?? `add \`${key}\` (e.g. \`${key === 'Tc' ? 'Tc: 408.1 K' : key === 'Pc' ? 'Pc: 36.5 bar' : key === 'omega' ? 'omega: 0.183' : 'formula: C4H10'}\`)`);
      return false;
    }
    return true;
  };
  const ok = [need('Tc'), need('Pc'), need('omega'), need('formula')].every(Boolean);
  const get = (k: string) => r.find(f, k);
  const Tc = get('Tc') ? quantityAt(r, get('Tc')!.value, 'temperature', `\`Tc\` of \`${e.key}\``, { above: 0, example: '408.1 K' }, ctx) : lib?.Tc;
  const Pc = get('Pc') ? quantityAt(r, get('Pc')!.value, 'pressure', `\`Pc\` of \`${e.key}\``, { above: 0, example: '36.5 bar' }, ctx) : lib?.Pc;
  const omega = get('omega') ? r.number(get('omega')!.value, `\`omega\` of \`${e.key}\``, '0.183') : lib?.omega;
  if (omega !== undefined && (omega < -1 || omega > 2)) r.bag.error(`\`omega\` of \`${e.key}\` is ${omega}; acentric factors lie between about -0.4 and 1.5`, r.at(get('omega')!.value));
  let formula = get('formula') ? r.string(get('formula')!.value, `\`formula\` of \`${e.key}\``, 'C4H10') : lib?.formula;
  if (formula !== undefined) {
    try {
      parseFormula(formula);
    } catch (err) {
      r.bag.error(`\`formula\` of \`${e.key}\`: ${(err as Error).message}`, r.at(get('formula')?.value ?? e.keyNode), 'write element symbols with counts, e.g. `C4H10` or `CH3OH`');
      formula = undefined;
    }
  }
  let MW = get('MW') ? quantityAt(r, get('MW')!.value, 'molarMass', `\`MW\` of \`${e.key}\``, { above: 0, example: '58.12 g/mol' }, ctx) : undefined;
  if (MW === undefined && !get('MW') && formula) MW = molarMass(formula);
  const name = get('name') ? r.string(get('name')!.value, `\`name\` of \`${e.key}\``) : lib?.name ?? e.key;
  if (!ok || Tc === undefined || Pc === undefined || omega === undefined || formula === undefined || MW === undefined) return undefined;
  return {
    id: e.key, name: name ?? e.key, formula, MW, Tc, Pc, omega,
    source: lib ? `${lib.source}; overridden in ${r.src.path}` : `given in ${r.src.path}`,
  };
}

/** `{ ID: number }` over the components -> dense array; reports unknown ids and bad values. */
function readFractionMap(r: Reader, node: Node | null, what: string, parent: Node | null, ids: string[], index: Map<string, number>, rule: { min?: number; max?: number; dimension?: Dimension }, ctx: { atmosphere: number }): Float64Array | undefined {
  const f = r.entries(node, what, parent);
  if (!f) return undefined;
  const out = new Float64Array(ids.length);
  let ok = true;
  for (const e of f) {
    const i = index.get(e.key);
    if (i === undefined) {
      r.bag.error(`\`${e.key}\` in ${what} is not a component of this file`, r.at(e.keyNode),
        didYouMean(e.key, ids) ?? `add it under \`components:\` or use one of: ${ids.join(', ')}`);
      ok = false;
      continue;
    }
    const v = rule.dimension
      ? quantityAt(r, e.value, rule.dimension, `the flow of \`${e.key}\` in ${what}`, { min: 0, example: '1.2 kmol/h' }, ctx)
      : r.number(e.value, `the value of \`${e.key}\` in ${what}`, '0.5');
    if (v === undefined) {
      ok = false;
      continue;
    }
    if ((rule.min !== undefined && v < rule.min) || (rule.max !== undefined && v > rule.max)) {
      r.bag.error(`the value of \`${e.key}\` in ${what} is ${v}; it must lie between ${rule.min ?? '-inf'} and ${rule.max ?? 'inf'}`, r.at(e.value));
      ok = false;
      continue;
    }
    out[i] = v;
  }
  return ok ? out : undefined;
}

function readFeed(r: Reader, e: Entry, ids: string[], index: Map<string, number>, comps: ComponentData[], atmosphere: number, standards: Map<string, StandardRef>, failedStandards: ReadonlySet<string> = new Set()): FeedSpec | undefined {
  const what = `feed \`${e.key}\``;
  const f = r.entries(e.value, what, e.keyNode);
  if (!f) return undefined;
  r.checkKeys(f, FEED_KEYS, what);
  const get = (k: string) => r.find(f, k);
  const ctx = { atmosphere, standards };
  const forms = FLOW_FORMS.filter((k) => get(k));
  if (forms.length === 0) {
    if (r.strayNear(f, ...FLOW_FORMS)) return undefined; // a misspelt flow key is reported already
    r.bag.error(`${what} has no flow`, r.at(e.keyNode), 'give one of `meter: { flow, pressure, temperature }`, `molar-flow`, `mass-flow`, `standard-flow` or `flows`');
    return undefined;
  }
  if (forms.length > 1) {
    r.bag.error(`${what} gives its flow ${forms.length} ways (${forms.join(', ')})`, r.at(get(forms[1])!.keyNode), 'keep one of them');
    return undefined;
  }
  const form = forms[0];
  const normalize = get('normalize') ? r.boolean(get('normalize')!.value, `\`normalize\` of ${what}`) ?? false : false;

  // Composition (mole fractions).
  let composition: Float64Array | undefined;
  let flowsSI: Float64Array | undefined;
  const molE = get('composition');
  const massE = get('mass-composition');
  // A problem here is reported, and the rest of the feed is still read (all problems at once).
  readComposition: {
    if (form === 'flows') {
      if (molE || massE) r.bag.error(`${what} gives \`flows\` per component, so it takes no composition`, r.at((molE ?? massE)!.keyNode), 'remove the composition: it follows from the flows');
      flowsSI = readFractionMap(r, get('flows')!.value, `\`flows\` of ${what}`, get('flows')!.keyNode, ids, index, { dimension: 'molarFlow' }, ctx);
      if (!flowsSI) break readComposition;
      const total = flowsSI.reduce((a, b) => a + b, 0);
      if (!(total > 0)) {
        r.bag.error(`the flows of ${what} add up to zero`, r.at(get('flows')!.keyNode), 'give at least one positive component flow');
        break readComposition;
      }
      composition = flowsSI.map((v) => v / total);
    } else {
      if (molE && massE) {
        r.bag.error(`${what} gives both \`composition\` and \`mass-composition\``, r.at(massE.keyNode), 'keep one of them');
        break readComposition;
      }
      const ce = molE ?? massE;
      if (!ce) {
        if (r.strayNear(f, 'composition', 'mass-composition')) break readComposition;
        r.bag.error(`${what} has no composition`, r.at(e.keyNode), 'add `composition: { H2: 0.985, N2: 0.015 }` (mole fractions) or `mass-composition`');
        break readComposition;
      }
      const frac = readFractionMap(r, ce.value, `\`${ce.key}\` of ${what}`, ce.keyNode, ids, index, { min: 0, max: normalize ? Infinity : 1 }, ctx);
      if (!frac) break readComposition;
      const sum = frac.reduce((a, b) => a + b, 0);
      if (!(sum > 0)) {
        r.bag.error(`the ${ce.key} of ${what} is all zero`, r.at(ce.value), 'give at least one positive fraction');
        break readComposition;
      }
      if (Math.abs(sum - 1) > 1e-6 && !normalize) {
        r.bag.error(`${ce.key} of ${what} sums to ${Number(sum.toPrecision(8))}, not 1`, r.at(ce.value), 'give every component, or add `normalize: true` to scale the fractions to 1');
        break readComposition;
      }
      if (ce.key === 'mass-composition') {
        const moles = frac.map((w, i) => w / comps[i].MW);
        const t = moles.reduce((a, b) => a + b, 0);
        composition = moles.map((m) => m / t);
      } else composition = frac.map((v) => v / sum);
    }
  }

  // Flow basis.
  let basis: FeedBasis | undefined;
  let T: number | undefined;
  let P: number | undefined;
  const fe = get(form)!;
  if (form === 'meter') {
    const m = r.entries(fe.value, `\`meter\` of ${what}`, fe.keyNode);
    if (!m) return undefined;
    r.checkKeys(m, ['flow', 'pressure', 'temperature', 'design'], `\`meter\` of ${what}`);
    const flow = requiredQuantity(r, m, 'flow', 'volumeFlow', `the meter flow of ${what}`, fe.keyNode, { above: 0, example: '12.6 m3/h' }, ctx);
    const Pm = requiredQuantity(r, m, 'pressure', 'pressure', `the meter pressure of ${what}`, fe.keyNode, { above: 0, example: '30 barg' }, ctx);
    const Tm = requiredQuantity(r, m, 'temperature', 'temperature', `the meter temperature of ${what}`, fe.keyNode, { above: 0, example: '35 degC' }, ctx);
    let design: MeterDesign | undefined;
    const de = r.find(m, 'design');
    if (de) {
      const d = r.entries(de.value, `\`meter.design\` of ${what}`, de.keyNode) ?? [];
      r.checkKeys(d, ['pressure', 'temperature', 'composition', 'density'], `\`meter.design\` of ${what}`);
      design = {};
      const dd = r.find(d, 'density');
      if (dd) design.density = quantityAt(r, dd.value, 'density', `the design density of ${what}`, { above: 0, example: '2.5 kg/m3' }, ctx);
      const dp = r.find(d, 'pressure');
      const dt = r.find(d, 'temperature');
      const dc = r.find(d, 'composition');
      if (dd && (dp || dt || dc)) {
        r.bag.error(`\`meter.design\` of ${what} gives a density and a design state`, r.at(dd.keyNode), 'give either `density`, or `pressure` and `temperature` (and optionally `composition`)');
      } else if (!dd) {
        if (!dp || !dt) {
          r.bag.error(`\`meter.design\` of ${what} needs \`pressure\` and \`temperature\` (or \`density\`)`, r.at(de.keyNode), 'for example `design: { pressure: 28 barg, temperature: 30 degC }`');
        } else {
          design.P = quantityAt(r, dp.value, 'pressure', `the design pressure of ${what}`, { above: 0, example: '28 barg' }, ctx);
          design.T = quantityAt(r, dt.value, 'temperature', `the design temperature of ${what}`, { above: 0, example: '30 degC' }, ctx);
          if (dc) {
            const c = readFractionMap(r, dc.value, `the design composition of ${what}`, dc.keyNode, ids, index, { min: 0, max: 1 }, ctx);
            if (c) {
              const s = c.reduce((a, b) => a + b, 0);
              if (Math.abs(s - 1) > 1e-6) r.bag.error(`the design composition of ${what} sums to ${Number(s.toPrecision(8))}, not 1`, r.at(dc.value), 'give mole fractions that sum to 1');
              else design.composition = c;
            }
          }
        }
      }
    }
    if (flow === undefined || Pm === undefined || Tm === undefined) return undefined;
    basis = { kind: 'meter', flow, T: Tm, P: Pm, design };
    T = Tm;
    P = Pm;
  } else if (form === 'molar-flow') {
    const v = quantityAt(r, fe.value, 'molarFlow', `\`molar-flow\` of ${what}`, { above: 0, example: '4.2 mol/s' }, ctx);
    if (v === undefined) return undefined;
    basis = { kind: 'molar-flow', flow: v };
  } else if (form === 'mass-flow') {
    const v = quantityAt(r, fe.value, 'massFlow', `\`mass-flow\` of ${what}`, { above: 0, example: '120 kg/h' }, ctx);
    if (v === undefined) return undefined;
    basis = { kind: 'mass-flow', flow: v };
  } else if (form === 'standard-flow') {
    let node = fe.value;
    let refName: string | undefined;
    let realGas = true;
    if (r.isMap(node)) {
      const s = r.entries(node, `\`standard-flow\` of ${what}`, fe.keyNode) ?? [];
      r.checkKeys(s, ['flow', 'reference', 'basis'], `\`standard-flow\` of ${what}`);
      const re = r.find(s, 'reference');
      if (re) {
        refName = r.string(re.value, 'the standard reference');
        if (refName !== undefined && !standards.has(refName)) {
          // A reference whose definition already failed has its own message.
          if (failedStandards.has(refName)) return undefined;
          r.bag.error(`unknown standard reference \`${refName}\``, r.at(re.value), didYouMean(refName, standards.keys()) ?? `define it under \`thermo.standards\`, or use one of: ${[...standards.keys()].join(', ')}`);
          return undefined;
        }
      }
      const be = r.find(s, 'basis');
      if (be) {
        const b = r.string(be.value, 'the standard-volume basis');
        if (b !== 'real' && b !== 'ideal') r.bag.error('`basis` must be `real` (real-gas volume at the reference, ISO 13443) or `ideal`', r.at(be.value));
        else realGas = b === 'real';
      }
      const fl = r.find(s, 'flow');
      if (!fl) {
        r.bag.error(`\`standard-flow\` of ${what} has no \`flow\``, r.at(fe.keyNode), 'for example `standard-flow: { flow: 120 m3/h, reference: plant }`');
        return undefined;
      }
      node = fl.value;
    }
    const raw = r.scalar(node, `\`standard-flow\` of ${what}`);
    if (raw === undefined) return undefined;
    let q;
    try {
      q = refName ? parseQuantity(raw as string, 'volumeFlow', ctx) : parseQuantity(raw as string, 'standardFlow', ctx);
    } catch (err) {
      reportUnitError(r, node, `\`standard-flow\` of ${what}`, err);
      return undefined;
    }
    if (!(q.value > 0)) {
      r.bag.error(`\`standard-flow\` of ${what} must be above zero`, r.at(node));
      return undefined;
    }
    const ref = refName ? standards.get(refName)! : q.standard!;
    basis = { kind: 'standard-flow', flow: q.value, reference: ref, realGas };
  } else if (flowsSI) {
    basis = { kind: 'flows', flows: flowsSI };
  }
  const te = get('T');
  const pe = get('P');
  if (te) T = quantityAt(r, te.value, 'temperature', `\`T\` of ${what}`, { above: 0, example: '35 degC' }, ctx);
  if (pe) P = quantityAt(r, pe.value, 'pressure', `\`P\` of ${what}`, { above: 0, example: '30 barg' }, ctx);
  if (form !== 'meter') {
    if (!te && !r.strayNear(f, 'T')) r.bag.error(`${what} has no temperature`, r.at(e.keyNode), 'add `T: 35 degC` (the stream temperature)');
    if (!pe && !r.strayNear(f, 'P')) r.bag.error(`${what} has no pressure`, r.at(e.keyNode), 'add `P: 30 barg` (the stream pressure)');
  }
  if (T === undefined || P === undefined || !basis || !composition) return undefined;
  return { name: e.key, span: r.at(e.keyNode), composition, basis, T, P };
}

/**
 * The stream names a unit entry seems to make (`out`, `vapor`, `liquid`), read without
 * reporting anything: used only so that a unit with errors does not also make every stream
 * downstream of it "unknown".
 */
const NOT_OUTLET_KEYS = ['type', 'in', 'T', 'P', 'reactions', 'sequence', 'model', 'split'];

function guessOutlets(r: Reader, e: Entry): string[] {
  const out: string[] = [];
  const body = r.src.peek(e.value);
  if (!r.isMap(body)) return out;
  for (const item of body.items) {
    const k = r.src.peek(item.key as Node);
    // `out`, `vapor`, `liquid`, or a key that is none of the others (perhaps a misspelt `out`).
    if (!r.isScalar(k) || NOT_OUTLET_KEYS.includes(String(k.value))) continue;
    const v = r.src.peek(item.value as Node);
    if (r.isScalar(v) && typeof v.value === 'string') out.push(v.value);
    else if (r.isSeq(v)) for (const x of v.items) {
      const xs = r.src.peek(x as Node);
      if (r.isScalar(xs) && typeof xs.value === 'string') out.push(xs.value);
    }
    else if (r.isMap(v)) for (const p of v.items) {
      const ks = r.src.peek(p.key as Node);
      if (r.isScalar(ks)) out.push(String(ks.value));
    }
  }
  return out;
}

function readUnit(r: Reader, e: Entry, ids: string[], index: Map<string, number>, atmosphere: number, elements: Record<string, number>[]): UnitSpecBase | undefined {
  const what = `unit \`${e.key}\``;
  const f = r.entries(e.value, what, e.keyNode);
  if (!f) return undefined;
  const te = r.find(f, 'type');
  if (!te) {
    r.bag.error(`${what} has no \`type\``, r.at(e.keyNode), `add \`type:\` with one of: ${blockTypes().join(', ')}`);
    return undefined;
  }
  const type = r.string(te.value, `\`type\` of ${what}`);
  if (type === undefined) return undefined;
  const def = BLOCKS[type];
  if (!def) {
    r.bag.error(`unknown unit type \`${type}\``, r.at(te.value), didYouMean(type, blockTypes()) ?? `the unit types are: ${blockTypes().join(', ')}`);
    return undefined;
  }
  r.checkKeys(f, ['type', ...def.keys], what);
  const before = r.bag.errors().length;
  const fields = new YamlFields(r, f, e.keyNode, what, ids, index, atmosphere, elements);
  const spec = def.read(e.key, fields);
  if (!spec || r.bag.errors().length > before) return undefined;
  spec.span = r.at(e.keyNode);
  return spec;
}

/** FieldReader over a YAML mapping. */
export class YamlFields implements FieldReader {
  constructor(
    private readonly r: Reader,
    private readonly entries: Entry[],
    private readonly owner: Node | null,
    readonly what: string,
    readonly componentIds: readonly string[],
    private readonly index: Map<string, number>,
    private readonly atmosphere: number,
    readonly elements: readonly Record<string, number>[],
  ) {}

  private get(key: string) {
    return this.r.find(this.entries, key);
  }

  private missing(key: string, example?: string) {
    if (this.r.strayNear(this.entries, key)) return; // a misspelling of it is reported already
    this.r.bag.error(`${this.what} has no \`${key}\``, this.r.at(this.owner), example ? `add \`${key}: ${example}\`` : undefined);
  }

  has(key: string): boolean {
    return this.get(key) !== undefined;
  }

  quantity(key: string, dimension: Dimension, rule: NumberRule = {}): number | undefined {
    const e = this.get(key);
    if (!e) {
      if (rule.required) this.missing(key, rule.example);
      return undefined;
    }
    return quantityAt(this.r, e.value, dimension, `\`${key}\` of ${this.what}`, rule, { atmosphere: this.atmosphere });
  }

  number(key: string, rule: NumberRule = {}): number | undefined {
    const e = this.get(key);
    if (!e) {
      if (rule.required) this.missing(key, rule.example);
      return undefined;
    }
    const v = this.r.number(e.value, `\`${key}\` of ${this.what}`, rule.example);
    if (v === undefined) return undefined;
    return checkRule(this.r, e.value, `\`${key}\` of ${this.what}`, v, rule) ? v : undefined;
  }

  string(key: string, opts: { required?: boolean; oneOf?: readonly string[]; example?: string } = {}): string | undefined {
    const e = this.get(key);
    if (!e) {
      if (opts.required) this.missing(key, opts.example ?? opts.oneOf?.[0]);
      return undefined;
    }
    const v = this.r.string(e.value, `\`${key}\` of ${this.what}`, opts.example);
    if (v !== undefined && opts.oneOf && !opts.oneOf.includes(v)) {
      this.r.bag.error(`\`${key}\` of ${this.what} is \`${v}\``, this.r.at(e.value), `use one of: ${opts.oneOf.join(', ')}`);
      return undefined;
    }
    return v;
  }

  boolean(key: string): boolean | undefined {
    const e = this.get(key);
    if (!e) return undefined;
    return this.r.boolean(e.value, `\`${key}\` of ${this.what}`);
  }

  private streamName(node: Node | null, what: string): string | undefined {
    const v = this.r.scalar(node, what);
    if (v === undefined) return undefined;
    if (typeof v !== 'string' || v.trim() === '') {
      this.r.bag.error(`${what} must be a stream name`, this.r.at(node));
      return undefined;
    }
    return v;
  }

  stream(key: string, opts: { required?: boolean } = {}): string | undefined {
    const e = this.get(key);
    if (!e) {
      if (opts.required) this.missing(key, 'stream-name');
      return undefined;
    }
    return this.streamName(e.value, `\`${key}\` of ${this.what}`);
  }

  streams(key: string, opts: { required?: boolean } = {}): string[] | undefined {
    const e = this.get(key);
    if (!e) {
      if (opts.required) this.missing(key, '[stream-a, stream-b]');
      return undefined;
    }
    const items = this.r.list(e.value, `\`${key}\` of ${this.what}`, true);
    if (!items) return undefined;
    const out: string[] = [];
    for (const it of items) {
      const s = this.streamName(it, `a stream in \`${key}\` of ${this.what}`);
      if (s === undefined) return undefined;
      if (out.includes(s)) {
        this.r.bag.error(`stream \`${s}\` is listed twice in \`${key}\` of ${this.what}`, this.r.at(it));
        return undefined;
      }
      out.push(s);
    }
    if (out.length === 0) {
      this.r.bag.error(`\`${key}\` of ${this.what} is empty`, this.r.at(e.keyNode));
      return undefined;
    }
    return out;
  }

  component(key: string, opts: { required?: boolean } = {}): number | undefined {
    const e = this.get(key);
    if (!e) {
      if (opts.required) this.missing(key, this.componentIds[0]);
      return undefined;
    }
    const v = this.r.string(e.value, `\`${key}\` of ${this.what}`);
    if (v === undefined) return undefined;
    const i = this.index.get(v);
    if (i === undefined) {
      this.r.bag.error(`\`${v}\` (\`${key}\` of ${this.what}) is not a component of this file`, this.r.at(e.value),
        didYouMean(v, this.componentIds) ?? `use one of: ${this.componentIds.join(', ')}`);
    }
    return i;
  }

  componentFractions(key: string, opts: { required?: boolean; defaultValue?: number } = {}): Float64Array | undefined {
    const e = this.get(key);
    if (!e) {
      if (opts.required) this.missing(key, `{ ${this.componentIds[0]}: 0.5 }`);
      return undefined;
    }
    const arr = readFractionMap(this.r, e.value, `\`${key}\` of ${this.what}`, e.keyNode, [...this.componentIds], this.index, { min: 0, max: 1 }, { atmosphere: this.atmosphere });
    if (arr && opts.defaultValue !== undefined) {
      const given = new Set((this.r.entries(e.value, '') ?? []).map((x) => x.key));
      this.componentIds.forEach((id, i) => {
        if (!given.has(id)) arr[i] = opts.defaultValue!;
      });
    }
    return arr;
  }

  outlets(key: string): OutletEntry[] | undefined {
    const e = this.get(key);
    if (!e) {
      this.missing(key, '{ recycle: 0.97, purge: rest }');
      return undefined;
    }
    const list = this.r.entries(e.value, `\`${key}\` of ${this.what}`, e.keyNode);
    if (!list) return undefined;
    const out: OutletEntry[] = [];
    let bad = false;
    for (const o of list) {
      const report = (message: string, help?: string) => this.r.bag.error(message, this.r.at(o.keyNode), help);
      const v = o.value;
      if (this.r.isScalar(v) && v.value === 'rest') {
        out.push({ stream: o.key, value: 'rest', report });
      } else if (this.r.isScalar(v)) {
        const num = this.r.number(v, `the fraction to \`${o.key}\` in ${this.what}`, '0.97');
        if (num === undefined) {
          bad = true;
          continue;
        }
        if (num < 0 || num > 1) {
          this.r.bag.error(`the fraction to \`${o.key}\` in ${this.what} is ${num}; it must lie between 0 and 1`, this.r.at(v), 'write the share of the inlet this outlet takes, e.g. `0.03`, and `rest` for one outlet');
          bad = true;
          continue;
        }
        out.push({ stream: o.key, value: num, report });
      } else if (this.r.isMap(v)) {
        const arr = readFractionMap(this.r, v, `the recoveries to \`${o.key}\` in ${this.what}`, o.keyNode, [...this.componentIds], this.index, { min: 0, max: 1 }, { atmosphere: this.atmosphere });
        if (!arr) {
          bad = true;
          continue;
        }
        const given = new Set((this.r.entries(v, '') ?? []).map((x) => x.key));
        const dense = new Float64Array(this.componentIds.length).fill(Number.NaN);
        this.componentIds.forEach((id, i) => {
          if (given.has(id)) dense[i] = arr[i];
        });
        out.push({ stream: o.key, value: dense, report });
      } else {
        this.r.bag.error(`the outlet \`${o.key}\` of ${this.what} needs a fraction, \`rest\` or per-component recoveries`, this.r.at(o.keyNode));
        bad = true;
      }
    }
    return bad ? undefined : out;
  }

  items(key: string, opts: { required?: boolean; what?: string } = {}): FieldReader[] | undefined {
    const e = this.get(key);
    if (!e) {
      if (opts.required) this.missing(key, '[ ... ]');
      return undefined;
    }
    const list = this.r.list(e.value, `\`${key}\` of ${this.what}`);
    if (!list) return undefined;
    if (list.length === 0) {
      this.r.bag.error(`\`${key}\` of ${this.what} is empty`, this.r.at(e.keyNode));
      return undefined;
    }
    const out: FieldReader[] = [];
    list.forEach((node, i) => {
      const w = `${opts.what ?? 'item'} ${i + 1} of ${this.what}`;
      const sub = this.r.entries(node, w, e.keyNode);
      if (sub) out.push(new YamlFields(this.r, sub, node, w, this.componentIds, this.index, this.atmosphere, this.elements));
    });
    return out;
  }

  /** Keys present in this mapping. */
  keys(): string[] {
    return this.entries.map((e) => e.key);
  }

  checkKeys(allowed: readonly string[]): void {
    this.r.checkKeys(this.entries, allowed, this.what);
  }

  error(key: string | null, message: string, help?: string): void {
    const e = key ? this.get(key) : undefined;
    this.r.bag.error(message, this.r.at(e ? e.value ?? e.keyNode : this.owner), help);
  }

  warning(key: string | null, message: string, help?: string): void {
    const e = key ? this.get(key) : undefined;
    this.r.bag.warning(message, this.r.at(e ? e.value ?? e.keyNode : this.owner), help);
  }
}
