import { describe, expect, it } from 'vitest';
import { validateText, loadFlowsheet } from '../../src/flowsheet/validate.js';
import { solveFlowsheet } from '../../src/flowsheet/solve.js';
import { InputError } from '../../src/diagnostics.js';

/**
 * A linear loop with a closed-form steady state: fresh feed of reactant A (with inert I),
 * fixed per-pass conversion X of A -> B, all B removed, a fraction p of the gas purged.
 * The recycle and purge relations are those derived in Felder and Rousseau, Elementary
 * Principles of Chemical Processes, 3rd ed., Section 4.7 (recycle and purge) (from memory):
 *   R_A = (1-p)(1-X) F_A / (1 - (1-p)(1-X)),   R_I = (1-p) F_I / p,
 *   overall conversion of A = X / (1 - (1-p)(1-X)).
 */
function linearLoop(X: number, p: number, FA = 10, FI = 0.2) {
  return `
components:
  A: { Tc: 190.6 K, Pc: 46 bar, omega: 0.011, formula: C2H4 }
  B: { Tc: 305 K, Pc: 49 bar, omega: 0.1, formula: C4H8 }
  I: { Tc: 126.2 K, Pc: 34 bar, omega: 0.037, formula: N2 }
feeds:
  fresh: { flows: { A: ${FA} mol/s, I: ${FI} mol/s }, T: 300 K, P: 20 bar }
units:
  mix: { type: mixer, in: [fresh, recycle], out: r-in, T: 300 K }   # the components have no thermal data: a set T
  reactor:
    type: reactor
    in: r-in
    out: r-out
    reactions: [ { equation: "2 A -> B", key: A, conversion: ${X} } ]
  sep:
    type: separator
    in: r-out
    out: { product: { B: 1 }, gas: rest }
  split:
    type: splitter
    in: gas
    out: { purge: ${p}, recycle: rest }
`;
}

describe('recycle loop against the closed-form recycle and purge relations', () => {
  for (const [X, p] of [[0.25, 0.03], [0.1, 0.01], [0.6, 0.2]] as const) {
    it(`X = ${X}, p = ${p}: direct, Wegstein and Newton agree with the closed form to 1e-8`, () => {
      const { model } = validateText('loop.yaml', linearLoop(X, p));
      const a = (1 - p) * (1 - X);
      const RA = (a * 10) / (1 - a);
      const RI = ((1 - p) * 0.2) / p;
      for (const method of ['direct', 'wegstein', 'newton', 'auto'] as const) {
        const r = solveFlowsheet(model, { method, maxPasses: 20000 });
        expect(r.status, method).toBe('converged');
        const rec = r.streams.get('recycle')!;
        expect(Math.abs(rec.flows[0] - RA) / RA, method).toBeLessThan(1e-8);
        expect(Math.abs(rec.flows[2] - RI) / RI, method).toBeLessThan(1e-8);
        expect(Math.abs(r.loop.conversions.A.overall - X / (1 - a)), method).toBeLessThan(1e-8);
        expect(r.loop.conversions.A.singlePass).toBeCloseTo(X, 12);
        expect(r.loop.recycleRatio).toBeCloseTo((RA + RI) / 10.2, 6);
      }
    });
  }

  it('an intermediate no fresh feed carries has no overall conversion (not 0); its single-pass one is (in - out) / in', () => {
    // A -> B in the first bed (X1 = 0.9), B -> C in the second (X2 = 0.5), all B and C taken out,
    // a fraction p = 0.1 of the gas purged. Closed form as above: R_A = a F_A / (1 - a) with
    // a = (1-p)(1-X1); B reaches the second bed only from the first, so its overall conversion
    // from fresh feed, (in - out) / in with in = 0, is undefined; the second bed converts
    // X2 of the B that reaches it.
    const text = `
components:
  A: { Tc: 308.3 K, Pc: 61.4 bar, omega: 0.19, formula: C2H2 }
  B: { Tc: 282.3 K, Pc: 50.4 bar, omega: 0.087, formula: C2H4 }
  C: { Tc: 305.3 K, Pc: 48.7 bar, omega: 0.1, formula: C2H6 }
  H: { Tc: 33.2 K, Pc: 13 bar, omega: -0.216, formula: H2 }
feeds:
  fresh: { flows: { A: 10 mol/s, H: 30 mol/s }, T: 400 K, P: 20 bar }
units:
  mix: { type: mixer, in: [fresh, recycle], out: r-in, T: 400 K }
  bed1: { type: reactor, in: r-in, out: mid, reactions: [ { equation: "A + H -> B", key: A, conversion: 0.9 } ] }
  bed2: { type: reactor, in: mid, out: r-out, reactions: [ { equation: "B + H -> C", key: B, conversion: 0.5 } ] }
  sep: { type: separator, in: r-out, out: { product: { B: 1, C: 1 }, gas: rest } }
  split: { type: splitter, in: gas, out: { purge: 0.1, recycle: rest } }
`;
    const { model } = validateText('intermediate.yaml', text);
    const r = solveFlowsheet(model);
    expect(r.status).toBe('converged');
    const a = 0.9 * 0.1;
    expect(r.loop.conversions.A.overall).toBeCloseTo(0.9 / (1 - a), 9);
    expect(r.loop.conversions.B.singlePass).toBeCloseTo(0.5, 12);
    expect(Number.isNaN(r.loop.conversions.B.overall)).toBe(true);
  });

  it('a key formed and used within one reactor (sequence) reaches it from no inlet: its unit conversion is undefined, not 0', () => {
    // Stoichiometry by hand: 8 mol/s of C2H6 formed by the first reaction (0.8 of 10 C2H4), half
    // of it hydrogenolysed by the second: the reaction's own conversion is 0.5, but (in - out) / in
    // of the unit has in = 0.
    const text = `
components: { C2H4: {}, H2: {}, C2H6: {}, CH4: {} }
feeds:
  fresh: { flows: { C2H4: 10 mol/s, H2: 30 mol/s }, T: 500 K, P: 10 bar }
units:
  reactor:
    type: reactor
    in: fresh
    out: r-out
    T: 500 K
    sequence: true
    reactions:
      - { equation: "C2H4 + H2 -> C2H6", key: C2H4, conversion: 0.8 }
      - { equation: "C2H6 + H2 -> 2 CH4", key: C2H6, conversion: 0.5 }
`;
    const { model } = validateText('sequence.yaml', text);
    const r = solveFlowsheet(model);
    expect(r.status).toBe('converged');
    const u = r.units.get('reactor')!;
    expect(u.reactions![1].conversion).toBeCloseTo(0.5, 12);
    expect(u.conversions!.C2H4).toBeCloseTo(0.8, 12);
    expect(Number.isNaN(u.conversions!.C2H6)).toBe(true);
    expect(Number.isNaN(r.loop.conversions.C2H6.overall)).toBe(true);
  });

  it('fresh material joining one loop at two points: the circulating gas is counted once in the recycle ratio', () => {
    // CO2 joins at the reactor's mixer, hydrogen (with N2) after the separator; X = 0.3, p = 0.05.
    // Closed form as above, with F_C = 1, F_H = 3, F_N = 0.05 mol/s and a = (1-p)(1-X) = 0.665:
    //   R_CO2 = a F_C / (1 - a) = 1.985075; CO2 into the reactor 1 / (1 - a) = 2.985075;
    //   R_H2 = (1-p)(F_H - 3 X CO2_in) / p = 5.955224;  R_N2 = (1-p) F_N / p = 0.95;
    //   recycle ratio = (R_CO2 + R_H2 + R_N2) / (F_C + F_H + F_N) = 8.890299 / 4.05 = 2.195136.
    // The separator's gas, before the hydrogen joins it, is the same gas: summing it as well gave 3.75.
    const text = `
components: { CO2: {}, H2: {}, CH3OH: {}, H2O: {}, N2: {} }
feeds:
  co2: { flows: { CO2: 1 mol/s }, T: 500 K, P: 50 bar }
  h2: { flows: { H2: 3 mol/s, N2: 0.05 mol/s }, T: 500 K, P: 50 bar }
units:
  mix: { type: mixer, in: [co2, recycle], out: r-in }
  reactor: { type: reactor, in: r-in, out: r-out, T: 500 K, reactions: [ { equation: "CO2 + 3 H2 -> CH3OH + H2O", key: CO2, conversion: 0.3 } ] }
  sep: { type: separator, in: r-out, out: { product: { CH3OH: 1, H2O: 1 }, gas: rest } }
  mix2: { type: mixer, in: [gas, h2], out: gas2 }
  purge-split: { type: splitter, in: gas2, out: { recycle: 0.95, purge: rest } }
`;
    const { model } = validateText('two-joins.yaml', text);
    const r = solveFlowsheet(model);
    expect(r.status).toBe('converged');
    const a = 0.95 * 0.7;
    const RC = a / (1 - a);
    const RH = (0.95 * (3 - 3 * 0.3 / (1 - a))) / 0.05;
    const RN = (0.95 * 0.05) / 0.05;
    const rec = r.streams.get('recycle')!;
    expect(rec.flows[0]).toBeCloseTo(RC, 8);
    expect(rec.flows[1]).toBeCloseTo(RH, 8);
    expect(r.loop.recycles).toEqual(['recycle']);
    expect(r.loop.recycleRatio).toBeCloseTo((RC + RH + RN) / 4.05, 8);
  });

  it('Wegstein needs far fewer passes than direct substitution at a high recycle ratio', () => {
    const { model } = validateText('loop.yaml', linearLoop(0.1, 0.01));
    const d = solveFlowsheet(model, { method: 'direct', maxPasses: 20000 });
    const w = solveFlowsheet(model, { method: 'wegstein', maxPasses: 20000 });
    expect(d.passes).toBeGreaterThan(1000);
    expect(w.passes * 5).toBeLessThan(d.passes);
  });
});

describe('infeasible specifications are never printed as a solution', () => {
  it('a fixed conversion that needs more of a co-reactant than the loop supplies ends infeasible, naming it', () => {
    const { model } = validateText('x.yaml', `
components: { H2: {}, N2: {}, NH3: {} }
feeds:
  gas: { flows: { H2: 1 mol/s, N2: 1 mol/s }, T: 300 K, P: 100 bar }
units:
  r:
    type: reactor
    in: gas
    out: out
    reactions: [ { equation: "N2 + 3 H2 -> 2 NH3", key: N2, conversion: 0.9 } ]
`);
    const r = solveFlowsheet(model);
    expect(r.status).toBe('infeasible');
    expect(r.failure?.component).toBe('H2');
    expect(r.failure?.unit).toBe('r');
    expect(r.message).toMatch(/needs 2\.7 mol\/s of H2, but only 1 mol\/s/);
  });

  it('in a loop: hydrogen short of stoichiometric, the key N2 accumulates until its conversion cannot be met', () => {
    const { model } = validateText('x.yaml', `
components: { H2: {}, N2: {}, NH3: {} }
feeds:
  gas: { flows: { H2: 2 mol/s, N2: 1 mol/s }, T: 300 K, P: 100 bar }
units:
  mix: { type: mixer, in: [gas, recycle], out: r-in }
  r:
    type: reactor
    in: r-in
    out: r-out
    reactions: [ { equation: "N2 + 3 H2 -> 2 NH3", key: N2, conversion: 0.5 } ]
  sep: { type: separator, in: r-out, out: { product: { NH3: 1 }, gas-out: rest } }
  split: { type: splitter, in: gas-out, out: { purge: 0.001, recycle: rest } }
`);
    const r = solveFlowsheet(model, { maxPasses: 5000 });
    expect(r.status).not.toBe('converged');
    expect(r.message ?? '').toMatch(/H2/);
  });
});

describe('demo flowsheets', () => {
  for (const f of ['methanol-pilot', 'methanol-pilot-split', 'ammonia-loop', 'benzene-hydrogenation']) {
    it(`${f}: converges with the default method and closes every balance to 1e-9`, () => {
      const { model } = loadFlowsheet(`flowsheets/${f}.yaml`);
      const r = solveFlowsheet(model);
      expect(r.status).toBe('converged');
      for (const [id, c] of Object.entries(r.balance.components)) expect(Math.abs(c.closure), id).toBeLessThanOrEqual(1e-9);
      for (const [el, c] of Object.entries(r.balance.elements)) expect(Math.abs(c.closure), el).toBeLessThanOrEqual(1e-9);
      expect(Math.abs(r.balance.mass.closure)).toBeLessThanOrEqual(1e-9);
      for (const s of r.streams.values()) for (const v of s.flows) expect(v).toBeGreaterThanOrEqual(0);
    });
  }

  it('the methods agree on the two-loop benzene plant to 1e-8', () => {
    const { model } = loadFlowsheet('flowsheets/benzene-hydrogenation.yaml');
    expect(solveFlowsheet(model).tears.length).toBeGreaterThanOrEqual(1);
    const rs = (['direct', 'wegstein', 'newton'] as const).map((method) => solveFlowsheet(model, { method, maxPasses: 20000 }));
    for (const r of rs) expect(r.status).toBe('converged');
    for (const name of ['gas-recycle', 'benzene-recycle', 'cyclohexane']) {
      const ref = rs[2].streams.get(name)!;
      for (const r of rs) {
        const s = r.streams.get(name)!;
        s.flows.forEach((v, i) => expect(Math.abs(v - ref.flows[i]) / Math.max(ref.total, 1e-30)).toBeLessThan(1e-8));
      }
    }
  });
});

describe('reactions are checked for element balance', () => {
  it('an unbalanced equation is an input error naming the element', () => {
    let err: InputError | undefined;
    try {
      validateText('x.yaml', `
components: { CO2: {}, H2: {}, CH3OH: {}, H2O: {} }
feeds:
  gas: { flows: { H2: 3 mol/s, CO2: 1 mol/s }, T: 300 K, P: 50 bar }
units:
  r:
    type: reactor
    in: gas
    out: out
    reactions: [ { equation: "CO2 + 2 H2 -> CH3OH + H2O", key: CO2, conversion: 0.2 } ]
`);
    } catch (e) {
      err = e as InputError;
    }
    expect(err).toBeInstanceOf(InputError);
    expect(err!.diagnostics[0].message).toMatch(/not balanced in H/);
    expect(err!.diagnostics[0].span?.line).toBe(10);
  });
});

describe('repeated solves', () => {
  it('a second solve of the same model (cached runtime) gives bit-identical results to the first', () => {
    const { model } = loadFlowsheet('flowsheets/methanol-pilot.yaml');
    const a = solveFlowsheet(model);
    const b = solveFlowsheet(model, { method: 'newton' });
    const c = solveFlowsheet(model);
    expect(c.passes).toBe(a.passes);
    for (const name of a.streamOrder) expect(Array.from(c.streams.get(name)!.flows)).toEqual(Array.from(a.streams.get(name)!.flows));
    expect(b.status).toBe('converged');
    // A fresh load (new runtime) agrees exactly as well.
    const d = solveFlowsheet(loadFlowsheet('flowsheets/methanol-pilot.yaml').model);
    expect(Array.from(d.x)).toEqual(Array.from(a.x));
  });
});

describe('regressions found in review', () => {
  it('Newton solves a loop with components at zero flow that cannot leave it (their Jacobian rows are zero)', () => {
    const { model } = validateText('z.yaml', `
components: { CO: {}, C3H6: {}, CH4: {}, N2: {} }
feeds:
  feed0: { composition: { CO: 0, C3H6: 1, CH4: 0, N2: 0 }, molar-flow: 6.58 mol/s, T: 449 K, P: 20 bar }
units:
  mix: { type: mixer, in: [feed0, recycle], out: r-in }
  sep: { type: condenser, in: r-in, T: 300 K, P: 10 bar, model: split, split: { CO: 1, C3H6: 0.6, CH4: 0, N2: 0 }, vapor: recycle, liquid: product }
`);
    for (const method of ['newton', 'auto', 'direct'] as const) {
      const r = solveFlowsheet(model, { method });
      expect(r.status, method).toBe('converged');
      // Closed form: C3H6 recycle = 0.4 F / 0.6 (a loop with split fraction 0.6 to the product).
      expect(r.streams.get('recycle')!.flows[1]).toBeCloseTo((0.4 * 6.58) / 0.6, 8);
      expect(r.streams.get('recycle')!.flows[2]).toBe(0);
    }
  });

  it('an infeasible co-reactant: the help names the limiting reactant, not a purge', () => {
    const { model } = validateText('x.yaml', `
components: { H2: {}, N2: {}, NH3: {} }
feeds:
  gas: { flows: { H2: 1 mol/s, N2: 1 mol/s }, T: 300 K, P: 100 bar }
units:
  r:
    type: reactor
    in: gas
    out: out
    reactions: [ { equation: "N2 + 3 H2 -> 2 NH3", key: N2, conversion: 0.9 } ]
`);
    const r = solveFlowsheet(model);
    expect(r.failure?.help).toMatch(/H2 runs out before the key N2 reaches its conversion: make H2 the key reactant/);
    expect(r.failure?.help).not.toMatch(/purge/);
  });
});
