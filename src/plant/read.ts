/**
 * Reads the `instruments:` and `readings:` sections of a flowsheet file into plain declarations
 * (declarations.ts), reporting every problem at its position: a tag on a stream the file does
 * not make, an analyzer on a component not in the file, a missing uncertainty (with what to
 * write), a reading in the wrong dimension, a reading of an instrument that is not declared.
 */
import type { Node } from 'yaml';
import { didYouMean } from '../diagnostics.js';
import type { MeterDesign } from '../flowsheet/model.js';
import type { Entry, Reader } from '../flowsheet/source.js';
import { parsedQuantityAt, quantityAt, reportUnitError, type FieldContext } from '../flowsheet/yaml-fields.js';
import { parseQuantity, UnitError, type Dimension } from '../units/index.js';
import { atReference, INSTRUMENT_KINDS, readingDimension, type Expanded, type InstrumentDecl, type InstrumentKind, type ReadingDecl } from './declarations.js';

export interface PlantSections {
  instruments: InstrumentDecl[];
  readings: Map<string, ReadingDecl>;
}

const COMMON_KEYS = ['stream', 'kind', 'uncertainty', 'unit', 'range'];
const KIND_KEYS: Record<InstrumentKind, readonly string[]> = {
  meter: ['pressure', 'temperature', 'design'],
  mass: [],
  molar: [],
  standard: ['reference', 'basis'],
  analyzer: ['components', 'normalized'],
  pressure: [],
  temperature: [],
};
const UNCERTAINTY_EXAMPLE: Record<InstrumentKind, string> = {
  meter: '1.5 %',
  mass: '0.5 %',
  molar: '1 %',
  standard: '2 %',
  analyzer: '0.002',
  pressure: '0.5 bar',
  temperature: '1 K',
};
const ABSOLUTE_EXAMPLE: Record<InstrumentKind, string> = {
  meter: '20 m3/h',
  mass: '0.05 t/h',
  molar: '0.5 kmol/h',
  standard: '50 Nm3/h',
  analyzer: '0.002',
  pressure: '0.5 bar',
  temperature: '1 K',
};

/**
 * Both sections. `streams` holds every stream the file makes; `maybeMade` the streams that a
 * unit with errors may make (not reported again as unknown), null when the feeds could not be
 * read at all (then no stream is reported as unknown).
 */
export function readPlantSections(r: Reader, instrumentsE: Entry | undefined, readingsE: Entry | undefined, ctx: FieldContext, streams: ReadonlyMap<string, unknown>, maybeMade: ReadonlySet<string> | null): PlantSections {
  const instruments: InstrumentDecl[] = [];
  const byTag = new Map<string, InstrumentDecl>();
  const failed = new Set<string>();
  const lineTags: { decl: InstrumentDecl; key: 'pressure' | 'temperature'; node: Node | null }[] = [];
  if (instrumentsE && !(r.isScalar(instrumentsE.value) && instrumentsE.value.value === null)) {
    for (const e of r.entries(instrumentsE.value, '`instruments`', instrumentsE.keyNode) ?? []) {
      const d = readInstrument(r, e, ctx, streams, maybeMade, lineTags);
      if (d) {
        instruments.push(d);
        byTag.set(d.tag, d);
      } else failed.add(e.key);
    }
  }
  // A meter names its line pressure and temperature instruments by tag.
  for (const { decl, key, node } of lineTags) {
    const tag = decl[key]!;
    const other = byTag.get(tag);
    if (!other) {
      if (!failed.has(tag)) {
        r.bag.error(`meter \`${decl.tag}\` takes its line ${key} from \`${tag}\`, which is not an instrument of this file`, r.at(node),
          didYouMean(tag, [...byTag.values()].filter((i) => i.kind === key).map((i) => i.tag)) ?? `declare it, e.g. \`${tag}: { stream: ${decl.stream}, kind: ${key}, uncertainty: ${UNCERTAINTY_EXAMPLE[key]} }\``);
      }
    } else if (other.kind !== key) {
      r.bag.error(`meter \`${decl.tag}\` takes its line ${key} from \`${tag}\`, which is a ${other.kind} instrument`, r.at(node), `name an instrument of kind \`${key}\``);
    }
  }
  const readings = new Map<string, ReadingDecl>();
  if (readingsE && !(r.isScalar(readingsE.value) && readingsE.value.value === null)) {
    const inline = new Map<string, string>();
    for (const e of r.entries(readingsE.value, '`readings`', readingsE.keyNode) ?? []) {
      const decl = byTag.get(e.key);
      if (!decl) {
        if (!failed.has(e.key)) {
          r.bag.error(`reading of \`${e.key}\`, which is not an instrument of this file`, r.at(e.keyNode),
            didYouMean(e.key, byTag.keys()) ?? (byTag.size ? `the instruments are: ${[...byTag.keys()].join(', ')}` : 'declare it under `instruments:` with its stream, kind and uncertainty'));
        }
        continue;
      }
      readReading(r, e, decl, byTag, ctx, readings, inline);
    }
  }
  return { instruments, readings };
}

function readInstrument(
  r: Reader, e: Entry, ctx: FieldContext, streams: ReadonlyMap<string, unknown>, maybeMade: ReadonlySet<string> | null,
  lineTags: { decl: InstrumentDecl; key: 'pressure' | 'temperature'; node: Node | null }[],
): InstrumentDecl | undefined {
  const what = `instrument \`${e.key}\``;
  const f = r.entries(e.value, what, e.keyNode);
  if (!f) return undefined;
  const kindE = r.find(f, 'kind');
  let kind: InstrumentKind | undefined;
  if (!kindE) {
    if (!r.strayNear(f, 'kind')) r.bag.error(`${what} has no \`kind\``, r.at(e.keyNode), `add \`kind:\` with one of: ${INSTRUMENT_KINDS.join(', ')}`);
  } else {
    const k = r.string(kindE.value, `\`kind\` of ${what}`);
    if (k !== undefined) {
      if (!(INSTRUMENT_KINDS as readonly string[]).includes(k)) {
        r.bag.error(`unknown instrument kind \`${k}\``, r.at(kindE.value), didYouMean(k, INSTRUMENT_KINDS) ?? `the kinds are: ${INSTRUMENT_KINDS.join(', ')}`);
      } else kind = k as InstrumentKind;
    }
  }
  r.checkKeys(f, kind ? [...COMMON_KEYS, ...KIND_KEYS[kind]] : [...COMMON_KEYS, ...new Set(Object.values(KIND_KEYS).flat())], what);
  let ok = kind !== undefined;

  const streamE = r.find(f, 'stream');
  let stream: string | undefined;
  if (!streamE) {
    if (!r.strayNear(f, 'stream')) r.bag.error(`${what} has no \`stream\``, r.at(e.keyNode), 'add `stream:` with the name of the stream it measures');
    ok = false;
  } else {
    stream = r.string(streamE.value, `\`stream\` of ${what}`);
    if (stream !== undefined && !streams.has(stream)) {
      if (maybeMade && !maybeMade.has(stream)) {
        r.bag.error(`${what} is on stream \`${stream}\`, which no feed or unit makes`, r.at(streamE.value), didYouMean(stream, streams.keys()) ?? `the streams are: ${[...streams.keys()].join(', ')}`);
      }
      ok = false;
    }
    if (stream === undefined) ok = false;
  }
  if (!kind || !ok) {
    // Report what else is wrong, then give up on this instrument.
    if (kind) readUncertainty(r, f, e, kind, ctx, what, undefined);
    return undefined;
  }
  const decl: InstrumentDecl = { tag: e.key, stream: stream!, kind, span: r.at(e.keyNode) };

  if (kind === 'analyzer') {
    const ce = r.find(f, 'components');
    if (!ce) {
      if (!r.strayNear(f, 'components')) r.bag.error(`analyzer \`${e.key}\` has no \`components\``, r.at(e.keyNode), `list what it reads, e.g. \`components: [${ctx.ids.slice(0, 2).join(', ')}]\``);
      ok = false;
    } else {
      const comps: number[] = [];
      for (const node of r.list(ce.value, `\`components\` of ${what}`, true) ?? []) {
        const id = r.string(node, `a component of ${what}`);
        if (id === undefined) {
          ok = false;
          continue;
        }
        const i = ctx.index.get(id);
        if (i === undefined) {
          r.bag.error(`analyzer \`${e.key}\` reads \`${id}\`, which is not a component of this file`, r.at(node), didYouMean(id, ctx.ids) ?? `the components are: ${ctx.ids.join(', ')}`);
          ok = false;
        } else if (comps.includes(i)) {
          r.bag.error(`\`${id}\` is listed twice in \`components\` of ${what}`, r.at(node));
          ok = false;
        } else comps.push(i);
      }
      if (ok && comps.length === 0) {
        r.bag.error(`\`components\` of ${what} is empty`, r.at(ce.keyNode), 'list the components it reads');
        ok = false;
      }
      decl.components = comps;
    }
    const ne = r.find(f, 'normalized');
    if (ne) {
      const v = r.boolean(ne.value, `\`normalized\` of ${what}`);
      if (v === undefined) ok = false;
      else decl.normalized = v;
    }
    if (ok && decl.normalized !== false && decl.components && decl.components.length === 1) {
      r.bag.error(`analyzer \`${e.key}\` reads one component normalized over the components it lists: its reading is always 1`, r.at(ce?.value ?? e.keyNode),
        'add `normalized: false` when it reads the fraction in the whole stream, or list the other components it reads');
      ok = false;
    }
  }
  const u = readUncertainty(r, f, e, kind, ctx, what, decl.components);
  if (u === undefined) ok = false;
  else if (Array.isArray(u)) decl.componentUncertainty = u;
  else decl.uncertainty = u;

  if (kind === 'meter') {
    for (const key of ['pressure', 'temperature'] as const) {
      const te = r.find(f, key);
      if (!te) {
        if (!r.strayNear(f, key)) {
          const tag = `${key === 'pressure' ? 'PI' : 'TI'}-${e.key.replace(/^[A-Za-z]+-?/, '') || '1'}`;
          r.bag.error(`meter \`${e.key}\` has no line \`${key}\``, r.at(e.keyNode),
            `name the ${key} instrument of its line, e.g. \`${key}: ${tag}\`, and declare it: \`${tag}: { stream: ${decl.stream}, kind: ${key}, uncertainty: ${UNCERTAINTY_EXAMPLE[key]} }\``);
        }
        ok = false;
        continue;
      }
      const tag = r.string(te.value, `\`${key}\` of ${what}`, key === 'pressure' ? 'PI-101' : 'TI-101');
      if (tag === undefined) {
        ok = false;
        continue;
      }
      decl[key] = tag;
      lineTags.push({ decl, key, node: te.value });
    }
    const de = r.find(f, 'design');
    if (de) {
      const design = readDesign(r, de, ctx, what);
      if (!design) ok = false;
      else decl.design = design;
    }
  }
  if (kind === 'standard') {
    const re = r.find(f, 'reference');
    if (re) {
      const name = r.string(re.value, `\`reference\` of ${what}`, 'normal');
      if (name !== undefined) {
        const ref = ctx.standards.get(name);
        if (ref) decl.reference = ref;
        else if (!ctx.failedStandards.has(name)) {
          r.bag.error(`unknown standard reference \`${name}\``, r.at(re.value), didYouMean(name, ctx.standards.keys()) ?? `define it under \`thermo.standards\`, or use one of: ${[...ctx.standards.keys()].join(', ')}`);
          ok = false;
        } else ok = false;
      } else ok = false;
    }
    const be = r.find(f, 'basis');
    if (be) {
      const b = r.string(be.value, `\`basis\` of ${what}`, 'real');
      if (b !== 'real' && b !== 'ideal') {
        if (b !== undefined) r.bag.error(`\`basis\` of ${what} is \`${b}\``, r.at(be.value), 'write `real` (real-gas volume at the reference, ISO 13443) or `ideal`');
        ok = false;
      } else decl.realGas = b === 'real';
    }
  }
  const dim: Dimension | Dimension[] = kind === 'standard' && decl.reference ? ['standardFlow', 'volumeFlow'] : readingDimension(kind);
  const ue = r.find(f, 'unit');
  if (ue) {
    const unit = r.string(ue.value, `\`unit\` of ${what}`, kind === 'meter' ? 'm3/h' : 't/h');
    if (unit !== undefined) {
      try {
        const q = parseQuantity(`1 ${unit}`, dim, { atmosphere: ctx.atmosphere, standards: ctx.standards as Map<string, never> });
        if (q.standard && decl.reference && q.standard.name !== decl.reference.name) {
          r.bag.error(`\`unit\` of ${what} is at reference \`${q.standard.name}\`, but it reads at \`${decl.reference.name}\``, r.at(ue.value), 'write the unit of its reference, or change `reference`');
          ok = false;
        } else decl.unit = unit;
      } catch (err) {
        reportUnitError(r, ue.value, `\`unit\` of ${what}`, err);
        ok = false;
      }
    } else ok = false;
  }
  const rangeE = r.find(f, 'range');
  if (rangeE) {
    const parts = r.list(rangeE.value, `\`range\` of ${what}`);
    if (!parts || parts.length !== 2) {
      if (parts) r.bag.error(`\`range\` of ${what} needs two values, low and high`, r.at(rangeE.value), `for example \`range: [0 ${kind === 'meter' ? 'm3/h' : kind === 'mass' ? 't/h' : 'kmol/h'}, 3000 ${kind === 'meter' ? 'm3/h' : kind === 'mass' ? 't/h' : 'kmol/h'}]\``);
      ok = false;
    } else {
      const ends = parts.map((p, k) => parsedQuantityAt(r, p, dim, `the ${k === 0 ? 'low' : 'high'} end of \`range\` of ${what}`, {}, ctx));
      // A standard volume flow's ends may name references: both are taken to the first one's.
      const refs = ends.map((q) => (kind === 'standard' ? q?.standard ?? decl.reference : undefined));
      const reference = refs[0] ?? refs[1];
      const [lo, hi] = ends.map((q, k) => (q === undefined ? undefined : atReference(q.value, refs[k], reference)));
      if (lo === undefined || hi === undefined) ok = false;
      else if (!(lo < hi)) {
        r.bag.error(`\`range\` of ${what} runs from ${lo} to ${hi} (SI): the low end must be below the high end`, r.at(rangeE.value));
        ok = false;
      } else decl.range = reference ? { min: lo, max: hi, reference } : { min: lo, max: hi };
    }
  }
  return ok ? decl : undefined;
}

/** A single expanded uncertainty at a node: `N %` of reading, or an absolute value in `dim`. */
function expandedAt(r: Reader, node: Node | null, kind: InstrumentKind, ctx: FieldContext, what: string): Expanded | undefined {
  const v = r.scalar(node, what);
  if (v === undefined) return undefined;
  const help = `write the expanded uncertainty at 95 % from the data sheet: a percentage of reading such as \`${UNCERTAINTY_EXAMPLE[kind] === '0.002' ? '2 %' : UNCERTAINTY_EXAMPLE[kind].includes('%') ? UNCERTAINTY_EXAMPLE[kind] : '1 %'}\`, or an absolute value such as \`${ABSOLUTE_EXAMPLE[kind]}\`${kind === 'analyzer' ? ' (a mole fraction)' : ''}`;
  if (v === null || typeof v === 'boolean') {
    r.bag.error(`${what} has no value`, r.at(node), help);
    return undefined;
  }
  const text = String(v).trim();
  let out: Expanded;
  try {
    if (/%$/.test(text)) {
      const q = parseQuantity(text, 'dimensionless');
      out = { relative: q.value };
    } else if (kind === 'analyzer') {
      out = { absolute: parseQuantity(text, 'dimensionless').value };
    } else {
      const dim: Dimension = readingDimension(kind);
      const q = parseQuantity(text, dim, { atmosphere: ctx.atmosphere, standards: ctx.standards as Map<string, never> });
      // An uncertainty is a difference: `0.5 degC` is 0.5 K, `0.5 barg` is 0.5 bar.
      let value = q.value;
      if (dim === 'temperature' || dim === 'pressure') {
        value -= parseQuantity(`0 ${q.unit}`, dim, { atmosphere: ctx.atmosphere }).value;
      }
      out = q.standard ? { absolute: value, reference: q.standard } : { absolute: value };
    }
  } catch (err) {
    if (err instanceof UnitError) {
      r.bag.error(`${what}: ${err.message}`, r.at(node), help);
      return undefined;
    }
    throw err;
  }
  const x = 'relative' in out ? out.relative : out.absolute;
  if (!(x > 0 && Number.isFinite(x))) {
    r.bag.error(`${what} is ${text}; it must be above zero`, r.at(node), help);
    return undefined;
  }
  if ('relative' in out && out.relative >= 1) {
    r.bag.error(`${what} is ${text} of the reading; an instrument that uncertain cannot check a balance`, r.at(node), help);
    return undefined;
  }
  if (kind === 'analyzer' && 'absolute' in out && out.absolute >= 1) {
    r.bag.error(`${what} is ${text}, a mole fraction of 1 or more`, r.at(node), 'write it as a mole fraction, e.g. `0.002`, or as a percentage of reading, e.g. `1 %`');
    return undefined;
  }
  return out;
}

/** `uncertainty`: required; an analyzer may give one per component. */
function readUncertainty(r: Reader, f: Entry[], e: Entry, kind: InstrumentKind, ctx: FieldContext, what: string, components: number[] | undefined): Expanded | Expanded[] | undefined {
  const ue = r.find(f, 'uncertainty');
  if (!ue) {
    if (r.strayNear(f, 'uncertainty')) return undefined;
    r.bag.error(`${what} has no \`uncertainty\`: loopclose assumes none`, r.at(e.keyNode),
      `add the expanded uncertainty at 95 % (k = 2) from its data sheet, e.g. \`uncertainty: ${UNCERTAINTY_EXAMPLE[kind]}\`${kind === 'analyzer' ? ' (a mole fraction), or one per component: `uncertainty: { H2: 0.003, Ar: 0.0005 }`' : ` (of the reading), or an absolute value such as \`uncertainty: ${ABSOLUTE_EXAMPLE[kind]}\``}`);
    return undefined;
  }
  const whatU = `\`uncertainty\` of ${what}`;
  if (kind === 'analyzer' && r.isMap(r.src.peek(ue.value))) {
    const entries = r.entries(ue.value, whatU, ue.keyNode) ?? [];
    if (!components) return undefined;
    const out: (Expanded | undefined)[] = components.map(() => undefined);
    let ok = true;
    for (const c of entries) {
      const i = ctx.index.get(c.key);
      const pos = i === undefined ? -1 : components.indexOf(i);
      if (pos < 0) {
        r.bag.error(`${whatU} names \`${c.key}\`, which the analyzer does not read`, r.at(c.keyNode), `it reads: ${components.map((k) => ctx.ids[k]).join(', ')}`);
        ok = false;
        continue;
      }
      const u = expandedAt(r, c.value, kind, ctx, `the uncertainty of \`${c.key}\` in ${what}`);
      if (!u) ok = false;
      else out[pos] = u;
    }
    const missing = components.filter((_, k) => out[k] === undefined && ok).map((k) => ctx.ids[k]);
    if (ok && missing.length) {
      r.bag.error(`${whatU} gives no uncertainty for ${missing.map((m) => `\`${m}\``).join(', ')}: loopclose assumes none`, r.at(ue.keyNode), `add one for each, e.g. \`${missing[0]}: 0.002\``);
      ok = false;
    }
    return ok ? (out as Expanded[]) : undefined;
  }
  return expandedAt(r, ue.value, kind, ctx, whatU);
}

function readDesign(r: Reader, de: Entry, ctx: FieldContext, what: string): MeterDesign | undefined {
  const f = r.entries(de.value, `\`design\` of ${what}`, de.keyNode);
  if (!f) return undefined;
  r.checkKeys(f, ['pressure', 'temperature', 'composition', 'density'], `\`design\` of ${what}`);
  const get = (k: string) => r.find(f, k);
  if (get('density')) {
    if (get('pressure') || get('temperature') || get('composition')) {
      r.bag.error(`\`design\` of ${what} gives a density and a design state`, r.at(get('density')!.keyNode), 'give either `density`, or `pressure` and `temperature` (and optionally `composition`)');
      return undefined;
    }
    const d = quantityAt(r, get('density')!.value, 'density', `the design density of ${what}`, { above: 0, example: '2.5 kg/m3' }, ctx);
    return d === undefined ? undefined : { density: d };
  }
  if (!get('pressure') || !get('temperature')) {
    r.bag.error(`\`design\` of ${what} needs \`pressure\` and \`temperature\` (or \`density\`)`, r.at(de.keyNode), 'for example `design: { pressure: 28 barg, temperature: 30 degC }`');
    return undefined;
  }
  const P = quantityAt(r, get('pressure')!.value, 'pressure', `the design pressure of ${what}`, { above: 0, example: '28 barg' }, ctx);
  const T = quantityAt(r, get('temperature')!.value, 'temperature', `the design temperature of ${what}`, { above: 0, example: '30 degC' }, ctx);
  if (P === undefined || T === undefined) return undefined;
  const design: MeterDesign = { P, T };
  const ce = get('composition');
  if (ce) {
    const comp = new Float64Array(ctx.ids.length);
    let ok = true;
    for (const c of r.entries(ce.value, `the design composition of ${what}`, ce.keyNode) ?? []) {
      const i = ctx.index.get(c.key);
      if (i === undefined) {
        r.bag.error(`\`${c.key}\` in the design composition of ${what} is not a component of this file`, r.at(c.keyNode), didYouMean(c.key, ctx.ids) ?? `the components are: ${ctx.ids.join(', ')}`);
        ok = false;
        continue;
      }
      const v = r.number(c.value, `the design fraction of \`${c.key}\``, '0.5');
      if (v === undefined || v < 0 || v > 1) {
        if (v !== undefined) r.bag.error(`the design fraction of \`${c.key}\` is ${v}; it must lie between 0 and 1`, r.at(c.value));
        ok = false;
      } else comp[i] = v;
    }
    const sum = comp.reduce((a, b) => a + b, 0);
    if (ok && Math.abs(sum - 1) > 1e-6) {
      r.bag.error(`the design composition of ${what} sums to ${Number(sum.toPrecision(8))}, not 1`, r.at(ce.value), 'give mole fractions that sum to 1');
      ok = false;
    }
    if (!ok) return undefined;
    design.composition = comp;
  }
  return design;
}

/** One entry of `readings:`. */
function readReading(r: Reader, e: Entry, decl: InstrumentDecl, byTag: ReadonlyMap<string, InstrumentDecl>, ctx: FieldContext, out: Map<string, ReadingDecl>, inline: Map<string, string>): void {
  const what = `the reading of \`${e.key}\``;
  const span = r.at(e.value ?? e.keyNode);
  if (out.has(e.key)) {
    r.bag.error(`\`${e.key}\` is read twice: once here and once inline in the reading of meter \`${inline.get(e.key)}\``, r.at(e.keyNode), 'give each reading once');
    return;
  }
  if (decl.kind === 'analyzer') {
    const f = r.entries(e.value, what, e.keyNode);
    if (!f) return;
    const fr = new Float64Array(ctx.ids.length).fill(Number.NaN);
    let ok = true;
    for (const c of f) {
      const i = ctx.index.get(c.key);
      if (i === undefined || !decl.components!.includes(i)) {
        r.bag.error(i === undefined ? `\`${c.key}\` in ${what} is not a component of this file` : `analyzer \`${e.key}\` does not read \`${c.key}\``, r.at(c.keyNode),
          `it reads: ${decl.components!.map((k) => ctx.ids[k]).join(', ')}`);
        ok = false;
        continue;
      }
      const v = fractionAt(r, c.value, `the reading of \`${c.key}\` by \`${e.key}\``);
      if (v === undefined) ok = false;
      else fr[i] = v;
    }
    if (ok) out.set(e.key, { tag: e.key, fractions: fr, span });
    return;
  }
  const dim: Dimension = readingDimension(decl.kind);
  const node = e.value;
  if (decl.kind === 'meter' && r.isMap(r.src.peek(node))) {
    const f = r.entries(node, what, e.keyNode) ?? [];
    r.checkKeys(f, ['flow', 'pressure', 'temperature'], what);
    const fe = r.find(f, 'flow');
    if (!fe) {
      if (!r.strayNear(f, 'flow')) r.bag.error(`${what} has no \`flow\``, r.at(e.keyNode), 'for example `{ flow: 2390 m3/h, pressure: 148 barg, temperature: 38 degC }`');
    } else {
      const v = quantityAt(r, fe.value, 'volumeFlow', `the flow of \`${e.key}\``, { min: 0, example: '2390 m3/h' }, ctx);
      if (v !== undefined) out.set(e.key, { tag: e.key, value: v, span: r.at(fe.value) });
    }
    for (const key of ['pressure', 'temperature'] as const) {
      const pe = r.find(f, key);
      if (!pe) continue;
      const tag = decl[key];
      if (!tag || !byTag.has(tag)) continue; // reported with the instrument
      if (out.has(tag)) {
        r.bag.error(`\`${tag}\` is read twice: once on its own and once inline in the reading of meter \`${e.key}\``, r.at(pe.keyNode), 'give each reading once');
        continue;
      }
      const v = quantityAt(r, pe.value, key, `the line ${key} of \`${e.key}\``, { above: 0, example: key === 'pressure' ? '148 barg' : '38 degC' }, ctx);
      if (v !== undefined) {
        out.set(tag, { tag, value: v, span: r.at(pe.value) });
        inline.set(tag, e.key);
      }
    }
    return;
  }
  if (decl.kind === 'standard') {
    const v = r.scalar(node, what);
    if (v === undefined || v === null || typeof v === 'boolean') {
      if (v === null || typeof v === 'boolean') r.bag.error(`${what} has no value`, r.at(node), 'for example `9850 Nm3/h`');
      return;
    }
    try {
      const q = parseQuantity(v, decl.reference ? ['standardFlow', 'volumeFlow'] : 'standardFlow', { atmosphere: ctx.atmosphere, standards: ctx.standards as Map<string, never> });
      if (q.standard && decl.reference && q.standard.name !== decl.reference.name) {
        r.bag.error(`${what} is at reference \`${q.standard.name}\`, but \`${e.key}\` reads at \`${decl.reference.name}\``, r.at(node), `write it in the unit of its reference, or change \`reference\` of \`${e.key}\``);
        return;
      }
      if (q.value < 0) {
        r.bag.error(`${what} is negative`, r.at(node), 'a flow reading is zero or more');
        return;
      }
      out.set(e.key, { tag: e.key, value: q.value, reference: q.standard ?? decl.reference, span });
    } catch (err) {
      reportUnitError(r, node, what, err);
    }
    return;
  }
  const isFlow = dim !== 'pressure' && dim !== 'temperature';
  const v = quantityAt(r, node, dim, what, isFlow ? { min: 0, example: decl.kind === 'mass' ? '6.05 t/h' : '120 kmol/h' } : { above: 0, example: dim === 'pressure' ? '148 barg' : '38 degC' }, ctx);
  if (v !== undefined) out.set(e.key, { tag: e.key, value: v, span });
}

/** A mole fraction as a number, `59.12 %` or `150 ppm`. */
function fractionAt(r: Reader, node: Node | null, what: string): number | undefined {
  const v = r.scalar(node, what);
  if (v === undefined) return undefined;
  let x: number;
  if (typeof v === 'number') x = v;
  else if (typeof v === 'string') {
    try {
      x = parseQuantity(v, 'dimensionless').value;
    } catch (err) {
      reportUnitError(r, node, what, err);
      return undefined;
    }
  } else {
    r.bag.error(`${what} must be a mole fraction, e.g. \`0.5912\` or \`59.12 %\``, r.at(node));
    return undefined;
  }
  if (!(x >= 0 && x <= 1)) {
    r.bag.error(`${what} is ${x}; a mole fraction lies between 0 and 1`, r.at(node), 'write a fraction such as `0.5912`, or a percentage such as `59.12 %`');
    return undefined;
  }
  return x;
}
