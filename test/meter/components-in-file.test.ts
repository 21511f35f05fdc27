import { describe, expect, it } from 'vitest';
import { validateText } from '../../src/flowsheet/validate.js';
import { findComponent } from '../../src/thermo/components.js';
import { molarMass } from '../../src/thermo/formula.js';
import { InputError } from '../../src/diagnostics.js';

const feeds = 'feeds:\n  a: { composition: { X1: 1 }, molar-flow: 1 mol/s, T: 300 K, P: 1 bar }\n';

describe('components in the file', () => {
  it('a built-in id with no body, or `library`, takes the table row', () => {
    const { model } = validateText('c.yaml', `components: { H2: {}, N2: library, CO2: }\nfeeds:\n  a: { composition: { H2: 1 }, molar-flow: 1 mol/s, T: 300 K, P: 1 bar }\n`);
    const h2 = findComponent('H2')!;
    expect(model.components[0].Tc).toBe(h2.Tc);
    expect(model.components[0].omega).toBe(h2.omega);
    expect(model.components[1].Pc).toBe(findComponent('N2')!.Pc);
    expect(model.components[2].Tc).toBe(findComponent('CO2')!.Tc);
  });

  it('an inline component with units: Tc 408.1 K, Pc 36.5 bar, omega 0.183, MW 58.12 g/mol', () => {
    const { model } = validateText('c.yaml', `components:\n  X1: { Tc: 408.1 K, Pc: 36.5 bar, omega: 0.183, MW: 58.12 g/mol, formula: C4H10 }\n${feeds}`);
    const c = model.components[0];
    expect(c.Tc).toBeCloseTo(408.1, 12);
    expect(c.Pc).toBeCloseTo(3.65e6, 6);
    expect(c.omega).toBe(0.183);
    expect(c.MW).toBeCloseTo(0.05812, 12);
    expect(model.elements[0]).toEqual({ C: 4, H: 10 });
  });

  it('MW defaults to the formula mass; a body overrides a built-in row field by field', () => {
    const { model } = validateText('c.yaml', `components:\n  X1: { Tc: 408.1 K, Pc: 36.5 bar, omega: 0.183, formula: C4H10 }\n  H2: { omega: -0.22 }\n${feeds}`);
    expect(model.components[0].MW).toBeCloseTo(molarMass('C4H10'), 12);
    expect(model.components[1].omega).toBe(-0.22);
    expect(model.components[1].Tc).toBe(findComponent('H2')!.Tc);
  });

  it('an unknown id without constants is refused with a suggestion; a bare number for Tc is refused', () => {
    let e: InputError | undefined;
    try {
      validateText('c.yaml', `components:\n  CO3: {}\n  X1: { Tc: 408.1, Pc: 36.5 bar, omega: 0.183, formula: C4H10 }\n${feeds}`);
    } catch (err) {
      e = err as InputError;
    }
    expect(e).toBeInstanceOf(InputError);
    const msgs = e!.diagnostics.map((d) => `${d.message} | ${d.help ?? ''}`);
    expect(msgs.some((m) => /unknown component `CO3`.*did you mean/.test(m))).toBe(true);
    expect(msgs.some((m) => /`408.1` has no unit/.test(m))).toBe(true);
  });
});

describe('binary interaction parameters from the file', () => {
  it('kij: { CO2/H2: 0.12 } is symmetric and changes the mixture Z (a_ij = sqrt(a_i a_j)(1 - k_ij))', async () => {
    const { makeEos } = await import('../../src/thermo/eos.js');
    const text = (kij: string) => `components: { H2: {}, CO2: {} }\nthermo: { eos: SRK${kij} }\nfeeds:\n  a: { composition: { H2: 0.5, CO2: 0.5 }, molar-flow: 1 mol/s, T: 300 K, P: 50 bar }\n`;
    const m0 = validateText('k.yaml', text('')).model;
    const m1 = validateText('k.yaml', text(', kij: { CO2/H2: 0.12 }')).model;
    expect(Array.from(m1.thermo.kij)).toEqual([0, 0.12, 0.12, 0]);
    const z0 = makeEos('SRK', m0.components, m0.thermo.kij).z(300, 5e6, [0.5, 0.5], 'stable').Z;
    const z1 = makeEos('SRK', m1.components, m1.thermo.kij).z(300, 5e6, [0.5, 0.5], 'stable').Z;
    // A positive k_ij weakens the unlike attraction: Z rises.
    expect(z1).toBeGreaterThan(z0);
  });
});

describe('a standard reference of the file\'s own', () => {
  it('takes T and P (or temperature and pressure); a failed definition gives one message, not a follow-on one', () => {
    const doc = (ref: string) => `components: { CH4: {} }
thermo:
  standards:
    contract: ${ref}
feeds:
  gas:
    composition: { CH4: 1 }
    standard-flow: { flow: 1000 m3/h, reference: contract, basis: ideal }
    T: 20 degC
    P: 40 barg
`;
    const a = validateText('s.yaml', doc('{ T: 60 degF, P: 14.73 psia }')).model;
    const b = validateText('s.yaml', doc('{ temperature: 60 degF, pressure: 14.73 psia }')).model;
    const ra = a.feeds[0].basis.kind === 'standard-flow' ? a.feeds[0].basis.reference : undefined;
    const rb = b.feeds[0].basis.kind === 'standard-flow' ? b.feeds[0].basis.reference : undefined;
    expect(ra!.T).toBeCloseTo(288.7055556, 6); // 60 degF (NIST SP 811, Appendix B: T/K = (t/degF + 459.67)/1.8)
    expect(ra!.P).toBeCloseTo(101560.0, 0); // 14.73 psia, psi = 6894.757 Pa (NIST SP 811)
    expect(rb!.T).toBe(ra!.T);
    let e: InputError | undefined;
    try {
      validateText('s.yaml', doc('{ T: 60, P: 14.73 psia }'));
    } catch (err) {
      e = err as InputError;
    }
    expect(e!.diagnostics.filter((d) => d.severity === 'error').map((d) => d.message)).toEqual(['`T` of standard reference `contract`: `60` has no unit; a temperature needs one']);
  });
});
