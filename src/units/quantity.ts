/**
 * Quantities with units at the edges of loopclose: "30 barg", "12.6 m3/h", "35 degC" -> SI numbers.
 *
 * SI inside: Pa, K, mol/s, kg/s, m3/s, kg/mol, kg/m3, s, m3/mol; standard volume flows in m3/s at
 * their stated reference (see standard.ts).
 *
 * Method. The text is split into a number and a unit. The unit string is classified once and the
 * result ({dimension, factor, offset, gauge}) kept in a memo map, so SI = value * factor + offset
 * (+ the atmosphere for a gauge reading) costs a Map lookup on repeated parses. Classification
 * order: fixed standard-flow spellings and "@reference" forms (standard.ts), then the built-in
 * table of documented units (table.ts, exact definitions) with the gauge/absolute suffix rule
 * ("barg" = bar + atmosphere), then mathjs for every other spelling (with the same suffix rule).
 *
 * mathjs is loaded with only its unit machinery (create({ unitDependencies })), read from disk and
 * created on first use (mathjs-load.ts), which the table avoids for the documented units (a short
 * cold start). Units mathjs lacks or
 * defines loosely are added or replaced on that private instance.
 */
import type { MathJsInstance, Unit } from 'mathjs';
import { loadMathjs } from './mathjs-load.js';
import { PSI, R_GAS, STANDARD_SPELLINGS, findStandard, matchStandardSpelling } from './standard.js';
import type { StandardRef } from './standard.js';
import { lookupUnit } from './table.js';

export type { StandardRef } from './standard.js';

export type Dimension =
  | 'pressure'
  | 'temperature'
  | 'molarFlow'
  | 'massFlow'
  | 'volumeFlow'
  | 'standardFlow'
  | 'molarMass'
  | 'density'
  | 'dimensionless'
  | 'time'
  | 'molarVolume'
  | 'power'
  | 'molarEnergy'
  | 'molarHeatCapacity';

export interface Quantity {
  /** SI value (standard flows: m3/s at `standard`). */
  value: number;
  dimension: Dimension;
  /** The unit as written ("" for a bare number). */
  unit: string;
  /** True when the input was a gauge pressure (the atmosphere has been added to value). */
  gauge?: boolean;
  /** The reference of a standard volume flow. */
  standard?: StandardRef;
}

export interface UnitContext {
  /** Atmospheric pressure for gauge readings, Pa. Default 101325 (standard atmosphere). */
  atmosphere: number;
  /** References that "@name" units may use (see standardsWith); the built-ins are always known. */
  standards?: ReadonlyMap<string, StandardRef>;
}

export type UnitErrorKind = 'missing-unit' | 'unknown-unit' | 'wrong-dimension' | 'not-a-number';

/** A user's mistake in a quantity: message says what is wrong, help says what to write instead. */
export class UnitError extends Error {
  constructor(
    message: string,
    public help: string,
    public kind: UnitErrorKind,
  ) {
    super(message);
    this.name = 'UnitError';
  }
}

/** Standard atmosphere, Pa (exact by definition; NIST SP 811 (2008), Appendix B.8). */
export const STANDARD_ATMOSPHERE = 101325;

const DIMENSION_NAMES: Readonly<Record<Dimension, string>> = {
  pressure: 'a pressure',
  temperature: 'a temperature',
  molarFlow: 'a molar flow',
  massFlow: 'a mass flow',
  volumeFlow: 'an actual volume flow',
  standardFlow: 'a standard volume flow',
  molarMass: 'a molar mass',
  density: 'a density',
  dimensionless: 'a dimensionless number',
  time: 'a time',
  molarVolume: 'a molar volume',
  power: 'a power (a duty or a shaft power)',
  molarEnergy: 'a molar energy',
  molarHeatCapacity: 'a molar heat capacity',
};

/** SI unit of each dimension (mathjs spelling), used to take factors from mathjs. */
const SI_UNIT: Readonly<Record<Exclude<Dimension, 'standardFlow' | 'dimensionless'>, string>> = {
  pressure: 'Pa',
  temperature: 'K',
  molarFlow: 'mol/s',
  massFlow: 'kg/s',
  volumeFlow: 'm^3/s',
  molarMass: 'kg/mol',
  density: 'kg/m^3',
  time: 's',
  molarVolume: 'm^3/mol',
  power: 'W',
  molarEnergy: 'J/mol',
  molarHeatCapacity: 'J/(mol K)',
};

/** Units listed in messages and by acceptedUnits. Any other mathjs unit of the right dimension is accepted too. */
const ACCEPTED: Readonly<Record<Dimension, readonly string[]>> = {
  pressure: [
    'Pa', 'kPa', 'MPa', 'bar', 'mbar', 'atm', 'psi', 'psia', 'bara', 'mmHg', 'torr', 'inHg',
    'barg', 'mbarg', 'kPag', 'MPag', 'psig', 'bar(g)',
  ],
  temperature: ['K', 'degC', '°C', 'degF', '°F', 'degR', '°R'],
  molarFlow: ['mol/s', 'mol/min', 'mol/h', 'kmol/s', 'kmol/h', 'lbmol/h'],
  massFlow: ['kg/s', 'kg/h', 'g/s', 'lb/h', 't/h', 't/d'],
  volumeFlow: ['m3/s', 'm3/h', 'm3/d', 'L/s', 'L/min', 'ft3/min', 'ft3/h', 'acfm'],
  standardFlow: STANDARD_SPELLINGS,
  molarMass: ['g/mol', 'kg/mol', 'kg/kmol', 'lb/lbmol'],
  density: ['kg/m3', 'g/L', 'g/cm3', 'lb/ft3'],
  dimensionless: ['(no unit)', '%', 'ppm'],
  time: ['s', 'min', 'h', 'd'],
  molarVolume: ['m3/mol', 'L/mol', 'cm3/mol', 'm3/kmol', 'ft3/lbmol'],
  power: ['W', 'kW', 'MW', 'J/s', 'kJ/h', 'MJ/h', 'BTU/h'],
  molarEnergy: ['J/mol', 'kJ/mol', 'kJ/kmol', 'cal/mol', 'kcal/mol'],
  molarHeatCapacity: ['J/(mol K)', 'J/mol/K', 'kJ/(kmol K)', 'cal/(mol K)'],
};

/** The units written in messages for a dimension (not exhaustive: mathjs spellings of the same dimension also parse). */
export function acceptedUnits(d: Dimension): string[] {
  return [...ACCEPTED[d]];
}

/** Example for a missing-unit message, with the user's number. */
function example(d: Dimension, v: string): string {
  switch (d) {
    case 'pressure': return `\`${v} barg\` (gauge) or \`${v} bar\` (absolute)`;
    case 'temperature': return `\`${v} degC\` or \`${v} K\``;
    case 'molarFlow': return `\`${v} kmol/h\` or \`${v} mol/s\``;
    case 'massFlow': return `\`${v} kg/h\` or \`${v} t/h\``;
    case 'volumeFlow': return `\`${v} m3/h\` (actual, at line conditions)`;
    case 'standardFlow': return `\`${v} Nm3/h\` (0 degC, 101.325 kPa) or \`${v} SCFM\``;
    case 'molarMass': return `\`${v} g/mol\``;
    case 'density': return `\`${v} kg/m3\``;
    case 'time': return `\`${v} s\` or \`${v} h\``;
    case 'molarVolume': return `\`${v} m3/mol\` or \`${v} L/mol\``;
    case 'power': return `\`${v} kW\` or \`${v} MW\` (heat into the stream; negative when heat is removed)`;
    case 'molarEnergy': return `\`${v} kJ/mol\``;
    case 'molarHeatCapacity': return `\`${v} J/(mol K)\``;
    case 'dimensionless': return `\`${v}\``;
  }
}

// ---------------------------------------------------------------------------------------------
// mathjs instance (lazy) and the units added to it
// ---------------------------------------------------------------------------------------------

let mathInstance: MathJsInstance | undefined;

/**
 * The private mathjs instance, created on first use. Units added or replaced:
 *  - psi, psia: exact from lb = 0.45359237 kg, g_n = 9.80665 m/s2, in = 0.0254 m (NIST SP 811 (2008),
 *    App. B.8); mathjs ships a rounded psi.
 *  - mmHg: conventional, 13.5951 g/cm3 * 9.80665 m/s2 * 1 mm = 133.322387415 Pa; inHg = 25.4 mmHg
 *    (NIST SP 811 (2008), App. B.8: 1.333224 E+02 Pa, 3.386389 E+03 Pa); torr = 101325/760 Pa
 *    (NIST SP 811 (2008), App. B.8). mathjs ships 133.322 for both mmHg and torr.
 *  - lbmol = 453.59237 mol (pound-mole: lb / g), d = day (86400 s), acfm = ft^3/min.
 */
function math(): MathJsInstance {
  if (mathInstance) return mathInstance;
  const { create, unitDependencies } = loadMathjs();
  const m = create({ unitDependencies });
  m.Unit.createUnit(
    {
      psi: { definition: `${PSI} Pa` },
      psia: { definition: `${PSI} Pa` },
      mmHg: { definition: '133.322387415 Pa' },
      inHg: { definition: `${25.4 * 133.322387415} Pa` },
      torr: { definition: `${101325 / 760} Pa` },
      lbmol: { definition: '453.59237 mol' },
      d: { definition: '86400 s' },
      acfm: { definition: '1 ft^3/min' },
    },
    { override: true },
  );
  mathInstance = m;
  return m;
}

// ---------------------------------------------------------------------------------------------
// Unit classification and its memo
// ---------------------------------------------------------------------------------------------

/** What a unit string means, independent of the dimension asked for. */
type UnitInfo =
  /** SI = x * factor + offset (+ atmosphere if gauge); inverse = 1/factor computed without rounding 1/factor where possible. */
  | { kind: 'si'; dimension: Exclude<Dimension, 'standardFlow'>; factor: number; inverse: number; offset: number; gauge: boolean }
  /** Standard flow: factor to m3/s at the reference named refName (resolved per call against ctx). */
  | { kind: 'standard'; factor: number; inverse: number; refName: string }
  /** Parsed, but of a dimension loopclose does not use; `what` names it. */
  | { kind: 'other'; what: string }
  /** Not parsed; `help` says why when we know (ambiguous spellings). */
  | { kind: 'unknown'; help?: string };

/** Memo: unit string as written -> its meaning. Pure (same string, same meaning), bounded. */
const unitMemo = new Map<string, UnitInfo>();
const MEMO_LIMIT = 4096;

/** Empties the memo of parsed unit strings (for measurements of the uncached cost). */
export function clearUnitCache(): void {
  unitMemo.clear();
}

/** Spellings rejected as ambiguous, with what to write instead. */
const AMBIGUOUS: Readonly<Record<string, string>> = {
  C: '`C` is the coulomb; write `degC` or `°C` for degrees Celsius',
  F: '`F` is the farad; write `degF` or `°F` for degrees Fahrenheit',
  R: 'write `degR` or `°R` for degrees Rankine, or `K`',
  ton: '`ton` may be a short (907 kg), long (1016 kg) or metric tonne; write `t` for the metric tonne (1000 kg) or `lb`',
  tons: '`tons` may be short, long or metric; write `t` for the metric tonne (1000 kg) or `lb`',
  gal: '`gal` may be the US or the imperial gallon; write `L` or `m3`',
  gallon: '`gallon` may be the US or the imperial gallon; write `L` or `m3`',
  // No plant meters in cubic nanometres or nanolitres: `nm3/h` is a normal cubic metre miswritten.
  nm: '`nm` is the nanometre; a normal cubic metre (0 degC, 101.325 kPa) is `Nm3`, a standard volume (`Nm3/h`); an actual volume is `m3`',
  nL: '`nL` is the nanolitre; a normal litre (0 degC, 101.325 kPa) is `NL`, a standard volume (`NL/min`); an actual volume is `L`',
};

const SUPERSCRIPT: Readonly<Record<string, string>> = { '²': '^2', '³': '^3', '⁻¹': '^-1' };

/**
 * Rewrites a unit as written into mathjs syntax: "°C" -> "degC", "m3" -> "m^3", "ft3/h" -> "ft^3/h",
 * "kg/m³" -> "kg/m^3". Digits right after a unit symbol are a power (mathjs wants "^").
 */
function toMathSyntax(unit: string): string {
  return unit
    .replace(/°\s*([CFR])\b/g, 'deg$1')
    .replace(/⁻¹|²|³/g, (s) => SUPERSCRIPT[s])
    .replace(/·/g, ' ')
    .replace(/([A-Za-z])(\d+)/g, '$1^$2');
}

/** Name of a dimension vector [M, L, T, I, Theta, J, N, angle, bit] (mathjs order). */
const DIM_VECTORS: ReadonlyArray<[Exclude<Dimension, 'standardFlow'> | string, readonly number[]]> = [
  ['dimensionless', [0, 0, 0, 0, 0, 0, 0, 0, 0]],
  ['pressure', [1, -1, -2, 0, 0, 0, 0, 0, 0]],
  ['temperature', [0, 0, 0, 0, 1, 0, 0, 0, 0]],
  ['molarFlow', [0, 0, -1, 0, 0, 0, 1, 0, 0]],
  ['massFlow', [1, 0, -1, 0, 0, 0, 0, 0, 0]],
  ['volumeFlow', [0, 3, -1, 0, 0, 0, 0, 0, 0]],
  ['molarMass', [1, 0, 0, 0, 0, 0, -1, 0, 0]],
  ['density', [1, -3, 0, 0, 0, 0, 0, 0, 0]],
  ['time', [0, 0, 1, 0, 0, 0, 0, 0, 0]],
  ['molarVolume', [0, 3, 0, 0, 0, 0, -1, 0, 0]],
  // Dimensions loopclose does not take, named for messages only.
  ['a length', [0, 1, 0, 0, 0, 0, 0, 0, 0]],
  ['an area', [0, 2, 0, 0, 0, 0, 0, 0, 0]],
  ['a volume', [0, 3, 0, 0, 0, 0, 0, 0, 0]],
  ['a mass', [1, 0, 0, 0, 0, 0, 0, 0, 0]],
  ['an amount of substance', [0, 0, 0, 0, 0, 0, 1, 0, 0]],
  ['a force', [1, 1, -2, 0, 0, 0, 0, 0, 0]],
  ['power', [1, 2, -3, 0, 0, 0, 0, 0, 0]],
  ['molarEnergy', [1, 2, -2, 0, 0, 0, -1, 0, 0]],
  ['molarHeatCapacity', [1, 2, -2, 0, -1, 0, -1, 0, 0]],
  ['an energy (not a duty: add a time, e.g. kJ/h, or write W)', [1, 2, -2, 0, 0, 0, 0, 0, 0]],
  ['a velocity', [0, 1, -1, 0, 0, 0, 0, 0, 0]],
  ['an electric charge', [0, 0, 1, 1, 0, 0, 0, 0, 0]],
  ['a capacitance', [-1, -2, 4, 2, 0, 0, 0, 0, 0]],
];

const OURS = new Set<string>(Object.keys(DIMENSION_NAMES));

function nameDims(dims: readonly number[]): string {
  for (const [name, v] of DIM_VECTORS) {
    if (v.every((x, i) => (dims[i] ?? 0) === x)) return name;
  }
  const base = ['kg', 'm', 's', 'A', 'K', 'cd', 'mol', 'rad', 'bit'];
  const parts = dims.map((p, i) => (p === 0 ? '' : p === 1 ? base[i] : `${base[i]}^${p}`)).filter(Boolean);
  return `a quantity in ${parts.join(' ')}`;
}

/** mathjs parse of a valueless unit string, or undefined if mathjs does not know it. */
function mathUnit(u: string): Unit | undefined {
  try {
    return math().unit(u);
  } catch {
    return undefined;
  }
}

/**
 * SI factor of a unit without an offset, and its inverse. For "a/b" both are taken as ratios of
 * the parts' SI values (kmol/h: 1000/3600 and 3600/1000), so toUnit(1, 'molarFlow', 'kmol/h') is
 * exactly 3.6 rather than 1/(1/3.6).
 */
function factors(source: string): { factor: number; inverse: number } {
  const parts = source.split('/');
  if (parts.length === 2 && !/[()]/.test(source)) {
    const num = mathUnit(parts[0]);
    const den = mathUnit(parts[1]);
    if (num && den) {
      const a = math().unit(1, parts[0]).value;
      const b = math().unit(1, parts[1]).value;
      if (Number.isFinite(a) && Number.isFinite(b) && a > 0 && b > 0) return { factor: a / b, inverse: b / a };
    }
  }
  const f = math().unit(1, source).value;
  return { factor: f, inverse: 1 / f };
}

function classifyMath(u: Unit, source: string): UnitInfo {
  const name = nameDims(u.dimensions);
  if (!OURS.has(name)) return { kind: 'other', what: name };
  const dimension = name as Exclude<Dimension, 'standardFlow'>;
  const m = math();
  if (dimension === 'temperature') {
    // A lone temperature may have an offset (degC, degF): toNumber('K') applies it. SI = x*f + o;
    // o = T(0), f (and 1/f) from a wide span so the subtraction keeps full precision.
    const o = m.unit(0, source).toNumber('K');
    const f = (m.unit(1e6, source).toNumber('K') - o) / 1e6;
    const inv = (m.unit(1e6, 'K').toNumber(source) - m.unit(0, 'K').toNumber(source)) / 1e6;
    return { kind: 'si', dimension, factor: f, inverse: inv, offset: o, gauge: false };
  }
  // Without an offset, mathjs keeps a unit's value in SI base units (kg, m, s, mol, K).
  return { kind: 'si', dimension, ...factors(source), offset: 0, gauge: false };
}

const GAUGE_RE = /^(.+?)\s*(?:\(g\)|\(a\)|\s+g|\s+a|g|a)$/;

/** Classifies a unit as written (trimmed). Not memoised; see unitInfo. */
function classify(unit: string): UnitInfo {
  if (unit === '%') return { kind: 'si', dimension: 'dimensionless', factor: 0.01, inverse: 100, offset: 0, gauge: false };
  if (unit === 'ppm') return { kind: 'si', dimension: 'dimensionless', factor: 1e-6, inverse: 1e6, offset: 0, gauge: false };
  for (const word of toMathSyntax(unit).match(/[A-Za-z]+/g) ?? []) {
    if (Object.hasOwn(AMBIGUOUS, word)) return { kind: 'unknown', help: AMBIGUOUS[word] };
  }

  // Standard volume flow: fixed spellings, or "<actual volume flow>@<reference name>".
  const spelled = matchStandardSpelling(unit);
  if (spelled) return { kind: 'standard', factor: spelled.factor, inverse: spelled.inverse, refName: spelled.refName };
  const at = /^(.*?)\s*@\s*([A-Za-z][A-Za-z0-9_.-]*)$/.exec(unit);
  if (at) {
    const vol = unitInfo(at[1]);
    if (vol.kind === 'si' && vol.dimension === 'volumeFlow') return { kind: 'standard', factor: vol.factor, inverse: vol.inverse, refName: at[2] };
    return {
      kind: 'unknown',
      help: `before "@${at[2]}" write a volume flow such as m3/h, L/min or ft3/min`,
    };
  }

  // The built-in table of documented units (exact definitions) answers without mathjs.
  const hit = lookupUnit(unit);
  if (hit) return { kind: 'si', ...hit, gauge: false };
  const gt = GAUGE_RE.exec(unit);
  if (gt) {
    const stem = lookupUnit(gt[1]);
    if (stem && stem.dimension === 'pressure') {
      const suffix = unit.slice(gt[1].length).replace(/[\s()]/g, '');
      return { kind: 'si', ...stem, gauge: suffix === 'g' };
    }
  }
  return classifyByMathjs(unit);
}

/** The mathjs route of classify (every spelling the table does not answer). */
function classifyByMathjs(unit: string): UnitInfo {
  // mathjs reads some texts as a unit it then cannot scale (`2`, `2 m3/h`: a number inside the
  // unit); such a text is no unit of ours, not an internal error.
  try {
    return classifyByMathjsOrThrow(unit);
  } catch {
    return { kind: 'unknown' };
  }
}

function classifyByMathjsOrThrow(unit: string): UnitInfo {
  const syntax = toMathSyntax(unit);
  const parsed = mathUnit(syntax);
  const info = parsed ? classifyMath(parsed, syntax) : undefined;
  if (info && info.kind === 'si' && info.dimension === 'pressure') return info;

  // Gauge ("barg", "bar(g)", "bar g") or explicit absolute ("bara", "bar(a)") pressure.
  const g = GAUGE_RE.exec(unit);
  if (g) {
    const stem = mathUnit(toMathSyntax(g[1]));
    if (stem) {
      const s = classifyMath(stem, toMathSyntax(g[1]));
      if (s.kind === 'si' && s.dimension === 'pressure') {
        const suffix = unit.slice(g[1].length).replace(/[\s()]/g, '');
        return { ...s, gauge: suffix === 'g' };
      }
    }
  }
  return info ?? { kind: 'unknown' };
}

/**
 * What mathjs alone makes of a unit (bypassing the built-in table), for the check that the
 * table agrees with mathjs. Undefined when mathjs does not give one of loopclose's dimensions.
 */
export function mathjsMeaning(unit: string): { dimension: Dimension; factor: number; inverse: number; offset: number; gauge: boolean } | undefined {
  const info = classifyByMathjs(unit);
  if (info.kind !== 'si') return undefined;
  return { dimension: info.dimension, factor: info.factor, inverse: info.inverse, offset: info.offset, gauge: info.gauge };
}

/**
 * x * factor, or x / inverse when the inverse is an integer (12.6 m3/h: 12.6 / 3600 = 0.0035, where
 * 12.6 * (1/3600) is off in the last digit). Division by an exact integer is correctly rounded.
 */
function scale(x: number, factor: number, inverse: number): number {
  return Number.isInteger(inverse) ? x / inverse : x * factor;
}

function unitInfo(unit: string): UnitInfo {
  let info = unitMemo.get(unit);
  if (info === undefined) {
    info = classify(unit);
    if (unitMemo.size >= MEMO_LIMIT) unitMemo.clear();
    unitMemo.set(unit, info);
  }
  return info;
}

// ---------------------------------------------------------------------------------------------
// Parsing
// ---------------------------------------------------------------------------------------------

const NUMBER_RE = /^([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*(.*)$/s;

function listFor(expected: readonly Dimension[]): string {
  return expected.map((d) => `${DIMENSION_NAMES[d].replace(/^an? /, '')}: ${ACCEPTED[d].join(', ')}`).join('; ');
}

function expectedText(expected: readonly Dimension[]): string {
  return expected.map((d) => DIMENSION_NAMES[d]).join(' or ');
}

function resolveStandard(
  info: Extract<UnitInfo, { kind: 'standard' }>,
  unit: string,
  ctx: Partial<UnitContext> | undefined,
): StandardRef {
  const ref = findStandard(info.refName, ctx?.standards);
  if (ref) return ref;
  const known = [...new Set([...(ctx?.standards?.keys() ?? []), 'normal', 'standard', 'us-standard'])];
  throw new UnitError(
    `unknown standard reference "${info.refName}" in \`${unit}\``,
    `define it in the flowsheet, or use one of: ${known.join(', ')}`,
    'unknown-unit',
  );
}

function atmosphereOf(ctx: Partial<UnitContext> | undefined): number {
  const atm = ctx?.atmosphere ?? STANDARD_ATMOSPHERE;
  if (!Number.isFinite(atm)) {
    throw new UnitError(`atmospheric pressure ${atm} is not a number`, 'give the local atmosphere with a unit, e.g. `0.90 bar`', 'not-a-number');
  }
  return atm;
}

/**
 * Parses "30 barg", "12.6 m3/h", "35 degC", "-10 degF", "1.5e3 kmol/h" into an SI quantity.
 * A bare number (a number, or a string with no unit) where a dimension is expected throws
 * UnitError 'missing-unit'; 'dimensionless' accepts bare numbers. An unknown unit lists the
 * accepted units; a unit of another dimension names its dimension and the one expected.
 * Gauge pressures: absolute = gauge + ctx.atmosphere (default 101325 Pa).
 */
export function parseQuantity(
  input: string | number,
  expected: Dimension | readonly Dimension[],
  ctx?: Partial<UnitContext>,
): Quantity {
  const dims: readonly Dimension[] = typeof expected === 'string' ? [expected] : expected;
  let value: number;
  let unit: string;
  if (typeof input === 'number') {
    value = input;
    unit = '';
  } else {
    const text = input.trim().replace(/^\u2212/, '-');
    const m = NUMBER_RE.exec(text);
    if (!m) {
      throw new UnitError(
        `\`${input}\` does not start with a number`,
        `write a number then a unit, e.g. ${example(dims[0], '30')}`,
        'not-a-number',
      );
    }
    value = Number(m[1]);
    unit = m[2].trim();
    if (/^,\d/.test(unit)) {
      throw new UnitError(`\`${input}\` uses a decimal comma`, 'write a decimal point, e.g. `1.5 bar`', 'not-a-number');
    }
  }
  if (!Number.isFinite(value)) {
    throw new UnitError(`\`${input}\` is not a finite number`, `write a finite number, e.g. ${example(dims[0], '30')}`, 'not-a-number');
  }
  if (unit === '') {
    if (dims.includes('dimensionless')) return { value, dimension: 'dimensionless', unit: '' };
    throw new UnitError(
      `\`${input}\` has no unit; ${expectedText(dims)} needs one`,
      `write a unit, e.g. ${example(dims[0], String(value))}`,
      'missing-unit',
    );
  }
  const info = unitInfo(unit);
  switch (info.kind) {
    case 'si': {
      if (!dims.includes(info.dimension)) throw wrongDimension(unit, DIMENSION_NAMES[info.dimension], dims);
      const q: Quantity = { value: scale(value, info.factor, info.inverse) + info.offset, dimension: info.dimension, unit };
      if (info.gauge) {
        q.value += atmosphereOf(ctx);
        q.gauge = true;
      }
      return q;
    }
    case 'standard': {
      if (!dims.includes('standardFlow')) {
        const hint = dims.includes('volumeFlow')
          ? ' (a volume at a stated reference, not at line conditions)'
          : '';
        throw wrongDimension(unit, DIMENSION_NAMES.standardFlow + hint, dims);
      }
      const standard = resolveStandard(info, unit, ctx);
      return { value: scale(value, info.factor, info.inverse), dimension: 'standardFlow', unit, standard };
    }
    case 'other':
      throw wrongDimension(unit, info.what, dims);
    case 'unknown':
      throw new UnitError(
        `unknown unit \`${unit}\` for ${expectedText(dims)}`,
        (info.help ? `${info.help}. ` : '') + `accepted units: ${listFor(dims)}`,
        'unknown-unit',
      );
  }
}

/** What a flow of this amount would be written as (a volume, a mass or an amount without a time). */
const FLOW_OF: Readonly<Record<string, [Dimension, string]>> = {
  'a volume': ['volumeFlow', 'm3/h'],
  'a mass': ['massFlow', 'kg/h'],
  'an amount of substance': ['molarFlow', 'kmol/h'],
};

function wrongDimension(unit: string, what: string, dims: readonly Dimension[]): UnitError {
  let help = `accepted units: ${listFor(dims)}`;
  let said = what;
  const flow = FLOW_OF[what];
  if (flow && dims.includes(flow[0])) {
    // A flow without its time: the one case where adding a time is the fix.
    said = `${what}, not a flow`;
    help = `add a time, e.g. \`${flow[1]}\`. ${help}`;
  } else if (dims.includes('standardFlow') && what === DIMENSION_NAMES.volumeFlow) {
    help = `a standard flow states its reference: write Nm3/h, Sm3/h, SCFM or e.g. m3/h@normal. ${help}`;
  } else if (dims.includes('volumeFlow') && !dims.includes('standardFlow') && what.startsWith(DIMENSION_NAMES.standardFlow)) {
    help = 'a meter reads the actual volume at line pressure and temperature (m3/h, acfm); a flow in standard volume goes under `standard-flow:` of the feed, with `T:` and `P:` of the stream';
  }
  return new UnitError(`\`${unit}\` is ${said}; ${expectedText(dims)} is wanted here`, help, 'wrong-dimension');
}

// ---------------------------------------------------------------------------------------------
// Display conversions
// ---------------------------------------------------------------------------------------------

/** Factor, inverse and offset of `unit` for dimension d: SI = x*factor + offset. Throws UnitError. */
function linear(
  d: Dimension,
  unit: string,
  ctx: Partial<UnitContext> | undefined,
): { factor: number; inverse: number; offset: number } {
  const u = unit.trim();
  if (u === '' && d === 'dimensionless') return { factor: 1, inverse: 1, offset: 0 };
  const info = unitInfo(u);
  if (info.kind === 'si' && info.dimension === d) {
    return { factor: info.factor, inverse: info.inverse, offset: info.offset + (info.gauge ? atmosphereOf(ctx) : 0) };
  }
  if (info.kind === 'standard' && d === 'standardFlow') {
    resolveStandard(info, u, ctx);
    return { factor: info.factor, inverse: info.inverse, offset: 0 };
  }
  if (info.kind === 'standard' && d === 'molarFlow') {
    // A molar flow shown as a standard volume flow: the ideal-gas volume at the reference,
    // n R T_ref / P_ref (what `Nm3/h` means for a stream that need not be a gas at the reference).
    const ref = resolveStandard(info, u, ctx);
    const perMol = (R_GAS * ref.T) / ref.P;
    const factor = info.factor / perMol;
    return { factor, inverse: 1 / factor, offset: 0 };
  }
  parseQuantity(`1 ${u}`, d, ctx); // throws the UnitError that says what is wrong
  throw new UnitError(`\`${unit}\` cannot display ${DIMENSION_NAMES[d]}`, `accepted units: ${listFor([d])}`, 'wrong-dimension');
}

/**
 * The reference a display unit of molar flow stands for, when it is a standard volume flow
 * (`Nm3/h`): reports name it beside the numbers. undefined for a molar unit.
 */
export function standardOfFlowUnit(unit: string, ctx?: Partial<UnitContext>): StandardRef | undefined {
  const info = unitInfo(unit.trim());
  return info.kind === 'standard' ? resolveStandard(info, unit.trim(), ctx) : undefined;
}

/** Checks a display unit of molar flows: a molar unit, or a standard volume flow (ideal-gas basis). Throws UnitError. */
export function checkFlowDisplayUnit(unit: string, ctx?: Partial<UnitContext>): void {
  linear('molarFlow', unit, ctx);
}

/**
 * SI value -> number in a display unit, e.g. toUnit(1, 'molarFlow', 'kmol/h') = 3.6.
 * Gauge units are allowed for pressure (ctx.atmosphere). For 'standardFlow' the SI value is m3/s
 * at the unit's own reference; to change reference use convertStandard (standard.ts).
 */
export function toUnit(valueSI: number, d: Dimension, unit: string, ctx?: Partial<UnitContext>): number {
  const { factor, inverse, offset } = linear(d, unit, ctx);
  const x = valueSI - offset;
  return Number.isInteger(factor) ? x / factor : x * inverse;
}

/** Number in a unit -> SI value; the inverse of toUnit. */
export function fromUnit(value: number, d: Dimension, unit: string, ctx?: Partial<UnitContext>): number {
  const { factor, inverse, offset } = linear(d, unit, ctx);
  return scale(value, factor, inverse) + offset;
}
