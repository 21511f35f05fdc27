/**
 * The structural checks (src/flowsheet/structure.ts) on small loops built for the purpose:
 * what is refused before solving, and what is not (no false alarms).
 */
import { describe, expect, it } from 'vitest';
import { validateText } from '../../src/flowsheet/validate.js';
import { InputError } from '../../src/diagnostics.js';

function errorsOf(text: string): string[] {
  try {
    validateText('s.yaml', text);
    return [];
  } catch (e) {
    if (!(e instanceof InputError)) throw e;
    return e.diagnostics.filter((d) => d.severity === 'error').map((d) => d.message);
  }
}

const reactorLoop = (reactions: string, sequence: boolean, extra = '') => `
components: { CH3OH: {}, CH3OCH3: {}, H2O: {}, CO: {}, H2: {} }
thermo: { eos: SRK }
feeds:
  f: { flows: { CO: 1 mol/s, H2: 2 mol/s }, T: 500 K, P: 50 bar }
units:
  mix: { type: mixer, in: [f, recycle], out: r-in }
  r: { type: reactor, in: r-in, out: r-out, sequence: ${sequence}, reactions: [ ${reactions} ] }
  sep: { type: separator, in: r-out, out: { product: { CH3OCH3: 1, H2O: 1, CH3OH: 1 }, gas: rest } }
  split: { type: splitter, in: gas, out: { purge: 0.05, recycle: rest } }
${extra}`;

describe('reactants that never reach their reactor', () => {
  const rx = '{ equation: "CO + 2 H2 -> CH3OH", key: CO, conversion: 0.5 }, { equation: "2 CH3OH -> CH3OCH3 + H2O", key: CH3OH, conversion: 0.5 }';

  it('in sequence, a key formed by the reaction before it is available', () => {
    expect(errorsOf(reactorLoop(rx, true))).toEqual([]);
  });

  it('in parallel on the inlet, the same key never reaches the reactor', () => {
    // The separator sends all methanol out, so none comes back with the recycle either.
    expect(errorsOf(reactorLoop(rx, false))).toEqual([
      'the key reactant `CH3OH` of reaction `2 CH3OH -> CH3OCH3 + H2O` never reaches reactor `r`: no feed carries it and no reaction upstream forms it',
    ]);
  });

  it('in parallel, a key that the recycle brings back from the reactor is available', () => {
    const text = reactorLoop(rx, false).replace('product: { CH3OCH3: 1, H2O: 1, CH3OH: 1 }', 'product: { CH3OCH3: 1, H2O: 1, CH3OH: 0.9 }');
    expect(errorsOf(text)).toEqual([]);
  });

  it('a co-reactant that is in no feed is named', () => {
    const text = reactorLoop('{ equation: "CO + H2O -> CO2 + H2", key: CO, conversion: 0.5 }', false).replace('CO: {}, H2: {} }', 'CO: {}, H2: {}, CO2: {} }');
    const e = errorsOf(text);
    expect(e).toHaveLength(1);
    expect(e[0]).toMatch(/^reactant `H2O` of reaction `CO \+ H2O -> CO2 \+ H2` never reaches reactor `r`/);
  });

  it('a reaction at zero conversion is not checked (it does nothing)', () => {
    expect(errorsOf(reactorLoop('{ equation: "2 CH3OH -> CH3OCH3 + H2O", key: CH3OH, conversion: 0 }', false))).toEqual([]);
  });
});

describe('trapped components', () => {
  const flashLoop = (eos: string, purge: boolean) => `
components: { H2: {}, N2: {}, Ar: {}, NH3: {} }
thermo: { eos: ${eos} }
feeds:
  makeup: { composition: { H2: 0.74, N2: 0.25, Ar: 0.01 }, molar-flow: 10 mol/s, T: 300 K, P: 150 bar }
units:
  mix: { type: mixer, in: [makeup, recycle], out: c-in }
  r: { type: reactor, in: c-in, out: c-out, reactions: [ { equation: "N2 + 3 H2 -> 2 NH3", key: N2, conversion: 0.2 } ] }
  cool: { type: condenser, in: c-out, T: 250 K, P: 145 bar, vapor: ${purge ? 'gas' : 'recycle'}, liquid: liquid }
${purge ? '  split: { type: splitter, in: gas, out: { purge: 0.01, recycle: rest } }\n' : ''}`;

  it('an equilibrium condenser lets every component dissolve: argon has a way out, no error', () => {
    expect(errorsOf(flashLoop('SRK', false))).toEqual([]);
  });

  it('under the ideal-gas model the flash gives no liquid: argon and ammonia are trapped without a purge', () => {
    const e = errorsOf(flashLoop('ideal', false));
    expect(e).toHaveLength(2);
    expect(e[0]).toMatch(/^`Ar` is trapped in the recycle loop mix -> r -> cool: it comes in with feed `makeup` into `mix`/);
    expect(e[1]).toMatch(/^`NH3` is trapped in the recycle loop r -> cool -> mix: it comes in formed in reactor `r`/);
    expect(errorsOf(flashLoop('ideal', true))).toEqual([]);
  });

  it('a component trapped in an inner loop is found although the outer loop has a purge', () => {
    const text = `
components: { H2: {}, N2: {}, CH4: {} }
feeds:
  f: { composition: { H2: 0.9, N2: 0.05, CH4: 0.05 }, molar-flow: 1 mol/s, T: 300 K, P: 20 bar }
units:
  mix: { type: mixer, in: [f, recycle, back], out: a }
  inner: { type: separator, in: a, out: { back: { CH4: 1 }, on: rest } }
  split: { type: splitter, in: on, out: { purge: 0.1, recycle: rest } }
`;
    const e = errorsOf(text);
    expect(e).toHaveLength(1);
    expect(e[0]).toMatch(/^`CH4` is trapped in the recycle loop mix -> inner: it comes in with feed `f` into `mix`/);
  });

  it('a key converted completely leaves no trace downstream to be trapped', () => {
    const text = `
components: { N2: {}, H2: {}, NH3: {} }
feeds:
  f: { composition: { H2: 0.75, N2: 0.25 }, molar-flow: 1 mol/s, T: 300 K, P: 100 bar }
units:
  r: { type: reactor, in: f, out: r-out, reactions: [ { equation: "N2 + 3 H2 -> 2 NH3", key: N2, conversion: 1 } ] }
  mix: { type: mixer, in: [r-out, back], out: m }
  sep: { type: separator, in: m, out: { product: { H2: 1, NH3: 1 }, back: rest } }
`;
    expect(errorsOf(text)).toEqual([]);
  });
});
