/** Reporters for `loopclose meter`: a short table, or JSON in SI. */
import type { FeedResult } from '../blocks/feed.js';
import type { BudgetLine, MeterBudget } from '../thermo/meter-budget.js';
import { toUnit } from '../units/index.js';
import type { Model } from '../flowsheet/model.js';
import { CAUTION, num, pct, table, toJson } from './format.js';

export interface MeterReport {
  file?: string;
  /** The file's equation of state (the loop's; phase test and fallback of the meters). */
  eos: string;
  /** The meters' equation (GERG-2008, or the same as eos). */
  meterEos?: string;
  /** The uncertainty budget of each metered feed, by name. */
  budgets?: ReadonlyMap<string, MeterBudget>;
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
      model: f.model,
      ...(f.fallback ? { fallback: f.fallback } : {}),
      ...(f.sensitivity ? { sensitivity: f.sensitivity } : {}),
      ...(r.budgets?.get(f.name) ? { uncertainty: budgetJson(r.budgets.get(f.name)!) } : {}),
      flows,
      T: f.T,
      P: f.P,
      conditions: f.conditions,
      basis: f.basis,
      molarMass: f.molarMass,
      density: f.density,
      ...(f.reference ? { reference: f.reference } : {}),
      ...(f.densityCorrection !== undefined ? { densityCorrection: f.densityCorrection } : {}),
    };
  }
  return toJson({ eos: r.eos, meterEos: r.meterEos ?? r.eos, feeds, warnings: r.warnings, caution: CAUTION });
}

/** A budget in SI: each input's standard uncertainty, sensitivity (mol/s per unit), contribution, share. */
function budgetJson(b: MeterBudget) {
  return {
    law: 'GUM (JCGM 100:2008), uncorrelated inputs',
    molarFlow: b.molarFlow,
    model: b.model,
    contributions: b.lines.map((l) => ({
      input: l.input, label: l.label, u: l.u, unit: l.unit, distribution: l.distribution, sensitivity: l.sensitivity, relativeSensitivity: l.relativeSensitivity,
      contribution: l.contribution, relative: l.relative, share: l.share, source: l.source,
    })),
    missing: b.missing,
    combined: b.combined,
    combinedRelative: b.combinedRelative,
    expanded: b.expanded,
    expandedRelative: b.expandedRelative,
    coverage: b.coverage,
    notes: b.notes,
  };
}

export function meterText(r: MeterReport): string {
  const d = r.display;
  const ctx = { atmosphere: r.atmosphere };
  const rows = r.feeds.map((f) => [
    f.name,
    f.basis,
    // The state of the Z, v and phase beside it: the meter's for a metered feed.
    num(toUnit(f.conditions.T, 'temperature', d.temperatureUnit, ctx), 5),
    num(toUnit(f.conditions.P, 'pressure', d.pressureUnit, ctx), 5),
    num(f.Z, 5),
    num(f.molarVolume * 1e6, 5),
    num(toUnit(f.molarFlow, 'molarFlow', d.flowUnit, ctx), 5),
    f.idealError !== undefined ? pct(f.idealError) : '-',
    f.phase,
  ]);
  const out: string[] = [];
  const meterEos = r.meterEos ?? r.eos;
  out.push(`loopclose meter${r.file ? `: ${r.file}` : ''} (equation of state: ${r.eos}${meterEos !== r.eos ? `; meters: ${meterEos}` : ''})`);
  out.push('');
  const byModel = meterEos !== r.eos;
  rows.forEach((row, k) => {
    const f = r.feeds[k];
    // A mass, molar or ideal-basis standard flow goes through no equation; its Z still comes from one.
    const converted = f.basis === 'meter' || (f.basis === 'standard-flow' && f.reference?.basis === 'real');
    if (byModel) row.push(converted ? f.model : `none (Z: ${f.model})`);
  });
  out.push(table(['feed', 'basis', `T ${d.temperatureUnit}`, `P ${d.pressureUnit}`, 'Z', 'v cm3/mol', `flow ${d.flowUnit}`, 'ideal-gas error', 'phase', ...(byModel ? ['converted by'] : [])], rows,
    ['left', 'left', 'right', 'right', 'right', 'right', 'right', 'right', 'left', 'left']));
  const refs = r.feeds.filter((f) => f.reference);
  for (const f of refs) out.push(`  ${f.name}: standard volume at ${f.reference!.label}, ${f.reference!.basis === 'real' ? 'real-gas volume at the reference' : 'ideal-gas volume at the reference'}`);
  const T = (v: number) => `${num(toUnit(v, 'temperature', d.temperatureUnit, ctx), 5)} ${d.temperatureUnit}`;
  const P = (v: number) => `${num(toUnit(v, 'pressure', d.pressureUnit, ctx), 5)} ${d.pressureUnit}`;
  for (const f of r.feeds) {
    if (f.conditions.T !== f.T || f.conditions.P !== f.P) out.push(`  ${f.name}: T and P above are the meter's; the feed enters the flowsheet at ${T(f.T)}, ${P(f.P)}`);
  }
  for (const f of r.feeds) if (f.densityCorrection !== undefined) out.push(`  ${f.name}: differential-pressure reading corrected by sqrt(design density / actual density) = ${num(f.densityCorrection, 6)}`);
  for (const f of r.feeds) {
    const b = r.budgets?.get(f.name);
    if (b) out.push('', ...budgetText(f.name, b, r));
  }
  out.push('');
  out.push('ideal-gas error = (ideal - real) / real: what the ideal-gas law would have made of the same reading.');
  if (r.feeds.some((f) => f.phase === 'dense')) out.push('dense: above the pseudo-critical temperature, denser than the pseudo-critical density (Kay\'s rule) and less than half as compressible as an ideal gas: a supercritical fluid that behaves like a liquid, not a gas.');
  if (refs.length) out.push('For a standard-flow feed it compares the ideal and the real molar volume at the standard reference (zero on the ideal basis).');
  for (const w of r.warnings) out.push(`warning: ${w}`);
  out.push(`note: ${CAUTION}`);
  return out.join('\n');
}

/** The budget of one feed as a table: input, standard uncertainty, distribution, sensitivity, share. */
function budgetText(name: string, b: MeterBudget, r: MeterReport): string[] {
  const d = r.display;
  const ctx = { atmosphere: r.atmosphere };
  const F = (v: number) => num(toUnit(v, 'molarFlow', d.flowUnit, ctx), 4);
  const out = [`Uncertainty of ${name} (GUM, JCGM 100:2008; inputs uncorrelated; converted by ${b.model})`];
  if (b.lines.length) {
    out.push(table(['input', 'u (k = 1)', 'distribution', 'sensitivity %/%', `u(n) ${d.flowUnit}`, 'u(n)/n', 'share'], b.lines.map((l) => [
      l.label, inputText(l, r), l.distribution, num(l.relativeSensitivity, 3), F(l.contribution), pct(l.relative, 3).replace('+', ''), `${(100 * l.share).toFixed(1)} %`,
    ]), ['left', 'right', 'left', 'right', 'right', 'right', 'right']));
    for (const l of b.lines) if (l.input === 'equation-of-state' || l.input === 'reference-equation') out.push(`  ${l.label}: ${l.source}`);
  }
  if (!b.lines.length) out.push(`  molar flow ${F(b.molarFlow)} ${d.flowUnit}; no input has a figure, so no uncertainty can be combined (it is not zero)`);
  else out.push(`  molar flow ${F(b.molarFlow)} ${d.flowUnit}; combined standard uncertainty ${F(b.combined)} ${d.flowUnit} (${pct(b.combinedRelative, 3).replace('+', '')}); expanded (k = 2) ${F(b.expanded)} ${d.flowUnit} (${pct(b.expandedRelative, 3).replace('+', '')})`);
  for (const note of b.notes) out.push(`  note: ${note}`);
  return out;
}

function inputText(l: BudgetLine, r: MeterReport): string {
  if (l.unit === '1') return pct(l.u, 3).replace('+', '');
  if (l.unit === 'K') return `${num(l.u, 3)} K`;
  const unit = r.display.pressureUnit.replace(/g$|\(g\)$/, '');
  const ctx = { atmosphere: r.atmosphere };
  return `${num(toUnit(l.u, 'pressure', unit, ctx) - toUnit(0, 'pressure', unit, ctx), 3)} ${unit}`;
}
