/**
 * Built-in table of the units loopclose documents, with exact SI factors, answered before
 * mathjs is consulted (mathjs builds its whole unit system on first use, which costs more than
 * the rest of a `loopclose meter` run). mathjs stays the fallback for every other spelling;
 * test/units/table.test.ts checks each entry against the factors NIST SP 811 lists, and against
 * mathjs for the units mathjs defines itself.
 *
 * Definitions (exact unless noted): NIST Special Publication 811, Guide for the Use of the
 * International System of Units (SI), 2008 edition, Appendix B.8 and B.9:
 *   bar = 1e5 Pa; atm = 101325 Pa; torr = 101325/760 Pa; lb = 0.45359237 kg; ft = 0.3048 m;
 *   in = 0.0254 m; psi = lbf/in2 with lbf = lb * 9.80665 m/s2; L = 1e-3 m3; t (tonne) = 1000 kg;
 *   min = 60 s; h = 3600 s; d = 86400 s; degF: T/K = (t/degF + 459.67)/1.8; degR = K/1.8;
 *   degC: T/K = t/degC + 273.15.
 *   mmHg (conventional) = 13.5951 g/cm3 * 9.80665 m/s2 * 1 mm = 133.322387415 Pa (SP 811 lists
 *   1.333 224 E+02 Pa); inHg (conventional) = 25.4 mmHg (SP 811 lists 3.386 389 E+03 Pa).
 *   lbmol = 453.59237 mol (pound-mole: lb / g). acfm = ft3/min (actual cubic feet per minute).
 *
 * A unit is a single symbol (pressure, temperature, time) or "a/b" of two symbols whose kinds
 * make one of loopclose's dimensions (kmol/h, kg/m3, L/mol...). Spellings: "m3", "m^3" and
 * "m³" are the same; "°C" is degC; spaces around "/" are ignored.
 */
import { PSI } from './standard.js';

export type TableDimension =
  | 'pressure'
  | 'temperature'
  | 'molarFlow'
  | 'massFlow'
  | 'volumeFlow'
  | 'molarMass'
  | 'density'
  | 'time'
  | 'molarVolume';

/** SI = x * factor + offset; inverse = 1/factor formed without rounding 1/factor where possible. */
export interface TableUnit {
  dimension: TableDimension;
  factor: number;
  inverse: number;
  offset: number;
}

type Kind = 'pressure' | 'temperature' | 'time' | 'amount' | 'mass' | 'volume';

const MMHG = 133.322387415;
const FT = 0.3048;

/** Symbol -> [kind, SI value of one unit]. Temperatures carry their offset separately. */
const ATOMS: Readonly<Record<string, readonly [Kind, number]>> = {
  // pressure, Pa
  Pa: ['pressure', 1],
  hPa: ['pressure', 100],
  kPa: ['pressure', 1e3],
  MPa: ['pressure', 1e6],
  bar: ['pressure', 1e5],
  mbar: ['pressure', 100],
  atm: ['pressure', 101325],
  psi: ['pressure', PSI],
  psia: ['pressure', PSI],
  mmHg: ['pressure', MMHG],
  torr: ['pressure', 101325 / 760],
  inHg: ['pressure', 25.4 * MMHG],
  // temperature, K per degree
  K: ['temperature', 1],
  degC: ['temperature', 1],
  degF: ['temperature', 5 / 9],
  degR: ['temperature', 5 / 9],
  // time, s
  s: ['time', 1],
  min: ['time', 60],
  h: ['time', 3600],
  d: ['time', 86400],
  // amount, mol
  mol: ['amount', 1],
  kmol: ['amount', 1e3],
  lbmol: ['amount', 453.59237],
  // mass, kg
  kg: ['mass', 1],
  g: ['mass', 1e-3],
  t: ['mass', 1e3],
  lb: ['mass', 0.45359237],
  // volume, m3
  m3: ['volume', 1],
  cm3: ['volume', 1e-6],
  L: ['volume', 1e-3],
  ft3: ['volume', FT * FT * FT],
};

/** Offsets of the temperature scales, K at zero on the scale. */
const T_OFFSET: Readonly<Record<string, number>> = { K: 0, degC: 273.15, degF: (459.67 * 5) / 9, degR: 0 };
/** Exact inverses of the temperature factors. */
const T_INVERSE: Readonly<Record<string, number>> = { K: 1, degC: 1, degF: 1.8, degR: 1.8 };

/** Dimension of "a/b" by the kinds of a and b. */
const RATIO: Readonly<Record<string, TableDimension>> = {
  'amount/time': 'molarFlow',
  'mass/time': 'massFlow',
  'volume/time': 'volumeFlow',
  'mass/amount': 'molarMass',
  'mass/volume': 'density',
  'volume/amount': 'molarVolume',
};

/** Whole units that are not "a/b" of two atoms. */
const WHOLE: Readonly<Record<string, TableUnit>> = {
  acfm: { dimension: 'volumeFlow', factor: (FT * FT * FT) / 60, inverse: 60 / (FT * FT * FT), offset: 0 },
};

/** Normal form of a spelling for the table: "m^3" and "m³" -> "m3", "°C" -> "degC", no spaces around "/". */
export function normalizeSpelling(unit: string): string {
  return unit
    .replace(/°\s*([CFR])\b/g, 'deg$1')
    .replace(/³/g, '3')
    .replace(/\^3/g, '3')
    .replace(/\s*\/\s*/g, '/');
}

function single(sym: string): TableUnit | undefined {
  if (!Object.hasOwn(ATOMS, sym)) return undefined;
  const [kind, v] = ATOMS[sym];
  if (kind === 'temperature') return { dimension: 'temperature', factor: v, inverse: T_INVERSE[sym], offset: T_OFFSET[sym] };
  if (kind === 'pressure' || kind === 'time') return { dimension: kind, factor: v, inverse: 1 / v, offset: 0 };
  return undefined; // an amount, mass or volume alone is not a dimension loopclose takes
}

/** The table's meaning of a unit as written, or undefined when the table does not know it. */
export function lookupUnit(unit: string): TableUnit | undefined {
  const u = normalizeSpelling(unit);
  if (Object.hasOwn(WHOLE, u)) return WHOLE[u];
  const slash = u.indexOf('/');
  if (slash < 0) return single(u);
  const a = u.slice(0, slash);
  const b = u.slice(slash + 1);
  if (!Object.hasOwn(ATOMS, a) || !Object.hasOwn(ATOMS, b)) return undefined;
  const [ka, va] = ATOMS[a];
  const [kb, vb] = ATOMS[b];
  const dimension = RATIO[`${ka}/${kb}`];
  if (dimension === undefined) return undefined;
  // Both as ratios of the parts' SI values, so toUnit(1, 'molarFlow', 'kmol/h') is exactly 3.6.
  return { dimension, factor: va / vb, inverse: vb / va, offset: 0 };
}

/** Every spelling the table answers (single symbols and "a/b" forms), in the normal form. */
export function tableSpellings(): string[] {
  const out: string[] = [];
  const syms = Object.keys(ATOMS);
  for (const a of syms) if (single(a)) out.push(a);
  for (const a of syms) for (const b of syms) if (lookupUnit(`${a}/${b}`)) out.push(`${a}/${b}`);
  out.push(...Object.keys(WHOLE));
  return out;
}
