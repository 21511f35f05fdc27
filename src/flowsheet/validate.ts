/**
 * Parsed document -> validated, frozen model. Every problem found is reported with its
 * position, and the whole file is checked before anything is computed. The sections are read by
 * read-components.ts, read-sections.ts and, for feeds and units, by the blocks themselves through
 * a YamlFields reader that records what they read (the parameter layer's settings).
 */
import { readFileSync, statSync } from 'node:fs';
import type { Node } from 'yaml';
import { DiagnosticBag, InputError, didYouMean, nearest, type SourceSpan } from '../diagnostics.js';
import { BLOCKS, FEED, blockTypes } from '../blocks/registry.js';
import type { BlockDef } from '../blocks/types.js';
import { parseFormula } from '../thermo/formula.js';
import type { ComponentData } from '../thermo/types.js';
import { planFlowsheet, type GraphUnit } from './graph.js';
import { deepFreeze, FrozenMap, type FeedSpec, type LoadedFile, type Model, type TargetDecl, type UnitSpecBase } from './model.js';
import { readComponent } from './read-components.js';
import { readDisplay, readKij, readSolver, readThermo } from './read-sections.js';
import { isSettingMap, type OwnerSettings, type Setting, type SettingMap } from './settings.js';
import { Reader, SourceFile, MAX_FILE_BYTES, type Entry } from './source.js';
import { checkStructure } from './structure.js';
import { YamlFields, type FieldContext, type Recording } from './yaml-fields.js';
import { findRecycles } from './recycles.js';
import { readPlantSections } from '../plant/read.js';

const TOP_KEYS = ['title', 'components', 'thermo', 'display', 'feeds', 'units', 'tears', 'solver', 'targets', 'instruments', 'readings'] as const;

export type { LoadedFile } from './model.js';

/** Reads and validates a flowsheet file. Throws InputError with every problem found. */
export function loadFlowsheet(path: string): LoadedFile {
  return validateText(path, readFlowsheetFile(path));
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

export function validateText(path: string, text: string, bag = new DiagnosticBag()): LoadedFile {
  return validateSource(parseSource(path, text, bag), bag);
}

/** Parses the text; throws InputError on YAML syntax errors. */
export function parseSource(path: string, text: string, bag = new DiagnosticBag()): SourceFile {
  const src = new SourceFile(path, text, bag);
  if (bag.hasErrors) throw new InputError(bag.items);
  return src;
}

/** Validates a parsed document into a frozen model. Throws InputError with every problem. */
export function validateSource(src: SourceFile, bag = new DiagnosticBag()): LoadedFile {
  src.restart(bag);
  const path = src.path;
  const r = new Reader(src);
  const root = src.root();
  if (root === null || (r.isScalar(root) && (root.value === null || root.value === ''))) {
    throw new InputError([{ severity: 'error', message: `${path} is empty`, span: src.at(null), help: 'a flowsheet needs at least `components:` and `feeds:`' }]);
  }
  const top = r.entries(root, 'the flowsheet file');
  if (!top) throw new InputError(bag.items);
  r.checkKeys(top, TOP_KEYS, 'the flowsheet file');
  const get = (k: string) => r.find(top, k);

  const title = get('title') ? r.string(get('title')!.value, '`title`') : undefined;

  // Components. One whose definition fails stays in the list as a placeholder, so that the
  // places that name it do not report it again as unknown (nothing is computed with it).
  const compEntry = get('components');
  const components: ComponentData[] = [];
  const known = new Set<string>();
  if (!compEntry) {
    bag.error('the file has no `components:`', src.at(root), 'list the components, e.g. `components: { H2: {}, N2: {} }`');
  } else if (r.isSeq(compEntry.value) && compEntry.value.items.every((n) => r.isScalar(n as Node) && typeof (n as { value: unknown }).value === 'string')) {
    // A list of names: one message with the mapping to write; the names stand as placeholders,
    // so that the feeds and units that name them do not each report them as unknown.
    const names = compEntry.value.items.map((n) => String((n as { value: unknown }).value));
    bag.error('`components` must be a mapping (`key: value` lines or `{ key: value }`)', r.at(compEntry.value),
      `write \`components: { ${names.map((n) => `${n}: {}`).join(', ')} }\` (\`{}\` takes the built-in constants)`);
    for (const id of names) {
      if (known.has(id)) continue;
      known.add(id);
      components.push({ id, name: id, formula: '', MW: Number.NaN, Tc: Number.NaN, Pc: Number.NaN, omega: Number.NaN, source: 'not read' });
    }
  } else {
    const list = r.entries(compEntry.value, '`components`', compEntry.keyNode);
    if (list && list.length === 0) bag.error('`components` is empty', r.at(compEntry.keyNode), 'name at least one component, e.g. `H2: {}`');
    for (const e of list ?? []) {
      const c = readComponent(r, e);
      known.add(e.key);
      components.push(c ?? { id: e.key, name: e.key, formula: '', MW: Number.NaN, Tc: Number.NaN, Pc: Number.NaN, omega: Number.NaN, source: 'not read' });
    }
  }
  const ids = components.map((c) => c.id);
  const index = new FrozenMap(ids.map((id, i) => [id, i] as const));
  const elements = components.map((c) => {
    try {
      return c.formula ? toRecord(parseFormula(c.formula)) : {};
    } catch {
      return {};
    }
  });

  const thermo = readThermo(r, get('thermo'));
  const kij = readKij(r, thermo.kijEntry, ids, index, known);
  const display = readDisplay(r, get('display'), thermo.atmosphere);
  const ctx: FieldContext = { ids, index, components, elements, atmosphere: thermo.atmosphere, standards: thermo.standards, failedStandards: thermo.failedStandards };

  const streamSpans = new Map<string, SourceSpan | undefined>();
  const unitSpans = new Map<string, SourceSpan | undefined>();
  const makers = new Map<string, string>();
  const settings = new Map<string, OwnerSettings>();
  // Streams that a feed or unit with errors may make: not reported again as unknown.
  const maybeMade = new Set<string>();

  /** Reads one feed or unit with its block; records its settings. */
  const readOwner = <S extends UnitSpecBase>(def: BlockDef<S>, e: Entry, entries: Entry[], kind: 'unit' | 'feed'): S | undefined => {
    const rec: Recording = { slots: [], spans: new Map() };
    const values = new Map<string, Setting>();
    const what = `${kind} \`${e.key}\``;
    const before = bag.errors().length;
    const spec = def.read(e.key, new YamlFields(r, entries, e.keyNode, what, ctx, rec, [], values));
    if (!spec || bag.errors().length > before) return undefined;
    spec.span = r.at(e.keyNode);
    const prefix = kind === 'feed' ? `feeds.${e.key}` : e.key;
    settings.set(prefix, { kind, name: e.key, type: def.type, prefix, settings: frozenSettings(values), slots: rec.slots, spans: new FrozenMap(rec.spans), span: r.at(e.keyNode) });
    return spec;
  };

  // Feeds.
  const feeds: FeedSpec[] = [];
  const feedsE = get('feeds');
  let feedsUnreadable = false;
  if (!feedsE) {
    bag.error('the file has no `feeds:`', src.at(root), 'give at least one feed with its composition and flow');
  } else {
    const feedEntries = r.entries(feedsE.value, '`feeds`', feedsE.keyNode);
    if (!feedEntries) feedsUnreadable = true;
    for (const e of feedEntries ?? []) {
      if (streamSpans.has(e.key)) {
        bag.error(`stream \`${e.key}\` is made twice (by feed \`${e.key}\` and feed \`${makers.get(e.key)}\`)`, r.at(e.keyNode), 'give each feed and unit outlet its own stream name');
        continue;
      }
      streamSpans.set(e.key, r.at(e.keyNode));
      unitSpans.set(e.key, r.at(e.keyNode));
      makers.set(e.key, e.key);
      const entries = r.entries(e.value, `feed \`${e.key}\``, e.keyNode);
      const f = entries ? readOwner(FEED, e, entries, 'feed') : undefined;
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
      const u = readUnit(r, e, readOwner);
      if (!u) {
        for (const s of guessOutlets(r, e)) maybeMade.add(s);
        continue;
      }
      units.push(u);
      const own = settings.get(u.name)!;
      u.outlets.forEach((s) => {
        if (streamSpans.has(s)) {
          const by = makers.get(s);
          bag.error(`stream \`${s}\` is made twice (by \`${e.key}\` and by \`${by}\`)`, streamSpan(own, s, 'out') ?? r.at(e.keyNode),
            `every stream is made by exactly one feed or unit: rename the outlet of \`${e.key}\` or of \`${by}\``);
        } else {
          streamSpans.set(s, streamSpan(own, s, 'out') ?? r.at(e.keyNode));
          makers.set(s, e.key);
        }
      });
    }
  }

  // Stream connectivity: each stream taken at most once, and only existing streams taken.
  const takenBy = new Map<string, string>();
  const allInlets = new Set(units.flatMap((u) => u.inlets));
  // Streams made but taken by no unit: a misspelt inlet most likely meant one of these.
  const untaken = [...streamSpans.keys()].filter((x) => !allInlets.has(x));
  for (const u of units) {
    const own = settings.get(u.name)!;
    for (const s of u.inlets) {
      const at = streamSpan(own, s, 'in') ?? u.span;
      if (!streamSpans.has(s) && !maybeMade.has(s) && !feedsUnreadable) {
        const near = nearest(s, untaken.filter((x) => !u.outlets.includes(x)), 1)[0];
        if (near !== undefined && !feedNamesOf(feeds).has(near)) {
          const maker = makers.get(near)!;
          bag.error(`unit \`${u.name}\` takes stream \`${s}\`, which no feed or unit makes, and \`${maker}\` makes \`${near}\`, which no unit takes: one of the two names is misspelt`, at,
            `write the same name in both places: \`${s}\` for the outlet of \`${maker}\`, or \`${near}\` in the \`in\` of \`${u.name}\``);
        } else {
          bag.error(`unit \`${u.name}\` takes stream \`${s}\`, which no feed or unit makes`, at,
            didYouMean(s, untaken.filter((x) => !u.outlets.includes(x))) ?? 'add a feed of that name, or take the outlet of another unit');
        }
      }
      const prev = takenBy.get(s);
      if (prev !== undefined) {
        bag.error(`stream \`${s}\` is taken by both \`${prev}\` and \`${u.name}\``, at, 'a stream goes to one unit; put a splitter before them to divide it');
      } else takenBy.set(s, u.name);
    }
    for (const s of u.outlets) {
      if (u.inlets.includes(s)) bag.error(`unit \`${u.name}\` takes its own outlet \`${s}\``, streamSpan(own, s, 'in') ?? u.span, 'an outlet must go to another unit or be a product');
    }
  }

  // Tears.
  const tears: string[] = [];
  const tearsE = get('tears');
  const feedNames = new Set(feeds.map((f) => f.name));
  if (tearsE) {
    for (const t of r.list(tearsE.value, '`tears`', true) ?? []) {
      const s = r.string(t, 'a tear stream name');
      if (s === undefined) continue;
      if (!streamSpans.has(s)) {
        if (!maybeMade.has(s) && !feedsUnreadable) bag.error(`tear stream \`${s}\` does not exist`, r.at(t), didYouMean(s, streamSpans.keys()) ?? 'name a stream that a unit makes and another unit takes, inside a recycle loop');
      } else if (feedNames.has(s)) bag.error(`tear stream \`${s}\` is a feed: it lies in no recycle loop`, r.at(t), 'name a stream that a unit makes and another unit takes, inside a recycle loop');
      else if (!takenBy.has(s)) bag.error(`tear stream \`${s}\` is a product (no unit takes it)`, r.at(t), 'a tear stream must lie in a recycle loop');
      else if (tears.includes(s)) bag.error(`tear stream \`${s}\` is listed twice`, r.at(t), 'name each tear stream once');
      else tears.push(s);
    }
  }

  const solver = readSolver(r, get('solver'));
  const targets = readTargets(r, get('targets'));
  const plant = readPlantSections(r, get('instruments'), get('readings'), ctx, streamSpans, feedsUnreadable ? null : maybeMade);

  if (bag.hasErrors) throw new InputError(bag.items);
  const graph: GraphUnit[] = units.map((u) => ({ name: u.name, inlets: u.inlets, outlets: u.outlets }));
  const plan = planFlowsheet(graph, tears.length ? tears : preferredTears(graph));
  for (const note of plan.notes) bag.warning(note, tearsE ? r.at(tearsE.value) : undefined);
  const model: Model = {
    file: path, title: title ?? undefined, components, ids, index, elements,
    thermo: { eos: thermo.eos, ...(thermo.meterEos ? { meterEos: thermo.meterEos } : {}), kij, atmosphere: thermo.atmosphere, standards: new FrozenMap(thermo.standards) }, display,
    feeds, units, tears, plan, solver, targets,
    streamSpans: new FrozenMap(streamSpans), unitSpans: new FrozenMap(unitSpans), settings: new FrozenMap(settings),
    instruments: plant.instruments, readings: new FrozenMap(plant.readings), warnings: [],
  };
  // Structure: whether a steady state can exist at all (see structure.ts).
  checkStructure(model, bag);
  if (bag.hasErrors) throw new InputError(bag.items);
  model.warnings = bag.warnings();
  model.structureChecked = true;
  return { model: deepFreeze(model), source: src };
}

/** The settings read, as frozen maps all the way down. */
export function frozenSettings(m: SettingMap): SettingMap {
  return new FrozenMap([...m].map(([k, v]) => [k, freezeSetting(v)] as const));
}

function freezeSetting(v: Setting): Setting {
  if (isSettingMap(v)) return frozenSettings(v);
  if (Array.isArray(v)) return Object.freeze(v.map(freezeSetting));
  return v;
}

/**
 * Where a stream appears in an owner's settings: as an inlet (`in`) or as an outlet (any other
 * key), at the token itself (`in: [a, recyle]` -> the column of `recyle`).
 */
export function streamSpan(own: OwnerSettings, stream: string, role: 'in' | 'out'): SourceSpan | undefined {
  for (const [key, v] of own.settings) {
    if ((key === 'in') !== (role === 'in')) continue;
    if (typeof v === 'string' && v === stream) return own.spans.get(`${key}.0`) ?? own.spans.get(key);
    if (Array.isArray(v)) {
      const j = v.indexOf(stream);
      if (j >= 0) return own.spans.get(`${key}.${j}`);
    }
    if (isSettingMap(v) && v.has(stream)) return own.spans.get(`${key}.${stream}.@`);
  }
  return undefined;
}

function feedNamesOf(feeds: readonly FeedSpec[]): Set<string> {
  return new Set(feeds.map((f) => f.name));
}

function toRecord(counts: unknown): Record<string, number> {
  if (counts instanceof Map) return Object.fromEntries(counts as Map<string, number>);
  return { ...(counts as Record<string, number>) };
}

/**
 * Tears an engineer would choose: streams that close a loop back into a unit that also takes
 * fresh material. Offered to the planner only when they are as few as the fewest that break
 * every loop; the planner keeps its own choice otherwise.
 */
function preferredTears(units: readonly GraphUnit[]): string[] | undefined {
  const plain = planFlowsheet(units);
  if (plain.tears.length === 0) return undefined;
  const recycles = findRecycles(units, plain);
  if (recycles.length !== plain.tears.length) return undefined;
  const alt = planFlowsheet(units, recycles);
  return alt.tears.length === plain.tears.length && alt.addedTears.length === 0 ? recycles : undefined;
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

function readUnit(r: Reader, e: Entry, readOwner: <S extends UnitSpecBase>(def: BlockDef<S>, e: Entry, entries: Entry[], kind: 'unit' | 'feed') => S | undefined): UnitSpecBase | undefined {
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
  return readOwner(def, e, f, 'unit');
}

/** `targets:` as written (checked against the model by the study layer, with these positions). */
function readTargets(r: Reader, e: Entry | undefined): TargetDecl[] {
  if (!e) return [];
  const out: TargetDecl[] = [];
  for (const item of r.list(e.value, '`targets`') ?? []) {
    const f = r.entries(item, 'a target');
    if (!f) continue;
    r.checkKeys(f, ['output', 'value', 'by', 'within', 'tolerance'], 'a target');
    const need = (k: string) => {
      const x = r.find(f, k);
      if (!x && !r.strayNear(f, k)) r.bag.error(`a target has no \`${k}\``, r.at(item), 'write `{ output: PATH, value: V, by: INPUT, within: "LOW:HIGH" }`');
      return x;
    };
    const o = need('output');
    const v = need('value');
    const b = need('by');
    if (!o || !v || !b) continue;
    const output = r.string(o.value, 'the target output');
    const value = r.scalar(v.value, 'the target value');
    const by = r.string(b.value, 'the adjusted input');
    const w = r.find(f, 'within');
    let within: string | undefined;
    if (w) {
      if (r.isSeq(w.value)) {
        const parts = (r.list(w.value, '`within`') ?? []).map((n) => r.scalar(n, 'a bound'));
        if (parts.length !== 2) r.bag.error('`within` needs two bounds', r.at(w.value), 'write `within: [0.001, 0.2]` or `within: "0.001:0.2"`');
        else within = `${parts[0]}:${parts[1]}`;
      } else within = String(r.scalar(w.value, '`within`'));
    }
    const te = r.find(f, 'tolerance');
    const tolerance = te ? r.number(te.value, 'the target tolerance', '1e-8') : undefined;
    if (output === undefined || value === undefined || value === null || by === undefined) continue;
    out.push({ output, value: String(value), by, within, tolerance, span: r.at(item) });
  }
  return out;
}
