/**
 * The closed-form recycle-purge loop with built-in components: 100 mol/s of 95 % n-butane and
 * 5 % N2, isomerised at X = 0.3 per pass, all isobutane taken out, a fraction p of the gas purged
 * (the same loop as test/flowsheet/loop.test.ts). Closed forms: purge total = p (1-X) F (1-z) /
 * (X + p - pX) + F z; y_N2 of the recycle = R_I / (R_I + R_A) with R_I = (1-p) F z / p and
 * R_A = (1-p)(1-X) F (1-z) / (1 - (1-p)(1-X)). Tests append units or targets to it.
 */
export const BUTANE_LOOP = `components: { nC4H10: {}, iC4H10: {}, N2: {} }
feeds:
  fresh: { composition: { nC4H10: 0.95, N2: 0.05 }, molar-flow: 100 mol/s, T: 400 K, P: 10 bar }
units:
  mix: { type: mixer, in: [fresh, recycle], out: r-in }
  reactor: { type: reactor, in: r-in, out: r-out, T: 400 K, reactions: [ { equation: "nC4H10 -> iC4H10", key: nC4H10, conversion: 0.3 } ] }
  sep: { type: separator, in: r-out, out: { product: { iC4H10: 1 }, gas: rest } }
  purge-split: { type: splitter, in: gas, out: { recycle: 0.9, purge: rest } }
`;
