/**
 * The small sections of a flowsheet file: `thermo` (equation of state, binary interaction
 * parameters, local atmosphere, standard references), `display` (units of the reports) and
 * `solver` (method, tolerance, budget, Wegstein's acceleration bounds).
 */
import { didYouMean } from '../diagnostics.js';
import { matchMeterEos, type MeterEosName } from '../thermo/meter-eos.js';
import type { EosName } from '../thermo/types.js';
import { BUILTIN_STANDARDS, checkFlowDisplayUnit, defineStandard, parseQuantity, type Dimension, type StandardRef } from '../units/index.js';
import type { DisplaySpec, SolverSpec } from './model.js';
import type { Entry, Reader } from './source.js';
import { quantityAt, reportUnitError, requiredQuantity } from './yaml-fields.js';

export interface ThermoSection {
  eos: EosName;
  /** `meter-eos`: the equation of the meters and standard volumes of the feeds (absent: `eos`). */
  meterEos?: MeterEosName;
  atmosphere: number;
  standards: Map<string, StandardRef>;
  failedStandards: Set<string>;
  /** Read after the components: needs their ids. */
  kijEntry?: Entry;
}

export function readThermo(r: Reader, e: Entry | undefined): ThermoSection {
  const entries = e ? r.entries(e.value, '`thermo`', e.keyNode) ?? [] : [];
  r.checkKeys(entries, ['eos', 'meter-eos', 'kij', 'atmosphere', 'standards'], '`thermo`');
  let eos: EosName = 'SRK';
  const eosE = r.find(entries, 'eos');
  if (eosE) {
    const v = r.string(eosE.value, '`thermo.eos`', 'SRK');
    if (v !== undefined) {
      const m = matchEos(v);
      if (!m) r.bag.error(`unknown equation of state \`${v}\``, r.at(eosE.value), 'use `SRK`, `PR` (Peng-Robinson) or `ideal`');
      else eos = m;
    }
  }
  // The meters' own equation: GERG-2008 (a reference equation for the gases it covers), or one of
  // the cubics. The loop's units keep `eos`.
  let meterEos: MeterEosName | undefined;
  const meterE = r.find(entries, 'meter-eos');
  if (meterE) {
    const v = r.string(meterE.value, '`thermo.meter-eos`', 'GERG-2008');
    if (v !== undefined) {
      const m = matchMeterEos(v);
      if (!m) r.bag.error(`unknown equation of state \`${v}\` for the meters`, r.at(meterE.value), 'use `GERG-2008` (the reference equation for natural gases and similar mixtures), or `SRK`, `PR`, `ideal`');
      else if (m !== 'GERG-2008' && m !== eos) {
        r.bag.error(`\`thermo.meter-eos\` is ${m} but \`thermo.eos\` is ${eos}`, r.at(meterE.value), `the meters use either GERG-2008 or the file's own equation: write \`meter-eos: GERG-2008\`, or leave \`meter-eos\` out to use ${eos}`);
      } else meterEos = m;
    }
  }
  let atmosphere = 101325;
  const atmE = r.find(entries, 'atmosphere');
  if (atmE) {
    const v = quantityAt(r, atmE.value, 'pressure', '`thermo.atmosphere`', { above: 0, example: '0.95 bar' }, { atmosphere: 101325 });
    if (v !== undefined) {
      if (r.isScalar(atmE.value) && /g\s*$/.test(String(atmE.value.value))) {
        r.bag.error('`thermo.atmosphere` must be an absolute pressure', r.at(atmE.value), 'write it in bar, kPa, psia or mmHg, not a gauge unit');
      } else atmosphere = v;
    }
  }
  const standards = new Map<string, StandardRef>(BUILTIN_STANDARDS);
  const failedStandards = new Set<string>();
  const stdE = r.find(entries, 'standards');
  if (stdE) {
    for (const s of r.entries(stdE.value, '`thermo.standards`', stdE.keyNode) ?? []) {
      const f = r.entries(s.value, `standard reference \`${s.key}\``, s.keyNode) ?? [];
      r.checkKeys(f, ['T', 'P', 'temperature', 'pressure'], `standard reference \`${s.key}\``);
      // `T` and `P` as everywhere else in the file; `temperature` and `pressure` as in a meter.
      const tKey = r.find(f, 'T') ? 'T' : 'temperature';
      const pKey = r.find(f, 'P') ? 'P' : 'pressure';
      const T = requiredQuantity(r, f, tKey, 'temperature', `\`${tKey}\` of standard reference \`${s.key}\``, s.keyNode, { above: 0, example: '60 degF' }, { atmosphere });
      const P = requiredQuantity(r, f, pKey, 'pressure', `\`${pKey}\` of standard reference \`${s.key}\``, s.keyNode, { above: 0, example: '14.73 psia' }, { atmosphere });
      if (T !== undefined && P !== undefined) standards.set(s.key, defineStandard(s.key, { T, P }));
      else failedStandards.add(s.key);
    }
  }
  return { eos, ...(meterEos ? { meterEos } : {}), atmosphere, standards, failedStandards, kijEntry: r.find(entries, 'kij') };
}

/** Binary interaction parameters, n*n symmetric; a pair given twice with two values is an error. */
export function readKij(r: Reader, e: Entry | undefined, ids: readonly string[], index: ReadonlyMap<string, number>, known: ReadonlySet<string>): Float64Array {
  const n = ids.length;
  const kij = new Float64Array(n * n);
  if (!e) return kij;
  const seen = new Map<string, { key: string; value: number }>();
  for (const p of r.entries(e.value, '`thermo.kij`', e.keyNode) ?? []) {
    const parts = p.key.split('/').map((s) => s.trim());
    if (parts.length !== 2) {
      r.bag.error(`binary pair \`${p.key}\` must be written \`A/B\``, r.at(p.keyNode), 'for example `CO2/H2: 0.12`');
      continue;
    }
    const ij = parts.map((x) => index.get(x));
    let ok = true;
    parts.forEach((x, k) => {
      if (ij[k] === undefined) {
        ok = false;
        // A component whose own definition failed has its message already.
        if (!known.has(x)) r.bag.error(`\`${x}\` in binary pair \`${p.key}\` is not a component of this file`, r.at(p.keyNode), didYouMean(x, ids) ?? `the components are: ${ids.join(', ')}`);
      }
    });
    const v = r.number(p.value, `kij of \`${p.key}\``, '0.12');
    if (!ok || v === undefined) continue;
    if (ij[0] === ij[1]) {
      r.bag.error(`binary pair \`${p.key}\` names one component twice`, r.at(p.keyNode));
      continue;
    }
    if (Math.abs(v) >= 1) {
      r.bag.error(`kij of \`${p.key}\` is ${v}; it must be between -1 and 1`, r.at(p.value));
      continue;
    }
    const pair = [ij[0]!, ij[1]!].sort((a, b) => a - b).join('/');
    const before = seen.get(pair);
    if (before && before.value !== v) {
      r.bag.error(`binary pair \`${p.key}\` is given twice with two values (\`${before.key}: ${before.value}\` and \`${p.key}: ${v}\`)`, r.at(p.keyNode),
        'kij is symmetric: give each pair once');
      continue;
    }
    seen.set(pair, { key: p.key, value: v });
    kij[ij[0]! * n + ij[1]!] = v;
    kij[ij[1]! * n + ij[0]!] = v;
  }
  return kij;
}

export function readDisplay(r: Reader, e: Entry | undefined, atmosphere: number): DisplaySpec {
  const display = { flowUnit: 'kmol/h', pressureUnit: 'bar', temperatureUnit: 'degC' };
  if (!e) return display;
  const f = r.entries(e.value, '`display`', e.keyNode) ?? [];
  r.checkKeys(f, ['flow-unit', 'pressure-unit', 'temperature-unit'], '`display`');
  const check = (key: 'flow-unit' | 'pressure-unit' | 'temperature-unit', dim: Dimension, prop: keyof typeof display) => {
    const d = r.find(f, key);
    if (!d) return;
    const u = r.string(d.value, `\`display.${key}\``);
    if (u === undefined) return;
    try {
      if (key === 'flow-unit') checkFlowDisplayUnit(u, { atmosphere });
      else parseQuantity(`1 ${u}`, dim, { atmosphere });
      display[prop] = u;
    } catch (err) {
      reportUnitError(r, d.value, `\`display.${key}\``, err);
    }
  };
  check('flow-unit', 'molarFlow', 'flowUnit');
  check('pressure-unit', 'pressure', 'pressureUnit');
  check('temperature-unit', 'temperature', 'temperatureUnit');
  return display;
}

export const METHODS = ['direct', 'wegstein', 'newton', 'anderson', 'auto'] as const;

export function readSolver(r: Reader, e: Entry | undefined): SolverSpec {
  const solver: SolverSpec = { method: 'auto', rtol: 1e-10 };
  if (!e) return solver;
  const f = r.entries(e.value, '`solver`', e.keyNode) ?? [];
  r.checkKeys(f, ['method', 'tolerance', 'max-passes', 'acceleration'], '`solver`');
  const m = r.find(f, 'method');
  if (m) {
    const v = r.string(m.value, '`solver.method`');
    if (v !== undefined) {
      if (!(METHODS as readonly string[]).includes(v)) r.bag.error(`unknown method \`${v}\``, r.at(m.value), didYouMean(v, METHODS) ?? 'use `direct`, `wegstein`, `newton`, `anderson` or `auto`');
      else solver.method = v as SolverSpec['method'];
    }
  }
  const t = r.find(f, 'tolerance');
  if (t) {
    const v = r.number(t.value, '`solver.tolerance`', '1e-10');
    if (v !== undefined && !(v > 0 && v < 0.1)) r.bag.error(`\`solver.tolerance\` is ${v}; it must be above 0 and below 0.1`, r.at(t.value), 'for example `1e-10` (a relative tolerance)');
    else if (v !== undefined) solver.rtol = v;
  }
  const mp = r.find(f, 'max-passes');
  if (mp) {
    const v = r.number(mp.value, '`solver.max-passes`', '500');
    if (v !== undefined && !(Number.isInteger(v) && v >= 1)) r.bag.error('`solver.max-passes` must be a whole number >= 1', r.at(mp.value));
    else if (v !== undefined) solver.maxPasses = v;
  }
  // Wegstein's acceleration factor q is kept within [lowest, highest] (default -5 to 0).
  const acc = r.find(f, 'acceleration');
  if (acc) {
    const a = r.entries(acc.value, '`solver.acceleration`', acc.keyNode) ?? [];
    r.checkKeys(a, ['lowest', 'highest'], '`solver.acceleration`');
    for (const [key, prop] of [['lowest', 'qMin'], ['highest', 'qMax']] as const) {
      const q = r.find(a, key);
      if (!q) continue;
      const v = r.number(q.value, `\`solver.acceleration.${key}\``, key === 'lowest' ? '-5' : '0');
      if (v === undefined) continue;
      if (!(v <= 0 && v >= -1000)) r.bag.error(`\`solver.acceleration.${key}\` is ${v}; Wegstein's acceleration factor q is kept within -1000 to 0`, r.at(q.value), 'the default bounds are lowest -5, highest 0');
      else solver[prop] = v;
    }
    if (solver.qMin !== undefined && solver.qMax !== undefined && solver.qMin > solver.qMax) {
      r.bag.error('`solver.acceleration.lowest` is above `solver.acceleration.highest`', r.at(acc.keyNode), 'give lowest <= highest, e.g. `{ lowest: -5, highest: 0 }`');
    }
  }
  return solver;
}

function matchEos(v: string): EosName | undefined {
  const s = v.trim().toLowerCase().replace(/[\s_-]/g, '');
  if (s === 'srk' || s === 'soaveredlichkwong') return 'SRK';
  if (s === 'pr' || s === 'pengrobinson') return 'PR';
  if (s === 'ideal' || s === 'idealgas') return 'ideal';
  return undefined;
}
