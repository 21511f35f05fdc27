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
 * The budget is a function passed in (FlowBudget), so that another budget (one that counts the
 * equation of state's own uncertainty against a reference equation) can replace this default.
 * The default combines, by the law of propagation of uncertainty for uncorrelated inputs
 * (JCGM 100:2008, "Guide to the expression of uncertainty in measurement", Sec. 5.1.2, eq. (10)):
 *   - the instrument's own standard uncertainty (its stated U / 2), sensitivity dF/dQ = F / Q;
 *   - the line pressure's and temperature's standard uncertainties (their instruments' U / 2),
 *     sensitivities dF/dP and dF/dT by central differences of the conversion;
 *   - the equation of state's model uncertainty: 0 here, with the note "model uncertainty not
 *     yet counted".
 * The composition used for the conversion is taken as exact (its uncertainty is not counted).
 */
import type { MeterDesign } from '../flowsheet/model.js';
import { R } from '../thermo/constants.js';
import type { Eos } from '../thermo/types.js';
import type { StandardRef } from '../units/index.js';
import type { FlowKind } from './declarations.js';

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

export const MODEL_NOT_COUNTED = 'model uncertainty not yet counted';

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

/** The default budget: instrument, line P and T (meters), model uncertainty 0 with a note. */
export const defaultFlowBudget: FlowBudget = (input) => {
  const { kind, reading, instrument, eos, composition: x } = input;
  const notes: string[] = [];
  if (kind === 'mass' || kind === 'molar') {
    return { value: reading, basis: kind === 'mass' ? 'mass' : 'molar', sigma: instrument, terms: [{ source: 'instrument', sigma: instrument }], notes };
  }
  if (kind === 'standard') {
    const ref = input.reference!;
    const F = standardMolarFlow(eos, reading, ref, input.realGas ?? true, x);
    const uQ = reading > 0 ? (F / reading) * instrument : standardMolarFlow(eos, instrument, ref, input.realGas ?? true, x);
    const terms: BudgetTerm[] = [
      { source: 'instrument', sigma: uQ },
      { source: 'equation of state', sigma: 0, note: MODEL_NOT_COUNTED },
    ];
    return { value: F, basis: 'molar', sigma: uQ, terms, notes };
  }
  // Meter.
  const line = input.line!;
  const f = (Q: number, T: number, P: number) => meterMolarFlow(eos, Q, T, P, x, input.design);
  const F = f(reading, line.T, line.P);
  const perQ = f(1, line.T, line.P);
  const uQ = perQ * instrument;
  const hP = 1e-4 * line.P;
  const hT = 1e-4 * line.T;
  const dFdP = (f(reading, line.T, line.P + hP) - f(reading, line.T, line.P - hP)) / (2 * hP);
  const dFdT = (f(reading, line.T + hT, line.P) - f(reading, line.T - hT, line.P)) / (2 * hT);
  const terms: BudgetTerm[] = [
    { source: 'instrument', sigma: uQ },
    { source: `line pressure (${line.pressureTag})`, sigma: Math.abs(dFdP) * line.uP },
    { source: `line temperature (${line.temperatureTag})`, sigma: Math.abs(dFdT) * line.uT },
    { source: 'equation of state', sigma: 0, note: MODEL_NOT_COUNTED },
  ];
  let v = 0;
  for (const t of terms) v += t.sigma * t.sigma;
  return { value: F, basis: 'molar', sigma: Math.sqrt(v), terms, notes };
};
