/**
 * The isothermal flash against published, measured vapor-liquid equilibrium.
 *
 * Source of the check values:
 *   Reamer, H. H., Sage, B. H. and Lacey, W. N., "Phase Equilibria in Hydrocarbon Systems.
 *   Volumetric and Phase Behavior of the Methane-Hydrogen Sulfide System", Industrial and
 *   Engineering Chemistry 43 (1951) 976-981 (journal, volume and pages from memory), the table
 *   of compositions of coexisting gas and liquid at 40 and 100 degF (table number not checked).
 *   The paper gives smoothed mole fractions of methane at round pressures in psia. The numbers
 *   below were read from a public secondary transcription of that table (which had converted
 *   the pressures to bar; converting back gives the round psia values, 200, 250, ... psia);
 *   they were not re-read from the printed paper.
 *
 * How the check works: for each tabulated pressure a feed halfway between the measured liquid
 * and gas compositions, z = (x + y)/2, is flashed at the measured T and P. If model and
 * measurement agree, the flash returns the measured x and y, and (lever rule) beta = 0.5.
 *
 * Model: SRK and Peng-Robinson (1976) with the built-in component constants of
 * src/thermo/components.ts (Poling, Prausnitz and O'Connell, 5th ed., Appendix A, from memory;
 * the data paper gives no EOS constants) and one interaction parameter k_ij = 0.08 for
 * methane + hydrogen sulfide: the value usually tabulated for this pair with SRK and PR
 * ((from memory); published banks give 0.08 to 0.09; the check passes over that range and
 * fails at 0.07, see below). The data paper gives no k_ij.
 *
 * Tolerances (this is model against measurement, not model against model, so the data's printed
 * four decimals cannot be expected):
 *   liquid x_CH4: 0.015 mole fraction. A two-constant cubic EOS with one k_ij typically
 *     reproduces good binary VLE data to about 0.01 in mole fraction away from the critical
 *     region (common practice, no source). Computed worst case over the points below: 0.012.
 *   vapor y_CH4: 0.02 mole fraction. At the lowest pressures the gas is mostly H2S and y is set
 *     by the equation of state's own H2S vapor pressure (a generalised alpha function, not fitted
 *     to H2S); worst case 0.0145 (SRK, 40 degF, 200 psia).
 *   beta: not measured; the lever rule turns composition errors dx, dy into
 *     |d beta| <= max(|dx|, |dy|)/(y - x), so the bound is 0.02/(y - x) point by point.
 * Points near the mixture critical pressure (the table ends where the phases converge, at about
 * 1950 psia at 40 degF and 1910 psia at 100 degF) are left out: above 1300 psia a cubic EOS with a
 * constant k_ij is known to misplace the critical point, and the comparison would test that
 * instead of the flash. So is the 100 degF, 400 psia point, which lies within a few psi of the
 * vapor pressure of H2S (x = 0.0007), where the model's pure-H2S vapor pressure decides alone.
 *
 * Results must be reviewed by a qualified engineer; they are not for relief, safety or code
 * compliance design, and local codes and licensed practice govern.
 */
import { describe, expect, it } from 'vitest';
import { makeEos } from '../../src/thermo/eos.js';
import { flashTP } from '../../src/thermo/flash.js';
import { findComponent } from '../../src/thermo/components.js';
import type { ComponentData } from '../../src/thermo/types.js';

/** 1 psi in Pa (exact: 1 lbf/in2 = 0.45359237 kg x 9.80665 m/s2 / (0.0254 m)^2). */
const PSI = (0.45359237 * 9.80665) / (0.0254 * 0.0254);
/** degF to K (exact). */
const kelvin = (degF: number): number => ((degF - 32) * 5) / 9 + 273.15;

/** [P psia, x_CH4 liquid, y_CH4 gas], Reamer, Sage and Lacey (1951). */
type Point = readonly [number, number, number];

const AT_40F: readonly Point[] = [
  [200, 0.0057, 0.1371],
  [250, 0.0132, 0.2783],
  [300, 0.0212, 0.3896],
  [350, 0.0284, 0.4604],
  [400, 0.0354, 0.5126],
  [450, 0.0424, 0.5551],
  [500, 0.0493, 0.5879],
  [600, 0.0636, 0.6394],
  [700, 0.0783, 0.6755],
  [800, 0.093, 0.6989],
  [900, 0.1083, 0.7141],
  [1000, 0.125, 0.7242],
  [1100, 0.1433, 0.7299],
  [1200, 0.1635, 0.7321],
  [1250, 0.1752, 0.7319],
  [1300, 0.1868, 0.7306],
];

const AT_100F: readonly Point[] = [
  [450, 0.0067, 0.0963],
  [500, 0.0128, 0.1642],
  [550, 0.019, 0.2203],
  [600, 0.0255, 0.2688],
  [700, 0.0385, 0.3416],
  [800, 0.0523, 0.3976],
  [900, 0.067, 0.4396],
  [1000, 0.0828, 0.4707],
  [1100, 0.0996, 0.4923],
  [1200, 0.1182, 0.5079],
  [1250, 0.1282, 0.513],
  [1300, 0.139, 0.5182],
];

const TOL_X = 0.015;
const TOL_Y = 0.02;
const K_CH4_H2S = 0.08;

const CH4 = findComponent('CH4') as ComponentData;
const H2S = findComponent('H2S') as ComponentData;

function kij(k: number): Float64Array {
  return new Float64Array([0, k, k, 0]);
}

interface Deviation {
  P: number;
  dx: number;
  dy: number;
  dBeta: number;
  betaBound: number;
}

/** Flashes z = (x + y)/2 at every point; returns the deviations from the measurement. */
function deviations(eosName: 'SRK' | 'PR', k: number, degF: number, points: readonly Point[]): Deviation[] {
  const eos = makeEos(eosName, [CH4, H2S], kij(k));
  const T = kelvin(degF);
  return points.map(([psia, x, y]) => {
    const z = 0.5 * (x + y);
    const r = flashTP(eos, T, psia * PSI, [z, 1 - z]);
    expect(r.status, `${eosName} ${degF} degF ${psia} psia`).toBe('converged');
    expect(r.phase, `${eosName} ${degF} degF ${psia} psia`).toBe('two-phase');
    return {
      P: psia,
      dx: r.x[0] - x,
      dy: r.y[0] - y,
      dBeta: r.beta - 0.5,
      betaBound: TOL_Y / (y - x),
    };
  });
}

describe('flash against Reamer, Sage and Lacey (1951), methane + hydrogen sulfide', () => {
  for (const eosName of ['SRK', 'PR'] as const) {
    for (const [degF, points] of [[40, AT_40F], [100, AT_100F]] as const) {
      it(`${eosName}, k_ij = ${K_CH4_H2S}: ${degF} degF, ${points[0][0]}-${points[points.length - 1][0]} psia`, () => {
        for (const d of deviations(eosName, K_CH4_H2S, degF, points)) {
          const where = `${eosName} ${degF} degF ${d.P} psia`;
          expect(Math.abs(d.dx), `${where}: liquid x_CH4`).toBeLessThanOrEqual(TOL_X);
          expect(Math.abs(d.dy), `${where}: vapor y_CH4`).toBeLessThanOrEqual(TOL_Y);
          expect(Math.abs(d.dBeta), `${where}: beta`).toBeLessThanOrEqual(d.betaBound);
        }
      });
    }
  }

  it('the check is sensitive to the model: with k_ij = 0 the liquid takes up far too much methane', () => {
    // With k_ij = 0 both equations overpredict the methane content of the liquid, the known
    // behaviour of a cubic EOS without an interaction parameter for an asymmetric pair. At
    // 1000 psia the excess is several times the tolerance, so the comparison above does test
    // the model (and the k_ij reaching the mixing rule), not only the flash's convergence.
    for (const eosName of ['SRK', 'PR'] as const) {
      for (const [degF, points] of [[40, AT_40F], [100, AT_100F]] as const) {
        const at1000 = points.filter((p) => p[0] === 1000);
        const [d] = deviations(eosName, 0, degF, at1000);
        expect(d.dx, `${eosName} ${degF} degF`).toBeGreaterThan(2 * TOL_X);
      }
    }
    // and k_ij = 0.07, just below the tabulated range, already leaves the liquid tolerance
    const low = deviations('PR', 0.07, 40, AT_40F);
    expect(Math.max(...low.map((d) => Math.abs(d.dx)))).toBeGreaterThan(TOL_X);
  });

  it('feeds elsewhere on the measured tie line give the same phases and the lever-rule beta', () => {
    // Not only the midpoint: feeds one tenth of the way in from the measured liquid and from the
    // measured gas give beta near 0.1 and 0.9 (lever rule on the measured tie line), and the
    // same x and y as each other, as a binary at fixed T and P must.
    const eos = makeEos('PR', [CH4, H2S], kij(K_CH4_H2S));
    const T = kelvin(40);
    const [psia, x, y] = AT_40F.find((p) => p[0] === 800)!;
    const nearLiquid = x + 0.1 * (y - x);
    const nearGas = y - 0.1 * (y - x);
    const rl = flashTP(eos, T, psia * PSI, [nearLiquid, 1 - nearLiquid]);
    const rg = flashTP(eos, T, psia * PSI, [nearGas, 1 - nearGas]);
    expect(rl.phase).toBe('two-phase');
    expect(rg.phase).toBe('two-phase');
    // lever rule with the measured tie line: 0.1 and 0.9, within the propagated bound
    const bound = TOL_Y / (y - x);
    expect(Math.abs(rl.beta - 0.1)).toBeLessThanOrEqual(bound);
    expect(Math.abs(rg.beta - 0.9)).toBeLessThanOrEqual(bound);
    // and the tie line itself does not depend on the feed inside the two-phase region
    expect(Math.abs(rl.x[0] - rg.x[0])).toBeLessThan(1e-8);
    expect(Math.abs(rl.y[0] - rg.y[0])).toBeLessThan(1e-8);
  });
});
