/** `loopclose meter`: every feed of a file, or one reading given on the command line. */
import { computeFeed } from '../blocks/feed.js';
import { DiagnosticBag, InputError, didYouMean } from '../diagnostics.js';
import { loadFlowsheet } from '../flowsheet/validate.js';
import type { FeedSpec } from '../flowsheet/model.js';
import { meterJson, meterText, type MeterReport } from '../report/meter.js';
import { findComponent, componentIds } from '../thermo/components.js';
import { makeEos } from '../thermo/eos.js';
import type { EosName } from '../thermo/types.js';
import { parseQuantity, UnitError, type Dimension } from '../units/index.js';

export interface MeterOptions {
  json?: boolean;
  gas?: string;
  flow?: string;
  pressure?: string;
  temperature?: string;
  eos?: string;
  atmosphere?: string;
  flowUnit?: string;
}

export function runMeter(file: string | undefined, o: MeterOptions): string {
  if (file && o.gas) throw new InputError([{ severity: 'error', message: 'give a flowsheet file or `--gas` with one reading, not both', help: 'drop the file to convert one reading' }]);
  if (!file && !o.gas) throw new InputError([{ severity: 'error', message: 'nothing to convert', help: 'give a flowsheet file, or `--gas "H2=0.985,N2=0.015" --flow "12.6 m3/h" --pressure "30 barg" --temperature "35 degC"`' }]);
  let report: MeterReport;
  if (file) {
    const { model } = loadFlowsheet(file);
    const eosName = o.eos ? eosOption(o.eos) : model.thermo.eos;
    const eos = makeEos(eosName, model.components, model.thermo.kij);
    const feeds = model.feeds.map((f) => computeFeed(f, eos));
    const display = { ...model.display, ...(o.flowUnit ? { flowUnit: checkFlowUnit(o.flowUnit) } : {}) };
    report = { file, eos: eosName, ids: model.ids, feeds, warnings: [...model.warnings.map((w) => w.message), ...feeds.flatMap((f) => f.warnings)], display, atmosphere: model.thermo.atmosphere };
  } else {
    report = singleReading(o);
  }
  return o.json ? meterJson(report) : meterText(report);
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

function eosOption(v: string): EosName {
  const s = v.trim().toUpperCase();
  if (s === 'SRK') return 'SRK';
  if (s === 'PR' || s === 'PENG-ROBINSON') return 'PR';
  if (s === 'IDEAL') return 'ideal';
  throw new InputError([{ severity: 'error', message: `--eos: unknown equation of state \`${v}\``, help: 'use SRK, PR or ideal' }]);
}

function singleReading(o: MeterOptions): MeterReport {
  const bag = new DiagnosticBag();
  const atmosphere = o.atmosphere ? opt(bag, '--atmosphere', o.atmosphere, 'pressure', 101325) ?? 101325 : 101325;
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
  const eosName = o.eos ? eosOption(o.eos) : 'SRK';
  if (flow !== undefined && !(flow > 0)) bag.error('--flow must be above zero');
  if (P !== undefined && !(P > 0)) bag.error(`--pressure is ${sig(P)} Pa absolute after the gauge conversion; it must be above zero`, undefined, 'a gauge reading below the local atmosphere by more than the atmosphere is not possible: check the unit (barg or bar)');
  if (T !== undefined && !(T > 0)) bag.error(`--temperature is ${sig(T)} K; it must be above absolute zero`, undefined, 'check the number and the unit (degC, degF, K)');
  if (bag.hasErrors) throw new InputError(bag.items);
  const comps = ids.map((id) => ({ ...findComponent(id)!, id }));
  const eos = makeEos(eosName, comps);
  const spec: FeedSpec = { name: 'reading', type: 'feed', inlets: [], outlets: ['reading'], composition: Float64Array.from(fr.map((v) => v / sum)), basis: { kind: 'meter', flow: flow!, T: T!, P: P! }, T: T!, P: P! };
  const f = computeFeed(spec, eos);
  const display = { flowUnit: o.flowUnit ? checkFlowUnit(o.flowUnit) : 'kmol/h', pressureUnit: 'bar', temperatureUnit: 'degC' };
  return { eos: eosName, ids, feeds: [f], warnings: f.warnings, display, atmosphere };
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
