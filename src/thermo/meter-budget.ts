/**
 * The uncertainty budget of one gas-meter reading, by the law of propagation of uncertainty of the
 * GUM (JCGM 100:2008, Evaluation of measurement data - Guide to the expression of uncertainty in
 * measurement, 5.1.2, equation (10) for uncorrelated inputs; the expanded uncertainty U = k u_c of 6.2
 * with k = 2; clause and equation numbers from memory).
 *
 * The measurand is the molar flow n of a meter that reads an actual volume flow Q at line
 * temperature T and pressure P:
 *   n = Q / v(T, P, x)                                   (a volumetric meter), or
 *   n = Q sqrt(rho_d rho(T, P, x)) / M                   (a differential-pressure meter whose
 *                                                         indicated flow assumes the density rho_d)
 * with v the molar volume of the meter EOS (src/thermo/meter-eos.ts) and rho = M / v. Inputs and
 * their sensitivity coefficients c_i = dn/dx_i (analytic, from the meter EOS's log-derivatives of v;
 * p = 1 for a volumetric meter, 1/2 for a differential-pressure one):
 *   flow reading, relative:   c = n                       (per unit of relative flow)
 *   line pressure, Pa:        c = -p n (d ln v / d ln P) / P
 *   line temperature, K:      c = -p n (d ln v / d ln T) / T
 *   the equation of state:    c = p n, on the relative uncertainty of v (MeterEos.modelUncertainty:
 *                             GERG-2008's stated figure, or SRK/PR measured against GERG-2008)
 *   the reference equation:   c = p n, GERG-2008's own stated figure when SRK/PR was measured against it.
 * The inputs are taken as uncorrelated (separate transmitters; the model's error does not depend on
 * the instruments'). u_c(n)^2 = sum (c_i u_i)^2; U = 2 u_c. The design density of a differential-
 * pressure meter given as a density is a constant of its set-up, taken as exact. One computed by
 * this equation at a design state (BudgetReading.design) carries the equation's error too, and
 * that error goes with the line density's (the same equation): with relative errors d_l and d_d of
 * v at the line and at the design state, n = Q sqrt(rho_d rho) / M is off by -(d_l + d_d) / 2.
 * So the equation-of-state line is then taken on n directly (c = n): measured against GERG-2008,
 * the half-width |d_l + d_d| / 2 of a rectangular distribution; a stated or bound figure, the two
 * states' figures as fully correlated, u = (u_l + u_d) / 2 (GERG-2008's own line likewise). The
 * composition is taken as known (its uncertainty is not part of this budget).
 *
 * API (SI: m3/s, K, Pa, mol/s; relative figures as fractions):
 *   meterBudget(meter: MeterEos, reading: BudgetReading, instrument?: InstrumentUncertainty): MeterBudget
 *   standardUncertainty(value, statedAs): the standard uncertainty of a declared figure.
 */
import { pctText, type MeterEos, type MeterEosName, type MeterState } from './meter-eos.js';

/** One meter reading, SI. */
export interface BudgetReading {
  /** Actual volume flow at the meter, m3/s (the indicated flow of a differential-pressure meter). */
  flow: number;
  /** Line temperature, K. */
  T: number;
  /** Line pressure, Pa absolute. */
  P: number;
  /** Mole fractions in the meter EOS's component order (meter.ids), summing to 1. */
  x: ArrayLike<number>;
  /** A differential-pressure meter set up for this density (kg/m3): n = Q sqrt(rho_d rho) / M. */
  designDensity?: number;
  /**
   * The design state designDensity was computed at with this same meter EOS (T K, P Pa, mole
   * fractions in meter.ids order). Given, the equation's error enters through both densities
   * (see the file header); left out, the design density is a figure of the set-up, taken as exact.
   */
  design?: { T: number; P: number; x: ArrayLike<number> };
}

/** Standard uncertainties (k = 1) of the instruments; leave out what is not known. */
export interface InstrumentUncertainty {
  /** Of the volume flow reading, relative (0.0075 for 0.75 %). */
  flow?: number;
  /** Of the line pressure, Pa. */
  pressure?: number;
  /** Of the line temperature, K. */
  temperature?: number;
  /** How the instrument figures are distributed: 'normal' (default) or 'rectangular' (declared as limits). */
  distribution?: 'normal' | 'rectangular';
}

export type BudgetInput = 'flow' | 'pressure' | 'temperature' | 'equation-of-state' | 'reference-equation';

/** One line of the budget: an input, its standard uncertainty, its sensitivity and its share. */
export interface BudgetLine {
  input: BudgetInput;
  /** Words for the report, e.g. "line pressure". */
  label: string;
  /** Standard uncertainty u(x_i) of the input, in `unit` ('1': relative). */
  u: number;
  unit: '1' | 'Pa' | 'K';
  distribution: 'normal' | 'rectangular';
  /** Sensitivity coefficient c_i = dn/dx_i, mol/s per `unit`. */
  sensitivity: number;
  /** d ln n / d ln x_i: per cent of n for 1 % of the input (for a relative input, d ln n / d u). */
  relativeSensitivity: number;
  /** |c_i| u(x_i), mol/s: this input's standard uncertainty in the molar flow. */
  contribution: number;
  /** contribution / n. */
  relative: number;
  /** Share of the combined variance, (c_i u_i)^2 / u_c^2 (0 to 1). */
  share: number;
  /** Where the figure comes from. */
  source: string;
}

export interface MeterBudget {
  /** mol/s */
  molarFlow: number;
  /** The equation that converted the reading. */
  model: MeterEosName;
  lines: BudgetLine[];
  /** Inputs with no figure (left out of the combination): 'flow', 'pressure', 'temperature', 'equation-of-state'. */
  missing: BudgetInput[];
  /** Combined standard uncertainty u_c(n), mol/s, and relative. */
  combined: number;
  combinedRelative: number;
  /** Expanded uncertainty U = k u_c, mol/s, and relative. */
  expanded: number;
  expandedRelative: number;
  coverage: 2;
  /** What the reader must know: missing inputs, the model's notes, a fallback. */
  notes: string[];
}

/** The standard uncertainty of a figure declared as a standard uncertainty, an expanded one (k = 2) or limits (plus or minus a, rectangular: a / sqrt(3), JCGM 100:2008, 4.3.7). */
export function standardUncertainty(value: number, statedAs: 'standard' | 'expanded' | 'limits'): number {
  return statedAs === 'expanded' ? value / 2 : statedAs === 'limits' ? value / Math.sqrt(3) : value;
}

/** The GUM budget of one reading (see the file header). */
export function meterBudget(meter: MeterEos, reading: BudgetReading, instrument: InstrumentUncertainty = {}): MeterBudget {
  const { flow, T, P, x } = reading;
  if (!(flow > 0) || !(T > 0) || !(P > 0)) throw new RangeError(`meterBudget: flow, T and P must be positive (got ${flow}, ${T}, ${P})`);
  const s = phaseForBudget(meter, T, P, x);
  const v = s.v;
  const dlnvdlnP = s.dlnvdlnP;
  const dlnvdlnT = s.dlnvdlnT;
  const model = s.model;
  const fallback = s.fallback;
  const dp = reading.designDensity !== undefined;
  let M = 0;
  for (let i = 0; i < meter.n; i++) M += x[i] * meter.eos.components[i].MW;
  const n = dp ? (flow * Math.sqrt(reading.designDensity! * (M / v))) / M : flow / v;
  const p = dp ? 0.5 : 1;
  const lines: BudgetLine[] = [];
  const missing: BudgetInput[] = [];
  const notes: string[] = [];
  const add = (input: BudgetInput, label: string, u: number, unit: BudgetLine['unit'], distribution: BudgetLine['distribution'], c: number, source: string) => {
    const size = unit === 'Pa' ? P : unit === 'K' ? T : 1;
    lines.push({ input, label, u, unit, distribution, sensitivity: c, relativeSensitivity: (c * size) / n, contribution: Math.abs(c) * u, relative: (Math.abs(c) * u) / n, share: 0, source });
  };
  const dist = instrument.distribution ?? 'normal';
  if (instrument.flow !== undefined) add('flow', 'volume flow reading', instrument.flow, '1', dist, n, 'declared for the meter');
  else missing.push('flow');
  if (instrument.pressure !== undefined) add('pressure', 'line pressure', instrument.pressure, 'Pa', dist, (-p * n * dlnvdlnP) / P, 'declared for the pressure transmitter');
  else missing.push('pressure');
  if (instrument.temperature !== undefined) add('temperature', 'line temperature', instrument.temperature, 'K', dist, (-p * n * dlnvdlnT) / T, 'declared for the temperature sensor');
  else missing.push('temperature');
  const mu = meter.modelUncertainty(T, P, x, s);
  // A design density the equation computed at a design state: its error at both states (s, the
  // meter EOS's scratch, is not read after this point).
  const design = dp && reading.design ? reading.design : undefined;
  const muD = design ? meter.modelUncertainty(design.T, design.P, design.x, phaseForBudget(meter, design.T, design.P, design.x)) : undefined;
  if (muD && mu.relative !== null && muD.relative !== null) {
    if (mu.deviation !== undefined && muD.deviation !== undefined) {
      const dn = (mu.deviation + muD.deviation) / 2;
      add('equation-of-state', `equation of state (${mu.model})`, Math.abs(dn) / Math.sqrt(3), '1', 'rectangular', n,
        `measured: ${mu.model} differs from GERG-2008 by ${pctText(mu.deviation)} in molar volume at the line and ${pctText(muD.deviation)} at the design state, which gave the design density; `
        + `n goes with sqrt(rho_d rho), so by ${pctText(-dn)}: a known correction not applied, taken as the half-width of a rectangular distribution (JCGM 100:2008, 4.3.7): u = |difference| / sqrt(3)`);
    } else if (muD.model === mu.model) {
      add('equation-of-state', `equation of state (${mu.model})`, (mu.relative + muD.relative) / 2, '1', mu.distribution, n,
        `${mu.source}; at the design state, which gave the design density: ${pctText(muD.relative, false)}; the same equation at both states, taken as fully correlated: u = (u_line + u_design) / 2 on n`);
    } else {
      // Different equations at the two states (a design gas GERG-2008 does not cover): independent errors.
      add('equation-of-state', `equation of state (${mu.model}; design: ${muD.model})`, Math.hypot(mu.relative, muD.relative) / 2, '1', mu.relative >= muD.relative ? mu.distribution : muD.distribution, n,
        `${mu.source}; at the design state, which gave the design density, ${muD.model}: ${pctText(muD.relative, false)} (${muD.source}); different equations, taken as uncorrelated: u = sqrt(u_line^2 + u_design^2) / 2 on n`);
    }
    const r = mu.reference;
    const rD = muD.reference;
    if (r && r.relative !== null) {
      const both = rD && rD.relative !== null;
      add('reference-equation', 'reference equation (GERG-2008)', both ? (r.relative + rD.relative!) / 2 : r.relative, '1', r.distribution, both ? n : p * n,
        both ? `${r.source}; at the design state: ${pctText(rD.relative!, false)}; taken as fully correlated: u = (u_line + u_design) / 2 on n` : r.source);
    }
  } else {
    if (mu.relative !== null) add('equation-of-state', `equation of state (${mu.model})`, mu.relative, '1', mu.distribution, p * n, mu.source);
    else missing.push('equation-of-state');
    if (mu.reference && mu.reference.relative !== null) add('reference-equation', 'reference equation (GERG-2008)', mu.reference.relative, '1', mu.reference.distribution, p * n, mu.reference.source);
    if (muD) notes.push('the equation of state has no figure at the design state: the design density is taken as exact');
  }
  let variance = 0;
  for (const l of lines) variance += l.contribution * l.contribution;
  const combined = Math.sqrt(variance);
  for (const l of lines) l.share = variance > 0 ? (l.contribution * l.contribution) / variance : 0;
  if (fallback) notes.push(`${meter.name} was not used: ${fallback}; ${model} converted this reading`);
  for (const note of mu.notes) if (!notes.includes(note)) notes.push(note);
  if (mu.reference) for (const note of mu.reference.notes) if (!notes.includes(note)) notes.push(note);
  if (muD) {
    const seen = [...mu.notes, ...(mu.reference?.notes ?? [])];
    for (const note of [...muD.notes, ...(muD.reference?.notes ?? [])]) {
      if (!seen.includes(note) && !note.startsWith('GERG-2008 covers this gas') && !notes.includes(`design state: ${note}`)) notes.push(`design state: ${note}`);
    }
  }
  const instrumentsMissing = missing.filter((m) => m !== 'equation-of-state');
  if (instrumentsMissing.length === 3) notes.push('no instrument uncertainties declared: the budget holds the equation of state\'s part only; declare the meter\'s, the pressure\'s and the temperature\'s uncertainties to complete it');
  else if (instrumentsMissing.length > 0) notes.push(`not declared, so left out of the budget: ${instrumentsMissing.map(inputWords).join(', ')}`);
  if (missing.includes('equation-of-state')) notes.push('the equation of state has no stated uncertainty at this state, so it is left out');
  if (dp && design && muD && mu.relative !== null && muD.relative !== null) {
    notes.push('differential-pressure meter corrected to a design density computed at its design state: sensitivities to the line P and T are halved (n goes with the square root of the density); the equation of state\'s error enters through both densities');
  } else if (dp) notes.push('differential-pressure meter corrected to a design density: sensitivities to P, T and the equation of state are halved (n goes with the square root of the density); the design density is taken as exact');
  return {
    molarFlow: n, model, lines, missing, combined, combinedRelative: combined / n, expanded: 2 * combined, expandedRelative: (2 * combined) / n, coverage: 2, notes,
  };
}

/**
 * The meter EOS's state for a budget. The phase split (a tangent-plane stability test, the
 * costliest part of a state) is looked for only where the state without it is not a vapor: the
 * budget reads the phase only to choose GERG-2008's root and region, and a vapor and a split
 * choose the same (the gas root, the gas-like region), so the figures are the same either way.
 */
export function phaseForBudget(meter: MeterEos, T: number, P: number, x: ArrayLike<number>): MeterState {
  const s = meter.state(T, P, x, undefined, NO_PHASE_TEST);
  return s.phase === 'vapor' ? s : meter.state(T, P, x);
}

const NO_PHASE_TEST = { phase: false } as const;

function inputWords(i: BudgetInput): string {
  return i === 'flow' ? 'the meter\'s own uncertainty' : i === 'pressure' ? 'the line pressure' : i === 'temperature' ? 'the line temperature' : i;
}

