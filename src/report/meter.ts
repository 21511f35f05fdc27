/** Reporters for `loopclose meter`: a short table, or JSON in SI. */
import type { FeedResult } from '../blocks/feed.js';
import { toUnit } from '../units/index.js';
import type { Model } from '../flowsheet/model.js';
import { CAUTION, num, pct, table, toJson } from './format.js';

export interface MeterReport {
  file?: string;
  eos: string;
  ids: readonly string[];
  feeds: FeedResult[];
  warnings: string[];
  display: Model['display'];
  atmosphere: number;
}

export function meterJson(r: MeterReport): string {
  const feeds: Record<string, unknown> = {};
  for (const f of r.feeds) {
    const flows: Record<string, number> = {};
    r.ids.forEach((id, i) => (flows[id] = f.flows[i]));
    feeds[f.name] = {
      Z: f.Z,
      molarVolume: f.molarVolume,
      molarFlow: f.molarFlow,
      ...(f.idealMolarFlow !== undefined ? { idealMolarFlow: f.idealMolarFlow, idealError: f.idealError } : {}),
      phase: f.phase,
      flows,
      T: f.T,
      P: f.P,
      basis: f.basis,
      molarMass: f.molarMass,
      density: f.density,
      ...(f.reference ? { reference: f.reference } : {}),
      ...(f.densityCorrection !== undefined ? { densityCorrection: f.densityCorrection } : {}),
    };
  }
  return toJson({ eos: r.eos, feeds, warnings: r.warnings, caution: CAUTION });
}

export function meterText(r: MeterReport): string {
  const d = r.display;
  const ctx = { atmosphere: r.atmosphere };
  const rows = r.feeds.map((f) => [
    f.name,
    f.basis,
    num(toUnit(f.T, 'temperature', d.temperatureUnit, ctx), 5),
    num(toUnit(f.P, 'pressure', d.pressureUnit, ctx), 5),
    num(f.Z, 5),
    num(f.molarVolume * 1e6, 5),
    num(toUnit(f.molarFlow, 'molarFlow', d.flowUnit, ctx), 5),
    f.idealError !== undefined ? pct(f.idealError) : '-',
    f.phase,
  ]);
  const out: string[] = [];
  out.push(`loopclose meter${r.file ? `: ${r.file}` : ''} (equation of state: ${r.eos})`);
  out.push('');
  out.push(table(['feed', 'basis', `T ${d.temperatureUnit}`, `P ${d.pressureUnit}`, 'Z', 'v cm3/mol', `flow ${d.flowUnit}`, 'ideal-gas error', 'phase'], rows,
    ['left', 'left', 'right', 'right', 'right', 'right', 'right', 'right', 'left']));
  const refs = r.feeds.filter((f) => f.reference);
  for (const f of refs) out.push(`  ${f.name}: standard volume at ${f.reference!.label}, ${f.reference!.basis === 'real' ? 'real-gas volume at the reference' : 'ideal-gas volume at the reference'}`);
  for (const f of r.feeds) if (f.densityCorrection !== undefined) out.push(`  ${f.name}: differential-pressure reading corrected by sqrt(design density / actual density) = ${num(f.densityCorrection, 6)}`);
  out.push('');
  out.push('ideal-gas error = (ideal - real) / real: what the ideal-gas law would have made of the same reading.');
  if (refs.length) out.push('For a standard-flow feed it compares the ideal and the real molar volume at the standard reference (zero on the ideal basis).');
  for (const w of r.warnings) out.push(`warning: ${w}`);
  out.push(`note: ${CAUTION}`);
  return out.join('\n');
}
