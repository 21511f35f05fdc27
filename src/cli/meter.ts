/** `loopclose meter`: every feed of a file, or one reading given on the command line. */
import { computeFeed, type FeedResult } from '../blocks/feed.js';
import { DiagnosticBag, InputError, didYouMean } from '../diagnostics.js';
import { loadFlowsheet } from '../flowsheet/validate.js';
import type { FeedSpec, MeterUncertainty } from '../flowsheet/model.js';
import { meterJson, meterText, type MeterReport } from '../report/meter.js';
import { findComponent, componentIds } from '../thermo/components.js';
import { makeEos } from '../thermo/eos.js';
import { meterBudget, standardUncertainty, type MeterBudget } from '../thermo/meter-budget.js';
import { matchMeterEos, meterEosFor, type MeterEos, type MeterEosName } from '../thermo/meter-eos.js';
import type { EosName } from '../thermo/types.js';
import { parseQuantity, UnitError, type Dimension } from '../units/index.js';
import { MAX_PRESSURE } from '../flowsheet/yaml-fields.js';

export interface MeterOptions {
  json?: boolean;
  gas?: string;
  flow?: string;
  pressure?: string;
  temperature?: string;
  eos?: string;
  fallbackEos?: string;
  flowUncertainty?: string;
  pressureUncertainty?: string;
  temperatureUncertainty?: string;
  uncertaintyStatedAs?: string;
  atmosphere?: string;
  flowUnit?: string;
}

const ONE_READING_OPTIONS = ['flow', 'pressure', 'temperature', 'flowUncertainty', 'pressureUncertainty', 'temperatureUncertainty', 'uncertaintyStatedAs', 'fallbackEos', 'atmosphere'] as const;

export function runMeter(file: string | undefined, o: MeterOptions): string {
  if (file && o.gas) throw new InputError([{ severity: 'error', message: 'give a flowsheet file or `--gas` with one reading, not both', help: 'drop the file to convert one reading' }]);
  if (!file && !o.gas) throw new InputError([{ severity: 'error', message: 'nothing to convert', help: 'give a flowsheet file, or `--gas "H2=0.985,N2=0.015" --flow "12.6 m3/h" --pressure "30 barg" --temperature "35 degC"`' }]);
  let report: MeterReport;
  if (file) {
    const given = ONE_READING_OPTIONS.filter((k) => o[k] !== undefined);
    if (given.length) {
      throw new InputError(given.map((k) => ({ severity: 'error' as const, message: `--${k.replace(/[A-Z]/g, (c) => `-${c.toLowerCase()}`)} is for one reading (\`--gas\`), not for a file`,
        help: k === 'flow' || k === 'pressure' || k === 'temperature' ? 'a file gives each feed\'s reading in the feed: `meter: { flow: 12.6 m3/h, pressure: 30 barg, temperature: 35 degC }`'
          : k === 'fallbackEos' ? 'a file gives its own equation in `thermo.eos`'
          : k === 'atmosphere' ? 'a file gives its local atmosphere in `thermo: { atmosphere: 0.95 bar }`; its gauge readings are read with it'
          : 'declare the uncertainties of a feed in the file: `meter: { ..., uncertainty: { flow: 1.5 %, pressure: 0.1 bar, temperature: 0.5 K } }`' })));
    }
    const { model } = loadFlowsheet(file);
    const choice = o.eos ? eosOption(o.eos) : undefined;
    // --eos GERG-2008 sets the meters' equation only; --eos SRK/PR/ideal sets both (as before).
    const eosName: EosName = choice && choice !== 'GERG-2008' ? choice : model.thermo.eos;
    const eos = makeEos(eosName, model.components, model.thermo.kij);
    const meter = meterEosFor(choice === 'GERG-2008' ? 'GERG-2008' : choice ? undefined : model.thermo.meterEos, eos);
    const feeds = model.feeds.map((f) => computeFeed(f, eos, meter));
    const budgets = budgetsOf(model.feeds, feeds, meter);
    const display = { ...model.display, ...(o.flowUnit ? { flowUnit: checkFlowUnit(o.flowUnit) } : {}) };
    report = { file, eos: eosName, meterEos: meter.name, ids: model.ids, feeds, budgets, warnings: [...model.warnings.map((w) => w.message), ...feeds.flatMap((f) => f.warnings)], display, atmosphere: model.thermo.atmosphere };
  } else {
    report = singleReading(o);
  }
  return o.json ? meterJson(report) : meterText(report);
}

/** The uncertainty budget of every metered feed, by name. */
function budgetsOf(specs: readonly FeedSpec[], feeds: readonly FeedResult[], meter: MeterEos): Map<string, MeterBudget> {
  const out = new Map<string, MeterBudget>();
  specs.forEach((spec, k) => {
    const b = spec.basis;
    if (b.kind !== 'meter') return;
    const f = feeds[k];
    const designDensity = f.densityCorrection !== undefined ? f.densityCorrection * f.densityCorrection * f.density : undefined;
    // A design density computed at a design state with the meter EOS carries its error (meter-budget.ts).
    const d = b.design;
    const design = designDensity !== undefined && d && d.density === undefined && d.T !== undefined && d.P !== undefined ? { T: d.T, P: d.P, x: d.composition ?? spec.composition } : undefined;
    out.set(spec.name, meterBudget(meter, { flow: b.flow, T: b.T, P: b.P, x: spec.composition, ...(designDensity !== undefined ? { designDensity } : {}), ...(design ? { design } : {}) }, instrumentOf(b.uncertainty)));
  });
  return out;
}

/** Declared uncertainties as standard ones. */
function instrumentOf(u: MeterUncertainty | undefined) {
  if (!u) return {};
  const s = (v: number | undefined) => (v === undefined ? undefined : standardUncertainty(v, u.statedAs));
  return { flow: s(u.flow), pressure: s(u.pressure), temperature: s(u.temperature), distribution: u.statedAs === 'limits' ? 'rectangular' as const : 'normal' as const };
}

function checkFlowUnit(u: string): string {
  try {
    parseQuantity(`1 ${u}`, 'molarFlow');
    return u;
  } catch (e) {
    if (e instanceof UnitError) throw new InputError([{ severity: 'error', message: `--flow-unit: ${e.message}`, help: e.help }]);
    throw e;
  }
}

function eosOption(v: string): MeterEosName {
  const m = matchMeterEos(v);
  if (m) return m;
  throw new InputError([{ severity: 'error', message: `--eos: unknown equation of state \`${v}\``, help: 'use GERG-2008, SRK, PR or ideal' }]);
}

function singleReading(o: MeterOptions): MeterReport {
  const bag = new DiagnosticBag();
  const atmosphere = o.atmosphere !== undefined ? atmosphereOption(bag, o.atmosphere) : 101325;
  const ids: string[] = [];
  const fr: number[] = [];
  for (const part of (o.gas ?? '').split(',').map((s) => s.trim()).filter(Boolean)) {
    const m = /^([^=:\s]+)\s*[=:]\s*(\S+)$/.exec(part);
    if (!m) {
      bag.error(`--gas: \`${part}\` is not \`ID=fraction\``, undefined, 'for example --gas "H2=0.985,N2=0.015"');
      continue;
    }
    if (!findComponent(m[1])) {
      bag.error(`--gas: unknown component \`${m[1]}\``, undefined, didYouMean(m[1], componentIds()) ?? 'see the component table in the README');
      continue;
    }
    const v = Number(m[2]);
    if (!Number.isFinite(v) || v < 0 || v > 1) {
      bag.error(`--gas: the fraction of \`${m[1]}\` must be a number from 0 to 1, not \`${m[2]}\``);
      continue;
    }
    if (ids.includes(m[1])) {
      bag.error(`--gas: \`${m[1]}\` is given twice`);
      continue;
    }
    ids.push(m[1]);
    fr.push(v);
  }
  const sum = fr.reduce((a, b) => a + b, 0);
  if (ids.length && Math.abs(sum - 1) > 1e-6) bag.error(`--gas: the fractions sum to ${Number(sum.toPrecision(8))}, not 1`, undefined, 'give every component so that the mole fractions sum to 1');
  const need = (name: string, v: string | undefined, dim: Dimension, example: string) => {
    if (v === undefined) {
      bag.error(`${name} is missing`, undefined, `add ${name} "${example}"`);
      return undefined;
    }
    return opt(bag, name, v, dim, atmosphere);
  };
  const flow = need('--flow', o.flow, 'volumeFlow', '12.6 m3/h');
  const P = need('--pressure', o.pressure, 'pressure', '30 barg');
  const T = need('--temperature', o.temperature, 'temperature', '35 degC');
  const choice = o.eos ? eosOption(o.eos) : 'SRK';
  let eosName: EosName = choice === 'GERG-2008' ? 'SRK' : choice;
  if (o.fallbackEos !== undefined) {
    const f = matchMeterEos(o.fallbackEos);
    if (choice !== 'GERG-2008') bag.error('--fallback-eos goes with --eos GERG-2008', undefined, 'with SRK, PR or ideal the one equation does everything');
    else if (f !== 'SRK' && f !== 'PR') bag.error(`--fallback-eos: \`${o.fallbackEos}\` is not SRK or PR`, undefined, 'use SRK or PR');
    else eosName = f;
  }
  const instrument = uncertaintyOptions(bag, o);
  if (flow !== undefined && !(flow > 0)) bag.error('--flow must be above zero');
  if (P !== undefined && !(P > 0)) bag.error(`--pressure is ${sig(P)} Pa absolute after the gauge conversion; it must be above zero`, undefined, 'a gauge reading below the local atmosphere by more than the atmosphere is not possible: check the unit (barg or bar)');
  if (P !== undefined && P > MAX_PRESSURE) bag.error(`--pressure is ${sig(P)} Pa absolute; loopclose computes pressures up to 1e9 Pa (10000 bar)`, undefined, 'check the number and the unit (barg, bar, kPa, Pa)');
  if (T !== undefined && !(T > 0)) bag.error(`--temperature is ${sig(T)} K; it must be above absolute zero`, undefined, 'check the number and the unit (degC, degF, K)');
  if (bag.hasErrors) throw new InputError(bag.items);
  const comps = ids.map((id) => ({ ...findComponent(id)!, id }));
  const eos = makeEos(eosName, comps);
  const meter = meterEosFor(choice === 'GERG-2008' ? 'GERG-2008' : undefined, eos);
  const spec: FeedSpec = {
    name: 'reading', type: 'feed', inlets: [], outlets: ['reading'], composition: Float64Array.from(fr.map((v) => v / sum)),
    basis: { kind: 'meter', flow: flow!, T: T!, P: P!, ...(instrument ? { uncertainty: instrument } : {}) }, T: T!, P: P!,
  };
  const f = computeFeed(spec, eos, meter);
  const budgets = budgetsOf([spec], [f], meter);
  const display = { flowUnit: o.flowUnit ? checkFlowUnit(o.flowUnit) : 'kmol/h', pressureUnit: 'bar', temperatureUnit: 'degC' };
  return { eos: eosName, meterEos: meter.name, ids, feeds: [f], budgets, warnings: f.warnings, display, atmosphere };
}

/**
 * --flow-uncertainty "1.5 %", --pressure-uncertainty "0.1 bar", --temperature-uncertainty "0.5 K",
 * --uncertainty-stated-as standard|expanded|limits. Pressures and temperatures are differences:
 * a gauge unit or a scale with an offset (degC, degF) is refused, with what to write instead.
 */
function uncertaintyOptions(bag: DiagnosticBag, o: MeterOptions): MeterUncertainty | undefined {
  if (o.flowUncertainty === undefined && o.pressureUncertainty === undefined && o.temperatureUncertainty === undefined) {
    if (o.uncertaintyStatedAs !== undefined) bag.error('--uncertainty-stated-as without an uncertainty', undefined, 'add --flow-uncertainty, --pressure-uncertainty or --temperature-uncertainty');
    return undefined;
  }
  const out: MeterUncertainty = { statedAs: 'standard' };
  if (o.uncertaintyStatedAs !== undefined) {
    const k = o.uncertaintyStatedAs.trim().toLowerCase();
    if (k === 'standard' || k === 'expanded' || k === 'limits') out.statedAs = k;
    else bag.error(`--uncertainty-stated-as: \`${o.uncertaintyStatedAs}\` is not standard, expanded or limits`, undefined, didYouMean(k, ['standard', 'expanded', 'limits']) ?? 'use standard (k = 1), expanded (k = 2) or limits (plus or minus, rectangular)');
  }
  const difference = (name: string, v: string, dim: Dimension, example: string): number | undefined => {
    try {
      const q = parseQuantity(v, dim);
      const zero = parseQuantity(`0 ${q.unit}`, dim).value;
      if (q.gauge || zero !== 0) {
        bag.error(`${name}: \`${v}\` is on a scale with an offset; an uncertainty is a difference`, undefined, `write it as ${example}`);
        return undefined;
      }
      if (!(q.value >= 0)) {
        bag.error(`${name} must not be negative`);
        return undefined;
      }
      return q.value;
    } catch (e) {
      if (e instanceof UnitError) {
        bag.error(`${name}: ${e.message}`, undefined, e.help);
        return undefined;
      }
      throw e;
    }
  };
  if (o.flowUncertainty !== undefined) {
    const v = difference('--flow-uncertainty', o.flowUncertainty, 'dimensionless', '`1.5 %`');
    if (v !== undefined && v > 0.5) bag.error(`--flow-uncertainty is ${sig(v * 100)} %; it must be at most 50 %`, undefined, 'write a percentage with its sign: `1.5 %`');
    else if (v !== undefined) out.flow = v;
  }
  if (o.pressureUncertainty !== undefined) {
    const v = difference('--pressure-uncertainty', o.pressureUncertainty, 'pressure', '`0.1 bar` (bar, kPa or psi, not barg or psig)');
    if (v !== undefined) out.pressure = v;
  }
  if (o.temperatureUncertainty !== undefined) {
    const v = difference('--temperature-uncertainty', o.temperatureUncertainty, 'temperature', '`0.5 K` (kelvin: 0.5 K for plus or minus 0.5 degC)');
    if (v !== undefined) out.temperature = v;
  }
  return out;
}

/** --atmosphere: an absolute pressure above zero (a gauge unit would add the default atmosphere to it). */
function atmosphereOption(bag: DiagnosticBag, v: string): number {
  try {
    const q = parseQuantity(v, 'pressure');
    if (q.gauge) bag.error(`--atmosphere: \`${v}\` is a gauge pressure; the local atmosphere is an absolute pressure`, undefined, 'write it in bar, kPa, psia or mmHg, e.g. `0.95 bar`');
    else if (!(q.value > 0)) bag.error('--atmosphere must be above zero', undefined, 'for example `0.95 bar`');
    else return q.value;
  } catch (e) {
    if (!(e instanceof UnitError)) throw e;
    bag.error(`--atmosphere: ${e.message}`, undefined, e.help);
  }
  return 101325;
}

function sig(v: number): string {
  return String(Number(v.toPrecision(6)));
}

function opt(bag: DiagnosticBag, name: string, v: string, dim: Dimension, atmosphere: number): number | undefined {
  try {
    return parseQuantity(v, dim, { atmosphere }).value;
  } catch (e) {
    if (e instanceof UnitError) {
      bag.error(`${name}: ${e.message}`, undefined, e.help);
      return undefined;
    }
    throw e;
  }
}
