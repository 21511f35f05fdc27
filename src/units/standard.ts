/**
 * Standard volumetric flow: a gas volume flow referred to a stated temperature and pressure.
 *
 * A "standard" volume is a way of writing an amount of gas: n = P_ref * V_ref / (Z_ref * R * T_ref).
 * A value without its reference is meaningless, so every standard flow in loopclose carries one.
 * This file holds the references (built-in and file-defined), the spellings that name a built-in
 * reference (Nm3/h, Sm3/d, SCFM, MMSCFD, ...), and the ideal-gas conversions between a standard
 * volume flow and a molar flow. It has no dependency on mathjs: all factors are exact definitions.
 */

/** Molar gas constant, J/(mol K). CODATA 2018 (exact since the 2019 SI: R = N_A * k). */
export const R_GAS = 8.314462618;

/** A reference state for standard volumes. T in K, P in Pa (absolute). */
export interface StandardRef {
  /** Identifier, e.g. "normal", or a name defined in the flowsheet file. */
  name: string;
  /** Reference temperature, K. */
  T: number;
  /** Reference pressure, Pa (absolute). */
  P: number;
  /** Human label for reports, e.g. "0 degC, 101.325 kPa (normal, DIN 1343)". */
  label: string;
}

/** Exact length definitions. NIST SP 811 (2008), Appendix B.8: ft = 0.3048 m, in = 0.0254 m exactly. */
const FT = 0.3048;
/** Pound-force per square inch from exact definitions: lb = 0.45359237 kg, g_n = 9.80665 m/s2,
 * in = 0.0254 m (NIST SP 811 (2008), Appendix B.8; value listed there: 6.894 757 E+03 Pa). */
export const PSI = (0.45359237 * 9.80665) / (0.0254 * 0.0254);

/** Normal conditions: 0 degC, 101.325 kPa. DIN 1343:1990, "Reference conditions, normal conditions, normal volume". */
export const NORMAL: StandardRef = Object.freeze({
  name: 'normal',
  T: 273.15,
  P: 101325,
  label: '0 degC, 101.325 kPa (normal, DIN 1343)',
});

/** Standard conditions: 15 degC, 101.325 kPa. ISO 13443:1996, "Natural gas — Standard reference conditions". */
export const STANDARD_ISO: StandardRef = Object.freeze({
  name: 'standard',
  T: 288.15,
  P: 101325,
  label: '15 degC, 101.325 kPa (standard, ISO 13443)',
});

/**
 * US gas-industry standard conditions: 60 degF (288.705 K), 14.696 psia (101.325 kPa to 4 digits).
 * Common US gas-industry reference (SPE and GPA practice, from memory). US gas sales contracts
 * often use 14.73 psia instead: define a named reference for that with defineStandard.
 */
export const STANDARD_US: StandardRef = Object.freeze({
  name: 'us-standard',
  T: ((60 + 459.67) * 5) / 9,
  P: 14.696 * PSI,
  label: '60 degF, 14.696 psia (US gas industry)',
});

/** The built-in references by name. */
export const BUILTIN_STANDARDS: ReadonlyMap<string, StandardRef> = new Map(
  [NORMAL, STANDARD_ISO, STANDARD_US].map((r) => [r.name, r] as const),
);

/** The built-in references as a record: { normal, standard, 'us-standard' }. */
export const STANDARD_REFERENCES: Readonly<Record<string, StandardRef>> = Object.freeze(
  Object.fromEntries(BUILTIN_STANDARDS),
);

/** Names that can be written after "@" in a unit, e.g. "m3/h@plant". */
export const REFERENCE_NAME = /^[A-Za-z][A-Za-z0-9_.-]*$/;

function fmt(x: number): string {
  return String(Number(x.toPrecision(6)));
}

/**
 * A named reference defined by the flowsheet file, e.g. defineStandard('contract', { T: 288.706, P: 101560 }).
 * The caller parses T and P with units and checks them; this guards that they are usable
 * (finite, positive). Only names matching REFERENCE_NAME can be written after "@" in a unit
 * ("1200 m3/h@contract"); others can still be referred to by the caller.
 * Throws RangeError for an empty name or a non-positive or non-finite T or P.
 */
export function defineStandard(name: string, ref: { T: number; P: number }, label?: string): StandardRef {
  if (name.trim() === '') throw new RangeError('a standard reference needs a name');
  if (!Number.isFinite(ref.T) || ref.T <= 0) {
    throw new RangeError(`standard reference "${name}": temperature must be a positive absolute temperature, got ${ref.T} K`);
  }
  if (!Number.isFinite(ref.P) || ref.P <= 0) {
    throw new RangeError(`standard reference "${name}": pressure must be a positive absolute pressure, got ${ref.P} Pa`);
  }
  return Object.freeze({
    name,
    T: ref.T,
    P: ref.P,
    label: label ?? `${fmt(ref.T - 273.15)} degC, ${fmt(ref.P / 1000)} kPa (${name}, defined in the flowsheet)`,
  });
}

/**
 * The map to pass as UnitContext.standards: the built-in references plus those defined by the file.
 * Throws RangeError if a name is defined twice or reuses a built-in name.
 */
export function standardsWith(refs: Iterable<StandardRef>): ReadonlyMap<string, StandardRef> {
  const out = new Map(BUILTIN_STANDARDS);
  for (const r of refs) {
    if (out.has(r.name)) {
      const what = BUILTIN_STANDARDS.has(r.name) ? 'is a built-in reference' : 'is defined twice';
      throw new RangeError(`standard reference "${r.name}" ${what}; choose another name`);
    }
    out.set(r.name, r);
  }
  return out;
}

/** Look up a reference: the context's map first, then the built-ins. */
export function findStandard(name: string, standards?: ReadonlyMap<string, StandardRef>): StandardRef | undefined {
  return standards?.get(name) ?? BUILTIN_STANDARDS.get(name);
}

/** Ideal-gas molar volume at the reference, m3/mol: V = R T / P. */
export function idealMolarVolume(ref: StandardRef): number {
  return (R_GAS * ref.T) / ref.P;
}

/**
 * Molar flow (mol/s) from a standard volume flow (m3/s at ref): n = P V / (Z R T).
 * Z is the compressibility of the gas at the reference; 1 (the default) is the ideal-gas
 * convention most meter readings use. A real-gas Z at the reference comes from the thermo layer.
 */
export function molarFlowFromStandard(volumeFlow: number, ref: StandardRef, Z = 1): number {
  return (ref.P * volumeFlow) / (Z * R_GAS * ref.T);
}

/** Standard volume flow (m3/s at ref) from a molar flow (mol/s); inverse of molarFlowFromStandard. */
export function standardFromMolarFlow(molarFlow: number, ref: StandardRef, Z = 1): number {
  return (molarFlow * Z * R_GAS * ref.T) / ref.P;
}

/** Re-refer an ideal-gas standard volume flow: V_to = V_from * (P_from / T_from) * (T_to / P_to). */
export function convertStandard(volumeFlow: number, from: StandardRef, to: StandardRef): number {
  return volumeFlow * (from.P / from.T) * (to.T / to.P);
}

/** A standard-flow spelling resolved to its reference name and the factor to m3/s (at the reference). */
export interface StandardSpelling {
  refName: string;
  /** (m3/s at the reference) per (1 unit as written). */
  factor: number;
  /** 1/factor, formed as (s per time unit) / (m3 per volume unit) so it is exact where the parts are. */
  inverse: number;
}

function spelling(refName: string, m3: number, seconds: number): StandardSpelling {
  return { refName, factor: m3 / seconds, inverse: seconds / m3 };
}

/** Seconds per time unit (exact). */
const TIME: Readonly<Record<string, number>> = { s: 1, min: 60, h: 3600, hr: 3600, d: 86400, day: 86400 };

/**
 * Resolves the fixed spellings that name a built-in reference:
 *   Nm3/<t>, NL/<t> (normal, DIN 1343); Sm3/<t> (standard, ISO 13443) with <t> = s, min, h, d;
 *   SCFM, SCFH, SCFD, MMSCFD and scf/<t>, MMscf/<t> (US gas industry; MM = 10^6, common practice).
 * "Nm^3/h" and "Nm³/h" are accepted too. Case matters for the metric forms (N, S, m), not for SCF.
 * Returns undefined for anything else (including the "@name" form, which quantity.ts handles).
 */
export function matchStandardSpelling(unit: string): StandardSpelling | undefined {
  const u = unit.replace(/\s+/g, '').replace(/³/g, '3').replace(/\^3/g, '3');
  let m = /^([NS])(m3|L|l)\/(s|min|h|hr|d|day)$/.exec(u);
  if (m) {
    const vol = m[2] === 'm3' ? 1 : 1e-3;
    if (m[1] === 'S' && vol !== 1) return undefined; // "SL" is not a common spelling; keep to Sm3
    return spelling(m[1] === 'N' ? NORMAL.name : STANDARD_ISO.name, vol, TIME[m[3]]);
  }
  m = /^(MM)?SCF([MHD])$/i.exec(u);
  if (m) {
    const t = { M: 60, H: 3600, D: 86400 }[m[2].toUpperCase() as 'M' | 'H' | 'D'];
    return spelling(STANDARD_US.name, (m[1] ? 1e6 : 1) * FT ** 3, t);
  }
  m = /^(MM)?SCF\/(s|min|h|hr|d|day)$/i.exec(u);
  if (m) {
    const t = TIME[m[2].toLowerCase()];
    if (t === undefined) return undefined;
    return spelling(STANDARD_US.name, (m[1] ? 1e6 : 1) * FT ** 3, t);
  }
  return undefined;
}

/** Spellings listed in messages and by acceptedUnits('standardFlow'). */
export const STANDARD_SPELLINGS: readonly string[] = [
  'Nm3/h', 'Nm3/s', 'Nm3/d', 'NL/min', 'Sm3/h', 'Sm3/d', 'SCFM', 'SCFH', 'SCFD', 'MMSCFD',
  '<volume flow>@<reference>, e.g. m3/h@normal',
];
