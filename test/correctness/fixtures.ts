/** Small flowsheets for the correctness tests (invented scenarios, built for the checks). */

/** The methanol pilot loop with a splitter written as two numbers. */
export const methanolNumericSplit = `
title: methanol loop, numeric splitter
components: { H2: {}, N2: {}, CO2: {}, H2O: {}, CH3OH: {} }
thermo: { eos: SRK }
feeds:
  hydrogen:
    composition: { H2: 0.985, N2: 0.015 }
    meter: { flow: 12.6 m3/h, pressure: 30 barg, temperature: 35 degC }
  carbon-dioxide:
    composition: { CO2: 0.995, N2: 0.005 }
    meter: { flow: 3.2 m3/h, pressure: 30 barg, temperature: 25 degC }
units:
  mix: { type: mixer, in: [hydrogen, carbon-dioxide, recycle], out: reactor-in }
  reactor:
    type: reactor
    in: reactor-in
    out: reactor-out
    T: 250 degC
    reactions:
      - { equation: "CO2 + 3 H2 -> CH3OH + H2O", key: CO2, conversion: 0.25 }
  cooler: { type: condenser, in: reactor-out, T: 40 degC, P: 29 barg, vapor: loop-gas, liquid: crude-methanol }
  purge-split:
    type: splitter
    in: loop-gas
    out: { recycle: 0.98, purge: 0.02 }
`;

/** Two reactors in a row; the first has parallel reactions on CO with conversions C1 and C2. */
export const parallelConversions = (c1: number, c2: number, lead = '') => `${lead}components: { CO: {}, H2: {}, CH3OH: {}, H2O: {}, CO2: {}, CH4: {} }
thermo: { eos: SRK }
feeds:
  f: { flows: { CO: 1 mol/s, H2: 3 mol/s, H2O: 1 mol/s }, T: 500 K, P: 50 bar }
units:
  r1:
    type: reactor
    in: f
    out: r1-out
    reactions:
      - { equation: "CO + 2 H2 -> CH3OH", key: CO, conversion: ${c1} }
      - { equation: "CO + H2O -> CO2 + H2", key: CO, conversion: ${c2} }
  r2:
    type: reactor
    in: r1-out
    out: r2-out
    reactions:
      - { equation: "CO + 3 H2 -> CH4 + H2O", key: CO, conversion: 0.1 }
`;

/** An inert trapped in a loop (the structure check refuses it); its error is on the splitter line. */
export const trappedInert = (lead = '') => `${lead}components: { H2: {}, N2: {}, NH3: {}, Ar: {} }
thermo: { eos: SRK }
feeds:
  makeup: { composition: { H2: 0.74, N2: 0.25, Ar: 0.01 }, molar-flow: 10 mol/s, T: 40 degC, P: 150 bar }
units:
  mix: { type: mixer, in: [makeup, recycle], out: c-in }
  c:
    type: reactor
    in: c-in
    out: c-out
    reactions:
      - { equation: "N2 + 3 H2 -> 2 NH3", key: N2, conversion: 0.2 }
  sep: { type: separator, in: c-out, out: { product: { NH3: 1 }, gas: rest } }
  split:
    type: splitter
    in: gas
    out: { purge: 0, recycle: rest }
`;

/** Two reactions on one key in sequence: 0.08 then 0.02. */
export const sequenceOnOneKey = `
components: { CO: {}, H2: {}, CH3OH: {}, H2O: {}, CO2: {} }
thermo: { eos: SRK }
feeds:
  f: { flows: { CO: 10 mol/s, H2: 25 mol/s, H2O: 5 mol/s }, T: 500 K, P: 50 bar }
units:
  r:
    type: reactor
    in: f
    out: r-out
    sequence: true
    reactions:
      - { equation: "CO + 2 H2 -> CH3OH", key: CO, conversion: 0.08 }
      - { equation: "CO + H2O -> CO2 + H2", key: CO, conversion: 0.02 }
`;

/** A methanol loop whose gas returns whole (no purge), hydrogen fed above what the reaction uses. */
export const noWayOut = `
components: { H2: {}, CO2: {}, H2O: {}, CH3OH: {} }
thermo: { eos: SRK }
feeds:
  hydrogen: { flows: { H2: 4 mol/s }, T: 35 degC, P: 31 bar }
  carbon-dioxide: { flows: { CO2: 1 mol/s }, T: 25 degC, P: 31 bar }
units:
  mix: { type: mixer, in: [hydrogen, carbon-dioxide, recycle], out: reactor-in }
  reactor:
    type: reactor
    in: reactor-in
    out: reactor-out
    T: 250 degC
    reactions:
      - { equation: "CO2 + 3 H2 -> CH3OH + H2O", key: CO2, conversion: 0.25 }
  cooler: { type: condenser, in: reactor-out, T: 40 degC, P: 30 bar, vapor: recycle, liquid: crude }
`;

/** A splitter with three outlets and no `rest`. */
export const threeOutlets = methanolNumericSplit
  .replace('out: { recycle: 0.98, purge: 0.02 }', 'out: { recycle: 0.97, purge: 0.02, sample: 0.01 }');
