/**
 * Feed: a plant reading -> molar flow. The entry point of the tool.
 *
 * A gas meter reads actual volume flow Q at line T and P; the molar flow is Q / v with v the
 * real-gas molar volume Z R T / P from the file's equation of state. For a differential-
 * pressure meter set up for a design density rho_d, the indicated volume flow is corrected by
 * the square root of the density ratio (ISO 5167-1:2003, clause 4: q_m = C E eps (pi/4) d^2
 * sqrt(2 dp rho), so an instrument that takes rho_d for rho indicates q_v sqrt(rho / rho_d)):
 *   q_v,actual = q_v,indicated sqrt(rho_d / rho),  q_m = q_v,indicated sqrt(rho_d rho).
 */
import type { FeedSpec } from '../flowsheet/model.js';
import { R } from '../thermo/constants.js';
import type { Eos } from '../thermo/types.js';
import { stabilityTest } from '../thermo/stability.js';

export type FeedPhase = 'vapor' | 'liquid' | 'two-phase';

export interface FeedResult {
  name: string;
  /** Compressibility factor at the feed (meter) conditions. */
  Z: number;
  /** m3/mol at the feed (meter) conditions. */
  molarVolume: number;
  /** mol/s */
  molarFlow: number;
  /** What the ideal-gas law would have given for the same reading (volumetric bases only). */
  idealMolarFlow?: number;
  /** (ideal - real) / real. */
  idealError?: number;
  phase: FeedPhase;
  /** Component molar flows, mol/s. */
  flows: Float64Array;
  /** Mole fractions. */
  composition: Float64Array;
  T: number;
  P: number;
  /** kg/mol of the mixture. */
  molarMass: number;
  /** kg/m3 at the feed conditions. */
  density: number;
  basis: FeedSpec['basis']['kind'];
  /** For standard-flow feeds: the reference used. */
  reference?: { name: string; label: string; T: number; P: number; basis: 'real' | 'ideal' };
  /** For corrected differential-pressure meters: sqrt(rho_d / rho). */
  densityCorrection?: number;
  warnings: string[];
}

/** Mixture molar mass, kg/mol. */
export function mixtureMolarMass(eos: Eos, x: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < eos.n; i++) m += x[i] * eos.components[i].MW;
  return m;
}

/**
 * Phase of a stream at T, P: a pure component by its stable root; a mixture by the
 * tangent-plane stability test (Michelsen 1982), then the stable root.
 */
export function phaseAt(eos: Eos, T: number, P: number, x: ArrayLike<number>): FeedPhase {
  if (eos.name === 'ideal') return 'vapor';
  let nonzero = 0;
  for (let i = 0; i < eos.n; i++) if (x[i] > 0) nonzero++;
  if (nonzero > 1) {
    const st = stabilityTest(eos, T, P, x);
    if (!st.stable) return 'two-phase';
  }
  const r = eos.z(T, P, x, 'stable');
  return r.root === 'liquid' ? 'liquid' : 'vapor';
}

export function computeFeed(spec: FeedSpec, eos: Eos): FeedResult {
  const z = spec.composition;
  const { T, P } = spec;
  const warnings: string[] = [];
  const root = eos.z(T, P, z, 'stable');
  const Z = root.Z;
  const v = (Z * R * T) / P;
  const MW = mixtureMolarMass(eos, z);
  const rho = MW / v;
  const phase = phaseAt(eos, T, P, z);
  let molarFlow: number;
  let idealMolarFlow: number | undefined;
  let reference: FeedResult['reference'];
  let densityCorrection: number | undefined;
  const b = spec.basis;
  switch (b.kind) {
    case 'meter': {
      if (b.design) {
        let rhoD: number;
        let rhoDIdeal: number;
        if (b.design.density !== undefined) {
          rhoD = b.design.density;
          rhoDIdeal = rhoD;
        } else {
          const zc = b.design.composition ?? z;
          const Td = b.design.T!;
          const Pd = b.design.P!;
          const Md = mixtureMolarMass(eos, zc);
          rhoD = (Md * Pd) / (eos.z(Td, Pd, zc, 'stable').Z * R * Td);
          rhoDIdeal = (Md * Pd) / (R * Td);
        }
        densityCorrection = Math.sqrt(rhoD / rho);
        molarFlow = (b.flow * Math.sqrt(rhoD * rho)) / MW;
        const rhoIdeal = (MW * P) / (R * T);
        idealMolarFlow = (b.flow * Math.sqrt(rhoDIdeal * rhoIdeal)) / MW;
      } else {
        molarFlow = b.flow / v;
        idealMolarFlow = (b.flow * P) / (R * T);
      }
      if (phase !== 'vapor') {
        warnings.push(`feed \`${spec.name}\` is ${phase === 'liquid' ? 'liquid' : 'two-phase (gas and liquid)'} at the meter conditions (${fmt(T)} K, ${fmt(P)} Pa): a gas-meter reading is not valid there`);
      }
      break;
    }
    case 'standard-flow': {
      const ref = b.reference;
      const vIdeal = (R * ref.T) / ref.P;
      const vRef = b.realGas ? (eos.z(ref.T, ref.P, z, 'stable').Z * R * ref.T) / ref.P : vIdeal;
      molarFlow = b.flow / vRef;
      idealMolarFlow = b.flow / vIdeal;
      reference = { name: ref.name, label: ref.label, T: ref.T, P: ref.P, basis: b.realGas ? 'real' : 'ideal' };
      if (b.realGas && phaseAt(eos, ref.T, ref.P, z) !== 'vapor') {
        warnings.push(`feed \`${spec.name}\` would not be all gas at its standard reference (${ref.label}); its standard volume is not well defined`);
      }
      break;
    }
    case 'molar-flow':
      molarFlow = b.flow;
      break;
    case 'mass-flow':
      molarFlow = b.flow / MW;
      break;
    case 'flows': {
      molarFlow = 0;
      for (let i = 0; i < b.flows.length; i++) molarFlow += b.flows[i];
      break;
    }
  }
  const flows = new Float64Array(z.length);
  if (b.kind === 'flows') flows.set(b.flows);
  else for (let i = 0; i < z.length; i++) flows[i] = molarFlow * z[i];
  return {
    name: spec.name, Z, molarVolume: v, molarFlow,
    idealMolarFlow,
    idealError: idealMolarFlow !== undefined ? (idealMolarFlow - molarFlow) / molarFlow : undefined,
    phase, flows, composition: z, T, P, molarMass: MW, density: rho, basis: b.kind, reference, densityCorrection, warnings,
  };
}

function fmt(v: number): string {
  return Number(v.toPrecision(6)).toString();
}
