/**
 * Outputs addressed by path, read from a solved flowsheet:
 *   streams.NAME.flows.ID | streams.NAME.fractions.ID |
 *   streams.NAME.{total,T,P,vapor-fraction,mass-flow,molar-mass,density,enthalpy,molar-enthalpy} (enthalpy: W)
 *   loop.recycle-ratio | loop.fresh-feed | loop.conversion.ID (overall; ID a key component)
 *   feeds.NAME.PATH and UNIT.PATH: what the block declares (BlockDef.outputs), e.g.
 *   UNIT.conversion.ID, UNIT.extent.K, UNIT.vapor-fraction, feeds.NAME.{molar-flow,Z,ideal-error}
 *   balance.worst
 * An output may name a display unit in brackets: `streams.purge.flows.H2[kmol/h]`. Every path is
 * checked against the model when it is parsed: a path that names nothing is refused with the
 * valid paths listed, before anything is solved.
 */
import { InputError, didYouMean } from '../diagnostics.js';
import { feedSummary } from '../blocks/feed.js';
import { blockOf, FEED } from '../blocks/registry.js';
import type { OutputDecl } from '../blocks/types.js';
import type { FlowsheetResult } from '../flowsheet/solve.js';
import type { Model } from '../flowsheet/model.js';
import { checkFlowDisplayUnit, parseQuantity, toUnit, UnitError, type Dimension } from '../units/index.js';

export interface OutputRef {
  text: string;
  path: string;
  unit?: string;
  dimension: Dimension | 'dimensionless';
  read(r: FlowsheetResult): number;
}

const STREAM_FIELDS: Record<string, [Dimension | 'dimensionless', (s: { total: number; T: number; P: number; vaporFraction: number; massFlow: number; molarMass: number; density: number; h: number; enthalpy: number }) => number]> = {
  total: ['molarFlow', (s) => s.total],
  T: ['temperature', (s) => s.T],
  P: ['pressure', (s) => s.P],
  'vapor-fraction': ['dimensionless', (s) => s.vaporFraction],
  'mass-flow': ['massFlow', (s) => s.massFlow],
  'molar-mass': ['molarMass', (s) => s.molarMass],
  density: ['density', (s) => s.density],
  enthalpy: ['power', (s) => s.enthalpy],
  'molar-enthalpy': ['molarEnergy', (s) => s.h],
};

/** The paths a unit or feed offers, as full paths. */
function declared(model: Model, name: string, feed: boolean): OutputDecl[] {
  if (feed) {
    const spec = model.feeds.find((f) => f.name === name)!;
    return FEED.outputs?.(spec, model) ?? [];
  }
  const spec = model.units.find((u) => u.name === name)!;
  return blockOf(spec).outputs?.(spec, model) ?? [];
}

/** Key components of the loop: those a unit reports a conversion of. */
function loopKeys(model: Model): string[] {
  const out: string[] = [];
  for (const u of model.units) for (const d of blockOf(u).outputs?.(u, model) ?? []) {
    const m = /^conversion\.(.+)$/.exec(d.name);
    if (m && !out.includes(m[1])) out.push(m[1]);
  }
  return out;
}

export function parseOutput(text: string, model: Model): OutputRef {
  const m = /^\s*([^[\]\s]+)\s*(?:\[([^\]]+)\])?\s*$/.exec(text);
  if (!m) throw err(`output \`${text}\` is not a path`, 'for example `streams.purge.flows.H2` or `loop.recycle-ratio`');
  const path = m[1];
  const unit = m[2]?.trim();
  const p = path.split('.');
  const comp = (id: string | undefined): number => {
    const i = id === undefined ? undefined : model.index.get(id);
    if (i === undefined) throw err(`output \`${path}\`: \`${id ?? ''}\` is not a component of this file`, didYouMean(id ?? '', model.ids) ?? `the components are: ${model.ids.join(', ')}`);
    return i;
  };
  const streams = [...model.streamSpans.keys()];
  let dimension: Dimension | 'dimensionless';
  let read: (r: FlowsheetResult) => number;
  if (p[0] === 'streams') {
    const name = p[1];
    if (!name || !model.streamSpans.has(name)) throw err(`output \`${path}\`: no stream \`${name ?? ''}\``, didYouMean(name ?? '', streams) ?? `the streams are: ${streams.join(', ')}`);
    const field = p[2];
    if ((field === 'flows' || field === 'fractions') && p.length === 4) {
      const i = comp(p[3]);
      dimension = field === 'flows' ? 'molarFlow' : 'dimensionless';
      read = field === 'flows' ? (r) => r.streams.get(name)!.flows[i] : (r) => r.streams.get(name)!.fractions[i];
    } else if (field && STREAM_FIELDS[field] && p.length === 3) {
      const [d, f] = STREAM_FIELDS[field];
      dimension = d;
      read = (r) => f(r.streams.get(name)!);
    } else {
      throw err(`output \`${path}\`: a stream offers flows.ID, fractions.ID, total, T, P, vapor-fraction, mass-flow, molar-mass, density, enthalpy (W) and molar-enthalpy (J/mol)`, `for example \`streams.${name}.flows.${model.ids[0]}\``);
    }
  } else if (p[0] === 'loop') {
    const keys = loopKeys(model);
    if (p[1] === 'recycle-ratio' && p.length === 2) {
      dimension = 'dimensionless';
      read = (r) => r.loop.recycleRatio;
    } else if (p[1] === 'fresh-feed' && p.length === 2) {
      dimension = 'molarFlow';
      read = (r) => r.loop.freshFeed;
    } else if (p[1] === 'conversion' && p.length === 3 && keys.includes(p[2])) {
      const id = p[2];
      dimension = 'dimensionless';
      read = (r) => r.loop.conversions[id]?.overall ?? Number.NaN;
    } else {
      const valid = ['loop.recycle-ratio', 'loop.fresh-feed', ...keys.map((k) => `loop.conversion.${k}`)];
      throw err(`output \`${path}\` names nothing: the loop offers ${valid.map((v) => `\`${v}\``).join(', ')}`,
        p[1] === 'conversion' ? 'an overall conversion is reported for the key components of the reactions' : didYouMean(path, valid));
    }
  } else if (p[0] === 'balance' && p[1] === 'worst' && p.length === 2) {
    dimension = 'dimensionless';
    read = (r) => r.balance.worst;
  } else {
    const feed = p[0] === 'feeds';
    const name = feed ? p[1] : p[0];
    const exists = feed ? model.feeds.some((f) => f.name === name) : model.units.some((u) => u.name === name);
    if (!exists) {
      const names = feed ? model.feeds.map((f) => `feeds.${f.name}`) : ['streams', 'loop', 'feeds', 'balance', ...model.units.map((u) => u.name)];
      throw err(feed ? `output \`${path}\`: no feed \`${name ?? ''}\`` : `output \`${path}\`: \`${p[0]}\` is not a unit, nor streams, loop, feeds or balance`, didYouMean(feed ? `feeds.${name ?? ''}` : p[0], names) ?? `the names are: ${names.join(', ')}`);
    }
    const rest = p.slice(feed ? 2 : 1).join('.');
    const decls = declared(model, name, feed);
    const prefix = feed ? `feeds.${name}` : name;
    const d = decls.find((x) => x.name === rest);
    if (!d) {
      const valid = decls.map((x) => `${prefix}.${x.name}`);
      throw err(`output \`${path}\` names nothing: ${valid.length ? `${feed ? 'feed' : 'unit'} \`${name}\` offers ${valid.map((v) => `\`${v}\``).join(', ')}` : `unit \`${name}\` offers no outputs of its own`}`,
        valid.length ? didYouMean(path, valid) : `read its streams instead, e.g. \`streams.${model.units.find((u) => u.name === name)?.outlets[0] ?? 'NAME'}.total\``);
    }
    dimension = d.dimension;
    if (feed) {
      const k = model.feeds.findIndex((f) => f.name === name);
      read = (r) => d.read(feedSummary(r.feeds[k]));
    } else {
      read = (r) => {
        const u = r.units.get(name);
        return u ? d.read(u) : Number.NaN;
      };
    }
  }
  if (unit !== undefined) {
    try {
      if (dimension === 'dimensionless') {
        if (unit !== '1' && unit !== '%') throw new UnitError(`\`${unit}\` is not a unit for a fraction`, 'use [%] or leave the unit out', 'wrong-dimension');
      } else if (dimension === 'molarFlow') checkFlowDisplayUnit(unit, { atmosphere: model.thermo.atmosphere });
      else parseQuantity(`1 ${unit}`, dimension, { atmosphere: model.thermo.atmosphere });
    } catch (e) {
      if (e instanceof UnitError) throw err(`output \`${text}\`: ${e.message}`, e.help);
      throw e;
    }
  }
  return { text, path, unit, dimension, read };
}

/** The output's value in its display unit (SI when none was asked for). */
export function outputValue(o: OutputRef, r: FlowsheetResult): number {
  const v = o.read(r);
  if (o.unit === undefined || !Number.isFinite(v)) return v;
  if (o.dimension === 'dimensionless') return o.unit === '%' ? v * 100 : v;
  return toUnit(v, o.dimension, o.unit, { atmosphere: r.model.thermo.atmosphere });
}

function err(message: string, help?: string): InputError {
  return new InputError([{ severity: 'error', message, help }]);
}
