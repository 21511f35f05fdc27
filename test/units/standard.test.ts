import { describe, expect, it } from 'vitest';
import {
  NORMAL,
  STANDARD_ISO,
  STANDARD_US,
  R_GAS,
  UnitError,
  convertStandard,
  defineStandard,
  idealMolarVolume,
  molarFlowFromStandard,
  parseQuantity,
  standardFromMolarFlow,
  standardsWith,
  toUnit,
  STANDARD_REFERENCES,
} from '../../src/units/index.js';

function close(a: number, b: number, rel = 1e-12): void {
  expect(Math.abs(a - b)).toBeLessThanOrEqual(rel * Math.abs(b));
}

const FT3 = 0.3048 ** 3; // ft = 0.3048 m exactly (NIST SP 811, 2008, Appendix B)
const PSI = (0.45359237 * 9.80665) / 0.0254 ** 2; // lbf/in2 from exact definitions (NIST SP 811, 2008, Appendix B)

describe('built-in references', () => {
  it('normal: 0 degC, 101.325 kPa (DIN 1343)', () => {
    expect(NORMAL.T).toBe(273.15);
    expect(NORMAL.P).toBe(101325);
    expect(NORMAL.label).toContain('DIN 1343');
  });
  it('standard: 15 degC, 101.325 kPa (ISO 13443)', () => {
    expect(STANDARD_ISO.T).toBe(288.15);
    expect(STANDARD_ISO.P).toBe(101325);
    expect(STANDARD_ISO.label).toContain('ISO 13443');
  });
  it('US gas industry: 60 degF = 288.7056 K, 14.696 psia = 101.325 kPa to 6 digits', () => {
    close(STANDARD_US.T, (60 + 459.67) / 1.8); // NIST SP 811 (2008), Appendix B: T/K = (t/degF + 459.67)/1.8
    close(STANDARD_US.P, 14.696 * PSI);
    expect(Math.abs(STANDARD_US.P - 101325)).toBeLessThan(0.5);
  });
  it('the record of built-ins holds all three by name', () => {
    expect(Object.keys(STANDARD_REFERENCES).sort()).toEqual(['normal', 'standard', 'us-standard']);
  });
});

describe('ideal-gas molar volume at the references', () => {
  it('R = 8.314462618 J/(mol K) (CODATA 2018, exact)', () => {
    expect(R_GAS).toBe(8.314462618);
  });
  it('22.414 L/mol at 0 degC, 101.325 kPa (CODATA 2018: 22.413 969 54 L/mol, from memory)', () => {
    close(idealMolarVolume(NORMAL), (8.314462618 * 273.15) / 101325);
    close(idealMolarVolume(NORMAL), 22.41396954e-3, 1e-9);
    expect(idealMolarVolume(NORMAL) * 1e3).toBeCloseTo(22.414, 3);
  });
  it('23.645 L/mol at 15 degC, 101.325 kPa (R T / P with CODATA 2018 R)', () => {
    close(idealMolarVolume(STANDARD_ISO), (8.314462618 * 288.15) / 101325);
    expect(idealMolarVolume(STANDARD_ISO) * 1e3).toBeCloseTo(23.645, 3);
  });
  it('379.5 scf/lbmol at 60 degF, 14.696 psia (GPSA Engineering Data Book, Section 1, from memory)', () => {
    const scfPerLbmol = (idealMolarVolume(STANDARD_US) * 453.59237) / FT3;
    expect(Math.abs(scfPerLbmol - 379.49)).toBeLessThan(0.05);
  });
});

describe('standard flow spellings', () => {
  it('Nm3/h, Nm3/s, Nm3/d and NL/min at normal conditions', () => {
    const q = parseQuantity('3600 Nm3/h', 'standardFlow');
    expect(q.value).toBe(1);
    expect(q.dimension).toBe('standardFlow');
    expect(q.standard).toEqual(NORMAL);
    expect(parseQuantity('2 Nm3/s', 'standardFlow').value).toBe(2);
    close(parseQuantity('86400 Nm3/d', 'standardFlow').value, 1);
    close(parseQuantity('60 NL/min', 'standardFlow').value, 1e-3);
    expect(parseQuantity('1 Nm^3/h', 'standardFlow').standard?.name).toBe('normal');
  });
  it('Sm3/h and Sm3/d at ISO 13443 standard conditions', () => {
    const q = parseQuantity('3600 Sm3/h', 'standardFlow');
    expect(q.value).toBe(1);
    expect(q.standard?.name).toBe('standard');
    close(parseQuantity('86400 Sm3/d', 'standardFlow').value, 1);
  });
  it('SCFM, SCFH, SCFD, MMSCFD at 60 degF, 14.696 psia (ft3 = 0.028316846592 m3 exactly)', () => {
    close(parseQuantity('60 SCFM', 'standardFlow').value, FT3);
    close(parseQuantity('3600 SCFH', 'standardFlow').value, FT3);
    close(parseQuantity('86400 SCFD', 'standardFlow').value, FT3);
    close(parseQuantity('1 MMSCFD', 'standardFlow').value, (1e6 * FT3) / 86400);
    close(parseQuantity('1 MMscf/d', 'standardFlow').value, (1e6 * FT3) / 86400);
    close(parseQuantity('1 scfm', 'standardFlow').value, FT3 / 60);
    expect(parseQuantity('1 SCFM', 'standardFlow').standard?.label).toContain('14.696 psia');
  });
  it('1 MMSCFD is about 1195 kmol/h of ideal gas (from 379.49 scf/lbmol, GPSA, from memory)', () => {
    const q = parseQuantity('1 MMSCFD', 'standardFlow');
    const kmolPerH = (molarFlowFromStandard(q.value, q.standard!) * 3600) / 1000;
    const expected = ((1e6 / 379.49 / 24) * 453.59237) / 1000; // lbmol/h -> kmol/h
    expect(Math.abs(kmolPerH - expected) / expected).toBeLessThan(2e-4);
  });
  it('toUnit displays a standard flow in its own reference', () => {
    close(toUnit(1, 'standardFlow', 'Nm3/h'), 3600);
    close(toUnit(FT3, 'standardFlow', 'SCFM'), 60);
  });
});

describe('references defined by the flowsheet', () => {
  const plant = defineStandard('plant', { T: 293.15, P: 101325 });
  const ctx = { standards: standardsWith([plant]) };

  it('a label is made from T and P', () => {
    expect(plant.label).toBe('20 degC, 101.325 kPa (plant, defined in the flowsheet)');
  });
  it('"m3/h@name" uses the named reference; the built-ins remain', () => {
    const q = parseQuantity('3600 m3/h@plant', 'standardFlow', ctx);
    expect(q.value).toBe(1);
    expect(q.standard).toEqual(plant);
    expect(parseQuantity('100 ft3/min @ plant', 'standardFlow', ctx).standard?.T).toBe(293.15);
    expect(parseQuantity('3600 m3/h@normal', 'standardFlow', ctx).standard).toEqual(NORMAL);
  });
  it('the same unit string under another context resolves to that context\'s reference', () => {
    const other = defineStandard('plant', { T: 300, P: 1e5 });
    const q1 = parseQuantity('1 m3/h@plant', 'standardFlow', ctx);
    const q2 = parseQuantity('1 m3/h@plant', 'standardFlow', { standards: standardsWith([other]) });
    expect(q1.standard?.T).toBe(293.15);
    expect(q2.standard?.T).toBe(300);
  });
  it('an unknown reference name is an unknown-unit error naming the known ones', () => {
    try {
      parseQuantity('1 m3/h@site', 'standardFlow', ctx);
      throw new Error('expected a UnitError');
    } catch (e) {
      expect(e).toBeInstanceOf(UnitError);
      expect((e as UnitError).kind).toBe('unknown-unit');
      expect((e as UnitError).help).toContain('plant');
      expect((e as UnitError).help).toContain('normal');
    }
  });
  it('a mass flow before "@" is refused', () => {
    expect(() => parseQuantity('1 kg/h@plant', 'standardFlow', ctx)).toThrow(UnitError);
  });
  it('bad references are refused', () => {
    expect(() => defineStandard('cold', { T: 0, P: 101325 })).toThrow(RangeError);
    expect(() => defineStandard('vac', { T: 273.15, P: -1 })).toThrow(RangeError);
    expect(() => defineStandard('nan', { T: NaN, P: 101325 })).toThrow(RangeError);
    expect(() => standardsWith([defineStandard('normal', { T: 273.15, P: 1e5 })])).toThrow(/built-in/);
    expect(() => standardsWith([plant, plant])).toThrow(/twice/);
  });
});

describe('conversions between references and moles', () => {
  it('n = P V / (Z R T) and back', () => {
    const n = molarFlowFromStandard(1, NORMAL);
    close(n, 101325 / (R_GAS * 273.15));
    close(standardFromMolarFlow(n, NORMAL), 1);
    close(molarFlowFromStandard(1, NORMAL, 0.9994), n / 0.9994);
  });
  it('1 Nm3 = 288.15/273.15 Sm3 for an ideal gas (same pressure)', () => {
    close(convertStandard(1, NORMAL, STANDARD_ISO), 288.15 / 273.15);
    close(convertStandard(convertStandard(2.5, NORMAL, STANDARD_US), STANDARD_US, NORMAL), 2.5);
  });
});
