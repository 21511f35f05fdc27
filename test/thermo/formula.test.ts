import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { ATOMIC_WEIGHTS, FormulaError, molarMass, parseFormula } from '../../src/thermo/formula.js';

/** Catches the error a call throws, for checking its fields. */
function errorOf(f: () => unknown): FormulaError {
  try {
    f();
  } catch (e) {
    if (e instanceof FormulaError) return e;
    throw e;
  }
  throw new Error('expected a FormulaError, nothing was thrown');
}

describe('parseFormula', () => {
  it('reads plain formulas with single- and multi-digit counts', () => {
    expect(parseFormula('H2O')).toEqual({ H: 2, O: 1 });
    expect(parseFormula('C12H22O11')).toEqual({ C: 12, H: 22, O: 11 });
    expect(parseFormula('Ar')).toEqual({ Ar: 1 });
  });

  it('adds repeated elements in condensed formulas', () => {
    expect(parseFormula('CH3COOH')).toEqual({ C: 2, H: 4, O: 2 });
    expect(parseFormula('CH3OCH3')).toEqual({ C: 2, H: 6, O: 1 });
    expect(parseFormula('C2H5OH')).toEqual({ C: 2, H: 6, O: 1 });
  });

  it('multiplies parenthesised groups, nested too', () => {
    expect(parseFormula('CH3(CH2)2CH3')).toEqual({ C: 4, H: 10 });
    expect(parseFormula('Ca(OH)2')).toEqual({ Ca: 1, O: 2, H: 2 });
    expect(parseFormula('Al2(SO4)3')).toEqual({ Al: 2, S: 3, O: 12 });
    expect(parseFormula('K4(Fe(CN)6)')).toEqual({ K: 4, Fe: 1, C: 6, N: 6 });
    expect(parseFormula('(CH3)3CH')).toEqual({ C: 4, H: 10 });
  });

  it('keeps a lower-case letter with the symbol before it: Co is cobalt, CO is carbon and oxygen', () => {
    expect(parseFormula('Co')).toEqual({ Co: 1 });
    expect(parseFormula('CO')).toEqual({ C: 1, O: 1 });
    expect(parseFormula('Cl2')).toEqual({ Cl: 2 });
  });

  it('round-trips random element counts written out as formulas (fixed seed)', () => {
    const symbols = Object.keys(ATOMIC_WEIGHTS);
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.constantFrom(...symbols), fc.integer({ min: 1, max: 40 })), { minLength: 1, maxLength: 8 }),
        fc.integer({ min: 1, max: 5 }),
        (parts, times) => {
          const expected: Record<string, number> = {};
          for (const [el, n] of parts) expected[el] = (expected[el] ?? 0) + n * times;
          const body = parts.map(([el, n]) => (n === 1 ? el : `${el}${n}`)).join('');
          const text = times === 1 ? body : `(${body})${times}`;
          expect(parseFormula(text)).toEqual(expected);
        },
      ),
      { seed: 20240611, numRuns: 300 },
    );
  });

  it.each([
    ['', 1, /empty/],
    ['Xx2', 1, /unknown element symbol "Xx"/],
    ['CH3Q', 4, /unknown element symbol "Q"/],
    ['H2O)', 4, /no matching "\("/],
    ['Ca(OH2', 3, /never closed/],
    ['H()2', 2, /empty parentheses/],
    ['H0', 2, /positive whole number/],
    ['H02', 2, /leading zero/],
    ['2H2O', 1, /does not follow an element symbol/],
    ['h2o', 1, /capital letter/],
    ['C H4', 2, /spaces/],
    ['H2O+', 4, /unexpected character "\+"/],
  ])('rejects %j with a FormulaError at character %i', (text, position, message) => {
    const e = errorOf(() => parseFormula(text));
    expect(e).toBeInstanceOf(Error);
    expect(e.name).toBe('FormulaError');
    expect(e.position).toBe(position);
    expect(e.message).toMatch(message);
    expect(e.message).toContain(`character ${position}`);
  });
});

describe('ATOMIC_WEIGHTS', () => {
  it('holds the elements the component table and common catalysts need', () => {
    for (const el of ['H', 'He', 'C', 'N', 'O', 'F', 'Ne', 'Na', 'Mg', 'Al', 'Si', 'P', 'S', 'Cl', 'Ar', 'K', 'Ca', 'Fe', 'Cu', 'Zn', 'Br', 'Kr', 'Xe', 'I']) {
      expect(ATOMIC_WEIGHTS[el], el).toBeGreaterThan(0);
    }
  });

  it('matches spot values of the IUPAC standard atomic weights (CIAAW 2021; conventional values) (from memory)', () => {
    expect(ATOMIC_WEIGHTS.H).toBe(1.008); // CIAAW conventional value (from memory)
    expect(ATOMIC_WEIGHTS.C).toBe(12.011); // CIAAW conventional value (from memory)
    expect(ATOMIC_WEIGHTS.N).toBe(14.007); // CIAAW conventional value (from memory)
    expect(ATOMIC_WEIGHTS.O).toBe(15.999); // CIAAW conventional value (from memory)
    expect(ATOMIC_WEIGHTS.S).toBe(32.06); // CIAAW conventional value (from memory)
    expect(ATOMIC_WEIGHTS.Cl).toBe(35.45); // CIAAW conventional value (from memory)
  });

  it('increases with atomic number across the table (a slip in a digit would usually break this)', () => {
    // Order by atomic number; the only inversions in nature among these are Ar/K and Co/Ni.
    const order = ['H', 'He', 'Li', 'B', 'C', 'N', 'O', 'F', 'Ne', 'Na', 'Mg', 'Al', 'Si', 'P', 'S', 'Cl', 'K', 'Ca', 'Ti', 'Cr', 'Mn', 'Fe', 'Ni', 'Cu', 'Zn', 'Se', 'Br', 'Kr', 'Ag', 'Sn', 'I', 'Xe', 'Pt', 'Hg', 'Pb'];
    for (let i = 1; i < order.length; i++) {
      expect(ATOMIC_WEIGHTS[order[i]], `${order[i - 1]} < ${order[i]}`).toBeGreaterThan(ATOMIC_WEIGHTS[order[i - 1]]);
    }
  });
});

describe('molarMass', () => {
  it('returns kg/mol', () => {
    // 2 x 1.008 + 15.999 = 18.015 g/mol from the CIAAW conventional values
    expect(molarMass('H2O')).toBeCloseTo(0.018015, 9);
    // 12.011 + 2 x 15.999 = 44.009 g/mol
    expect(molarMass('CO2')).toBeCloseTo(0.044009, 9);
  });

  it('agrees with tabulated molar masses', () => {
    // Poling, Prausnitz and O'Connell, The Properties of Gases and Liquids, 5th ed., Appendix A (from memory): CH4 16.043, NH3 17.031, C6H6 78.114 g/mol
    expect(Math.abs(molarMass('CH4') / 0.016043 - 1)).toBeLessThan(5e-4);
    expect(Math.abs(molarMass('NH3') / 0.017031 - 1)).toBeLessThan(5e-4);
    expect(Math.abs(molarMass('C6H6') / 0.078114 - 1)).toBeLessThan(5e-4);
  });

  it('gives the same mass for a formula and for its condensed or grouped forms', () => {
    expect(molarMass('CH3(CH2)2CH3')).toBeCloseTo(molarMass('C4H10'), 12);
    expect(molarMass('CH3COOH')).toBeCloseTo(molarMass('C2H4O2'), 12);
  });

  it('accepts element counts and rejects unknown symbols in them', () => {
    expect(molarMass({ N: 2 })).toBeCloseTo(0.028014, 9);
    expect(() => molarMass({ Zz: 1 })).toThrow(FormulaError);
    expect(() => molarMass('Zz')).toThrow(/unknown element symbol "Zz"/);
  });
});
