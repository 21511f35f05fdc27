/**
 * A flow instrument's reading as the balances use it, and its uncertainty budget.
 *
 * The balances take molar flows (mol/s), or mass flows (kg/s) for a mass instrument. A meter's
 * actual volume flow Q at line T and P is converted with the file's equation of state exactly as
 * a metered feed is (src/blocks/feed.ts): F = Q / v(T, P, x), v = Z R T / P; a differential-
 * pressure meter set up for a design density rho_d indicates Q sqrt(rho / rho_d), so
 * F = Q sqrt(rho_d rho) / M (ISO 5167-1:2003, clause 4). A standard volume flow at a reference
 * is F = Q_ref / v_ref (real-gas molar volume at the reference, ISO 13443, or ideal).
 *
 * The budget is a function passed in (FlowBudget); the one used (meterFlowBudget) is the meters'
 * own (src/thermo/meter-budget.ts), which combines by the law of propagation of uncertainty for
 * uncorrelated inputs (JCGM 100:2008, Sec. 5.1.2, eq. (10)) the instrument's own standard
 * uncertainty (its stated U / 2), the line pressure's and temperature's (their instruments' U / 2)
 * through the analytic sensitivities of the molar volume, and the equation of state's own: the
 * stated figure of GERG-2008 where it converts the reading, else SRK/PR measured against GERG-2008
 * at that gas and state. The composition used for the conversion is taken as exact (its
 * uncertainty is not counted).
 */
import type { MeterDesign } from '../flowsheet/model.js';
import { R } from '../thermo/constants.js';
import type { Eos } from '../thermo/types.js';
import type { StandardRef } from '../units/index.js';
import type { FlowKind } from './declarations.js';
import { meterBudget, phaseForBudget } from '../thermo/meter-budget.js';
import type { MeterEos } from '../thermo/meter-eos.js';

export interface FlowBudgetInput {
  tag: string;
  kind: FlowKind;
  /** The reading in SI of its dimension: m3/s (meter, or standard at its reference), kg/s, mol/s. */
  reading: number;
  /** The instrument's own standard uncertainty, same unit as the reading. */
  instrument: number;
  /** Mole fractions of the metered gas (for the conversion). */
  composition: ArrayLike<number>;
  eos: Eos;
  /** Meter: line conditions and their standard uncertainties (K, Pa), with their tags. */
  line?: { T: number; P: number; uT: number; uP: number; temperatureTag: string; pressureTag: string };
  design?: MeterDesign;
  /** Standard: reference and basis. */
  reference?: StandardRef;
  realGas?: boolean;
}

export interface BudgetTerm {
  /** What the term is: `instrument`, `line pressure (PI-101)`, `line temperature (TI-101)`, `equation of state`. */
  source: string;
  /** Its standard uncertainty in the flow's unit (mol/s or kg/s). */
  sigma: number;
  note?: string;
}

export interface FlowBudgetResult {
  /** The flow as the balances take it: mol/s, or kg/s for a mass instrument. */
  value: number;
  basis: 'molar' | 'mass';
  /** Combined standard uncertainty of value. */
  sigma: number;
  terms: BudgetTerm[];
  notes: string[];
}

/** A flow instrument's converted reading and combined standard uncertainty. */
export type FlowBudget = (input: FlowBudgetInput) => FlowBudgetResult;


function molarMass(eos: Eos, x: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < eos.n; i++) m += x[i] * eos.components[i].MW;
  return m;
}

/** Molar flow of a meter reading Q (m3/s) at T, P: the conversion of a metered feed. */
export function meterMolarFlow(eos: Eos, Q: number, T: number, P: number, x: ArrayLike<number>, design?: MeterDesign): number {
  const v = (eos.z(T, P, x, 'stable').Z * R * T) / P;
  if (!design) return Q / v;
  const MW = molarMass(eos, x);
  let rhoD: number;
  if (design.density !== undefined) rhoD = design.density;
  else {
    const zc = design.composition ?? x;
    rhoD = (molarMass(eos, zc) * design.P!) / (eos.z(design.T!, design.P!, zc, 'stable').Z * R * design.T!);
  }
  return (Q * Math.sqrt(rhoD * (MW / v))) / MW;
}

/** Molar flow of a standard volume flow Q (m3/s at the reference). */
export function standardMolarFlow(eos: Eos, Q: number, ref: StandardRef, realGas: boolean, x: ArrayLike<number>): number {
  const Z = realGas ? eos.z(ref.T, ref.P, x, 'stable').Z : 1;
  return (Q * ref.P) / (Z * R * ref.T);
}

/**
 * The budget of the project's meters (src/thermo/meter-budget.ts), for the balances: a meter
 * through meterBudget (instrument, line pressure and temperature, and the equation of state's
 * own uncertainty: GERG-2008's stated figure, or SRK/PR measured against GERG-2008); a standard
 * volume flow through the meter EOS at its reference with the model's figure there; a mass or
 * molar instrument as it reads.
 */
export function meterFlowBudget(meter: MeterEos): FlowBudget {
  return (input) => {
    const { kind, reading, instrument, composition: x } = input;
    const notes: string[] = [];
    if (kind === 'mass' || kind === 'molar') {
      return { value: reading, basis: kind === 'mass' ? 'mass' : 'molar', sigma: instrument, terms: [{ source: 'instrument', sigma: instrument }], notes };
    }
    if (kind === 'standard') {
      const ref = input.reference!;
      const realGas = input.realGas ?? true;
      // The state at the reference (v is the same as molarVolume's), made once for v and the
      // model's figure; its phase test only where the figure can read it (phaseForBudget).
      const st = realGas ? phaseForBudget(meter, ref.T, ref.P, x) : undefined;
      const v = st ? st.v : (R * ref.T) / ref.P;
      const F = reading / v;
      const terms: BudgetTerm[] = [{ source: 'instrument', sigma: reading > 0 ? (F / reading) * instrument : instrument / v }];
      if (realGas) {
        const mu = meter.modelUncertainty(ref.T, ref.P, x, st);
        terms.push({ source: `equation of state at the reference (${mu.model})`, sigma: mu.relative === null ? 0 : F * mu.relative, note: mu.source });
        notes.push(...mu.notes);
      }
      let u2 = 0;
      for (const t of terms) u2 += t.sigma * t.sigma;
      return { value: F, basis: 'molar', sigma: Math.sqrt(u2), terms, notes };
    }
    // A meter at line conditions.
    const line = input.line!;
    let designDensity: number | undefined;
    let design: { T: number; P: number; x: ArrayLike<number> } | undefined;
    if (input.design) {
      const d = input.design;
      const zc = d.composition ?? x;
      designDensity = d.density ?? molarMass(input.eos, zc) / meter.molarVolume(d.T!, d.P!, zc);
      // Computed at the design state with the meter EOS: its error goes into the budget (meter-budget.ts).
      if (d.density === undefined) design = { T: d.T!, P: d.P!, x: zc };
    }
    // The molar flow is the reading times a factor of the line state, F = k Q. A reading of 0 (a
    // line shut) is taken at Q = 1 and scaled: F = 0, the instrument's term k u(Q), and every
    // other term (each proportional to F) 0.
    const zero = reading === 0;
    const Q = zero ? 1 : reading;
    const b = meterBudget(meter, { flow: Q, T: line.T, P: line.P, x, designDensity, ...(design ? { design } : {}) }, {
      flow: Q > 0 ? instrument / Q : undefined, pressure: line.uP, temperature: line.uT,
    });
    const terms: BudgetTerm[] = b.lines.map((l) => ({
      source: l.input === 'pressure' ? `line pressure (${line.pressureTag})` : l.input === 'temperature' ? `line temperature (${line.temperatureTag})` : l.input === 'flow' ? 'instrument' : l.label,
      sigma: zero && l.input !== 'flow' ? 0 : l.contribution,
      ...(l.input === 'equation-of-state' || l.input === 'reference-equation' ? { note: l.source } : {}),
    }));
    if (zero) return { value: 0, basis: 'molar', sigma: instrument * b.molarFlow, terms, notes: b.notes };
    return { value: b.molarFlow, basis: 'molar', sigma: b.combined, terms, notes: b.notes };
  };
}
