import { describe, expect, it } from 'vitest';
import { lookupUnit, normalizeSpelling, tableSpellings } from '../../src/units/table.js';
import { mathjsMeaning, parseQuantity } from '../../src/units/quantity.js';

/** Relative agreement: |a - b| <= rel * max(|a|, |b|), and exact zero only against zero. */
function agree(a: number, b: number, rel = 1e-12): void {
  expect(Math.abs(a - b)).toBeLessThanOrEqual(rel * Math.max(Math.abs(a), Math.abs(b)));
}

describe('built-in unit table', () => {
  const spellings = tableSpellings();

  it('covers the units the messages list', () => {
    // A sample of the documented spellings; the full list is checked against mathjs below.
    for (const u of ['bar', 'kPa', 'psi', 'degC', 'degF', 'kmol/h', 'lbmol/h', 'kg/h', 't/d', 'm3/h', 'ft3/min', 'acfm', 'g/mol', 'kg/m3', 'L/mol', 'h']) {
      expect(spellings).toContain(u);
    }
    expect(spellings.length).toBeGreaterThan(100);
  });

  it('every entry agrees with mathjs to 1e-12 (dimension, factor, inverse, offset)', () => {
    for (const u of spellings) {
      const t = lookupUnit(u)!;
      const m = mathjsMeaning(u);
      expect(m, u).toBeDefined();
      expect(m!.dimension, u).toBe(t.dimension);
      expect(m!.gauge, u).toBe(false);
      agree(t.factor, m!.factor);
      agree(t.inverse, m!.inverse);
      if (t.offset === 0) expect(m!.offset, u).toBe(0);
      else agree(t.offset, m!.offset);
    }
  });

  it('spellings of powers and degrees are the same unit', () => {
    expect(normalizeSpelling('m^3/h')).toBe('m3/h');
    expect(normalizeSpelling('kg/m³')).toBe('kg/m3');
    expect(normalizeSpelling('°F')).toBe('degF');
    expect(normalizeSpelling('kmol / h')).toBe('kmol/h');
    expect(lookupUnit('m^3/h')).toEqual(lookupUnit('m3/h'));
  });

  it('does not answer what it does not know, nor a quantity loopclose does not take', () => {
    expect(lookupUnit('furlong/h')).toBeUndefined();
    expect(lookupUnit('kmol')).toBeUndefined(); // an amount, not a flow: mathjs names it in the message
    expect(lookupUnit('bar/h')).toBeUndefined();
    expect(lookupUnit('constructor')).toBeUndefined();
    expect(lookupUnit('toString/h')).toBeUndefined();
  });

  it('gauge pressures through the table: barg = bar + 101325 Pa (atm exact, NIST SP 811 (2008) App. B.8)', () => {
    expect(parseQuantity('30 barg', 'pressure').value).toBe(3e6 + 101325);
    expect(parseQuantity('30 bar(g)', 'pressure').value).toBe(3e6 + 101325);
    expect(parseQuantity('30 bara', 'pressure').gauge).toBeUndefined();
  });
});
