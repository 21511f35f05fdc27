/**
 * Outputs addressed by path, read from a solved flowsheet:
 *   streams.NAME.flows.ID | streams.NAME.fractions.ID | streams.NAME.{total,T,P,vapor-fraction,mass-flow}
 *   loop.recycle-ratio | loop.fresh-feed | loop.conversion.ID (overall)
 *   UNIT.conversion.ID (single pass, reactors) | UNIT.extent.K | UNIT.vapor-fraction
 *   feeds.NAME.{molar-flow,Z,ideal-error}
 *   balance.worst
 * An output may name a display unit in brackets: `streams.purge.flows.H2[kmol/h]`.
 */
import { InputError, didYouMean } from '../diagnostics.js';
import type { FlowsheetResult } from '../flowsheet/solve.js';
import type { Model } from '../flowsheet/model.js';
import { parseQuantity, toUnit, UnitError, type Dimension } from '../units/index.js';

export interface OutputRef {
  text: string;
  path: string;
  unit?: string;
  dimension: Dimension;
  read(r: FlowsheetResult): number;
}

const STREAM_FIELDS: Record<string, [Dimension, (s: { total: number; T: number; P: number; vaporFraction: number; massFlow: number }) => number]> = {
  total: ['molarFlow', (s) => s.total],
  T: ['temperature', (s) => s.T],
  P: ['pressure', (s) => s.P],
  'vapor-fraction': ['dimensionless', (s) => s.vaporFraction],
  'mass-flow': ['massFlow', (s) => s.massFlow],
};

export function parseOutput(text: string, model: Model): OutputRef {
  const m = /^\s*([^[\]\s]+)\s*(?:\[([^\]]+)\])?\s*$/.exec(text);
  if (!m) throw err(`output \`${text}\` is not a path`, 'for example `streams.purge.flows.H2` or `loop.recycle-ratio[1]`');
  const path = m[1];
  const unit = m[2]?.trim();
  const p = path.split('.');
  const comp = (id: string | undefined): number => {
    const i = id === undefined ? undefined : model.index.get(id);
    if (i === undefined) throw err(`output \`${path}\`: \`${id ?? ''}\` is not a component of this file`, didYouMean(id ?? '', model.ids) ?? `the components are: ${model.ids.join(', ')}`);
    return i;
  };
  const streams = [...model.streamSpans.keys()];
  let dimension: Dimension;
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
      throw err(`output \`${path}\`: a stream has flows.ID, fractions.ID, total, T, P, vapor-fraction and mass-flow`);
    }
  } else if (p[0] === 'loop') {
    if (p[1] === 'recycle-ratio' && p.length === 2) {
      dimension = 'dimensionless';
      read = (r) => r.loop.recycleRatio;
    } else if (p[1] === 'fresh-feed' && p.length === 2) {
      dimension = 'molarFlow';
      read = (r) => r.loop.freshFeed;
    } else if (p[1] === 'conversion' && p.length === 3) {
      const id = p[2];
      comp(id);
      dimension = 'dimensionless';
      read = (r) => r.loop.conversions[id]?.overall ?? Number.NaN;
    } else {
      throw err(`output \`${path}\`: the loop has recycle-ratio, fresh-feed and conversion.ID (overall)`);
    }
  } else if (p[0] === 'feeds') {
    const name = p[1];
    const f = model.feeds.findIndex((x) => x.name === name);
    if (f < 0) throw err(`output \`${path}\`: no feed \`${name ?? ''}\``, didYouMean(name ?? '', model.feeds.map((x) => x.name)) ?? undefined);
    const fields: Record<string, [Dimension, (r: FlowsheetResult) => number]> = {
      'molar-flow': ['molarFlow', (r) => r.feeds[f].molarFlow],
      Z: ['dimensionless', (r) => r.feeds[f].Z],
      'ideal-error': ['dimensionless', (r) => r.feeds[f].idealError ?? Number.NaN],
    };
    const hit = fields[p[2] ?? ''];
    if (!hit || p.length !== 3) throw err(`output \`${path}\`: a feed has molar-flow, Z and ideal-error`);
    [dimension, read] = hit;
  } else if (p[0] === 'balance' && p[1] === 'worst' && p.length === 2) {
    dimension = 'dimensionless';
    read = (r) => r.balance.worst;
  } else {
    const unit0 = model.units.find((u) => u.name === p[0]);
    if (!unit0) {
      const names = ['streams', 'loop', 'feeds', 'balance', ...model.units.map((u) => u.name)];
      throw err(`output \`${path}\`: \`${p[0]}\` is not a unit, nor streams, loop, feeds or balance`, didYouMean(p[0], names) ?? undefined);
    }
    const name = unit0.name;
    if (p[1] === 'conversion' && p.length === 3 && unit0.type === 'reactor') {
      const id = p[2];
      comp(id);
      dimension = 'dimensionless';
      read = (r) => {
        const rx = r.units.get(name)?.reactions?.filter((x) => x.key === id) ?? [];
        return rx.length ? rx.reduce((a, x) => a + x.conversion, 0) : Number.NaN;
      };
    } else if (p[1] === 'extent' && p.length === 3 && unit0.type === 'reactor') {
      const k = Number(p[2]);
      dimension = 'molarFlow';
      read = (r) => r.units.get(name)?.reactions?.[k]?.extent ?? Number.NaN;
    } else if (p[1] === 'vapor-fraction' && p.length === 2 && (unit0.type === 'condenser' || unit0.type === 'flash')) {
      dimension = 'dimensionless';
      read = (r) => r.units.get(name)?.figures.find((f) => f.key === 'vaporFraction')?.value ?? Number.NaN;
    } else {
      throw err(`output \`${path}\`: unit \`${name}\` (${unit0.type}) offers ${unit0.type === 'reactor' ? 'conversion.ID and extent.K' : unit0.type === 'condenser' || unit0.type === 'flash' ? 'vapor-fraction' : 'no outputs of its own; read its streams'}`);
    }
  }
  if (unit !== undefined) {
    try {
      if (dimension === 'dimensionless') {
        if (unit !== '1' && unit !== '%') throw new UnitError(`\`${unit}\` is not a unit for a fraction`, 'use [%] or leave the unit out', 'wrong-dimension');
      } else parseQuantity(`1 ${unit}`, dimension, { atmosphere: model.thermo.atmosphere });
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
