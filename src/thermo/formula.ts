/**
 * Chemical-formula parser and molar mass.
 *
 * Grammar (recursive descent, one pass, no backtracking):
 *
 *   formula := part+
 *   part    := element count? | '(' formula ')' count?
 *   element := capital letter [lower-case letter]
 *   count   := positive integer without leading zeros
 *
 * This covers plain formulas ("C4H10"), condensed structural formulas ("CH3COOH",
 * "CH3OCH3") and groups with multipliers ("CH3(CH2)2CH3", "Ca(OH)2", nested groups).
 * A lower-case letter always belongs to the symbol before it (chemical convention), so
 * "Co" is cobalt and "CO" is carbon + oxygen.
 *
 * Atomic weights: IUPAC standard atomic weights (CIAAW 2021; conventional values), i.e.
 * the single values CIAAW gives for elements whose standard atomic weight is an interval
 * (H, C, N, O, Mg, Si, S, Cl, Ar, Br, ...), and the standard values for the others.
 */

/**
 * Atomic weights in g/mol (numerically, relative atomic masses).
 * Source: IUPAC standard atomic weights (CIAAW 2021; conventional values), from memory.
 */
export const ATOMIC_WEIGHTS: Readonly<Record<string, number>> = Object.freeze({
  H: 1.008,
  He: 4.002602,
  Li: 6.94,
  B: 10.81,
  C: 12.011,
  N: 14.007,
  O: 15.999,
  F: 18.998403162,
  Ne: 20.1797,
  Na: 22.98976928,
  Mg: 24.305,
  Al: 26.9815384,
  Si: 28.085,
  P: 30.973761998,
  S: 32.06,
  Cl: 35.45,
  Ar: 39.95,
  K: 39.0983,
  Ca: 40.078,
  Ti: 47.867,
  Cr: 51.9961,
  Mn: 54.938043,
  Fe: 55.845,
  Co: 58.933194,
  Ni: 58.6934,
  Cu: 63.546,
  Zn: 65.38,
  Se: 78.971,
  Br: 79.904,
  Kr: 83.798,
  Ag: 107.8682,
  Sn: 118.71,
  I: 126.90447,
  Xe: 131.293,
  Pt: 195.084,
  Hg: 200.592,
  Pb: 207.2,
});

/** A formula that cannot be parsed. `position` is the 1-based character where the problem is. */
export class FormulaError extends Error {
  readonly formula: string;
  readonly position: number;
  constructor(formula: string, position: number, problem: string) {
    super(`formula "${formula}", character ${position}: ${problem}`);
    this.name = 'FormulaError';
    this.formula = formula;
    this.position = position;
  }
}

const isUpper = (c: string): boolean => c >= 'A' && c <= 'Z';
const isLower = (c: string): boolean => c >= 'a' && c <= 'z';
const isDigit = (c: string): boolean => c >= '0' && c <= '9';

/**
 * Element counts of a formula, e.g. parseFormula("CH3COOH") -> { C: 2, H: 4, O: 2 }.
 * Keys appear in the order the elements are first met. Throws FormulaError on unknown
 * element symbols or bad syntax.
 */
export function parseFormula(formula: string): Record<string, number> {
  if (typeof formula !== 'string' || formula.length === 0) {
    throw new FormulaError(String(formula ?? ''), 1, 'the formula is empty');
  }
  let i = 0; // index of the next unread character
  const fail = (at: number, problem: string): never => {
    throw new FormulaError(formula, at + 1, problem);
  };

  /** Reads an optional count at i; returns 1 when there is none. */
  const readCount = (): number => {
    if (i >= formula.length || !isDigit(formula[i])) return 1;
    const start = i;
    while (i < formula.length && isDigit(formula[i])) i++;
    const text = formula.slice(start, i);
    if (text[0] === '0') {
      fail(start, `count "${text}" must be a positive whole number without a leading zero`);
    }
    return Number(text);
  };

  const add = (into: Record<string, number>, el: string, n: number): void => {
    into[el] = (into[el] ?? 0) + n;
  };

  /** Parses parts until the end or a ')' (left unread). `openAt` is the '(' index or -1. */
  const readGroup = (openAt: number): Record<string, number> => {
    const counts: Record<string, number> = {};
    let parts = 0;
    while (i < formula.length) {
      const c = formula[i];
      if (c === ')') {
        if (openAt < 0) fail(i, `")" has no matching "("`);
        break;
      }
      if (c === '(') {
        const open = i;
        i++;
        const inner = readGroup(open);
        if (i >= formula.length) fail(open, `"(" is never closed`);
        if (Object.keys(inner).length === 0) fail(open, 'empty parentheses "()"');
        i++; // the ')'
        const n = readCount();
        for (const el of Object.keys(inner)) add(counts, el, inner[el] * n);
        parts++;
        continue;
      }
      if (isUpper(c)) {
        const start = i;
        i++;
        if (i < formula.length && isLower(formula[i])) i++;
        const symbol = formula.slice(start, i);
        if (!Object.prototype.hasOwnProperty.call(ATOMIC_WEIGHTS, symbol)) {
          fail(start, `unknown element symbol "${symbol}"`);
        }
        add(counts, symbol, readCount());
        parts++;
        continue;
      }
      if (isLower(c)) {
        fail(i, `"${c}" cannot start an element symbol; symbols start with a capital letter (e.g. "${c.toUpperCase()}")`);
      }
      if (isDigit(c)) {
        fail(i, `count "${c}" does not follow an element symbol or ")"`);
      }
      if (c === ' ' || c === '\t') fail(i, 'spaces are not allowed inside a formula');
      fail(i, `unexpected character "${c}"`);
    }
    if (openAt < 0 && parts === 0) fail(0, 'the formula has no element symbols');
    return counts;
  };

  const result = readGroup(-1);
  return result;
}

/**
 * Molar mass in kg/mol of a formula (string) or of element counts, from ATOMIC_WEIGHTS.
 * M = sum_i n_i * A_r,i * 1e-3 kg/mol.
 */
export function molarMass(formula: string | Readonly<Record<string, number>>): number {
  const counts = typeof formula === 'string' ? parseFormula(formula) : formula;
  let gPerMol = 0;
  for (const el of Object.keys(counts)) {
    const w = ATOMIC_WEIGHTS[el];
    if (w === undefined) {
      throw new FormulaError(typeof formula === 'string' ? formula : el, 1, `unknown element symbol "${el}"`);
    }
    gPerMol += counts[el] * w;
  }
  return gPerMol * 1e-3;
}
