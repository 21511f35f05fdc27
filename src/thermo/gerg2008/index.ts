/**
 * GERG-2008: the reference equation of state for natural gases and similar mixtures, as a thermo
 * model for loopclose's gas meters.
 *
 * What it is. O. Kunz and W. Wagner, "The GERG-2008 wide-range equation of state for natural gases
 * and other mixtures: an expansion of GERG-2004", J. Chem. Eng. Data 57 (2012) 3032-3091; the same
 * equation is ISO 20765-2 and AGA Report No. 8 Part 2 (2017). It is explicit in the reduced
 * Helmholtz energy alpha(delta, tau, x) = alpha° + sum_i x_i alpha_r,i + sum_{i<j} x_i x_j F_ij alpha_r,ij,
 * with delta = rho/rho_r(x), tau = T_r(x)/T from quadratic reducing functions with four binary
 * parameters per pair (beta_v, gamma_v, beta_T, gamma_T). Pure-fluid equations of 12 to 24 terms
 * for 21 components; departure functions for 7 binaries of their own and a generalized one for 8
 * hydrocarbon pairs. The coefficients are in ./data (source named there); the evaluation (./core.ts)
 * is written from the paper's equations with analytic derivatives in delta and tau.
 *
 * Components (loopclose ids): CH4 N2 CO2 C2H6 C3H8 nC4H10 iC4H10 nC5H12 iC5H12 nC6H14 nC7H16
 * nC8H18 nC9H20 nC10H22 H2 O2 CO H2O H2S He Ar.
 *
 * Range (Kunz and Wagner 2012, abstract and the section on the range of validity): normal range
 * 90 K to 450 K at pressures up to 35 MPa, where the most accurate data are represented to within
 * their uncertainty; extended range 60 K to 700 K up to 70 MPa. Stated uncertainties (expanded,
 * k = 2; from memory of the same section, see uncertainty.ts): gas-phase density and speed of sound
 * 0.1 % for natural gases from 250 K to 450 K up to 35 MPa; liquid-phase density 0.1 % to 0.5 %;
 * larger in the extended range. Mixtures far from natural gas (hydrogen-rich synthesis gas, for
 * instance) are covered by the binary data but the paper's figures for them are binary-specific;
 * uncertainty.ts returns the region's figure and a note. Results inform engineering judgement;
 * they must be reviewed by a qualified engineer, and are not for relief, safety or code
 * compliance design.
 *
 * Constants: R = 8.314472 J/(mol K) (the equation's own gas constant, not today's CODATA value;
 * keeping it reproduces the published test values). Zero point of energies: each pure ideal gas
 * has h° = 0 and s° = 0 at T0 = 298.15 K and p0 = 101.325 kPa (the reference state of GERG-2008
 * and of its reference implementation); mixture entropies include the ideal mixing term
 * -R sum x_i ln x_i. U, H, S and G of this model therefore match the reference implementation's
 * values (to about 1e-15; its A output is the dimensionless alpha, ours is RT alpha in J/mol);
 * compare them with another source only as differences.
 *
 * API (SI throughout: K, Pa, mol/m3, J/mol, J/(mol K), m/s, kg/mol):
 *   makeGerg2008(ids: readonly string[]): Gerg2008Model | undefined
 *       undefined when an id is not a GERG-2008 component; gergUnsupported(ids) lists those ids.
 *   model.ids, model.n                       the component order of every composition array
 *   model.density(T, P, x, options?, out?): GergDensityResult
 *       { status: 'converged' | 'not-converged' | 'invalid', D, Z, root, phase, phaseParameter,
 *         reducedDensity, iterations, evaluations, residual, message }
 *       options.root: 'gas' (default, the lowest-density root: what a meter wants) or 'liquid'
 *       (the highest-density root); options.guess: a starting density for the gas search.
 *       Where the isotherm has three roots (below the critical region), 'gas' returns the
 *       gas-like one and 'liquid' the dense one; ask with the other option for the other root.
 *       When the pressure is above every gas-like state of the isotherm, 'gas' returns the
 *       liquid-like root with root: 'liquid' and a message. `phase` is 'liquid-like' below the
 *       reducing temperature on the dense branch (phase identification parameter of
 *       Venkatarathnam and Oellrich, Fluid Phase Equilib. 301 (2011) 225-233, above 1), 'dense'
 *       above the reducing temperature at more than the reducing density, else 'gas-like'; a
 *       liquid-like or dense state at a gas meter deserves a look.
 *       A state that did not converge says so (status, message); D is then the ideal-gas density
 *       for orientation only, never a solution. The solve does not check phase stability: a
 *       two-phase feed gives a metastable single-phase density (a flash decides that).
 *   model.properties(T, D, x, out?): GergProperties
 *       { P, Z, dPdD, d2PdD2, dPdT, d2PdTD, U, H, S, G, A, Cv, Cp, W, JT, kappa, M }
 *       JT in K/Pa; kappa the isentropic exponent. Throws RangeError for T <= 0, D <= 0 or a
 *       composition that does not sum to 1 (a programming error, not a state).
 *   model.molarMass(x): number (kg/mol)
 *   model.reducing(x): { rhoR, TR }
 *   gergDensityUncertainty(T, P, x, phase?) in ./uncertainty.ts
 *
 * Speed: the model is prepared once for its components (pair constants, term tables, scratch
 * Float64Arrays); density() and properties() allocate no arrays or objects when given `out` (the
 * JavaScript engine may still box a few intermediate numbers: over a million density and
 * properties calls it ran a few hundred minor collections, about 1.5 % of the time in a profile).
 * A change of composition or temperature recomputes the composition- or temperature-dependent
 * sums once; bench/gerg.mjs measures a density call. A model keeps its scratch between calls: one
 * model per worker thread.
 */
import { lookupFluids } from './core.js';
import { GERG_PURE } from './data/pure.js';
import { Gerg2008Model } from './model.js';

export { Gerg2008Model } from './model.js';
export type { GergDensityOptions, GergDensityResult, GergPhase, GergProperties, GergRoot, GergStatus } from './types.js';
export { gergDensityUncertainty } from './uncertainty.js';
export type { GergUncertainty, GergUncertaintyRegion } from './uncertainty.js';

/** The loopclose ids GERG-2008 covers. */
export const GERG2008_IDS: readonly string[] = Object.freeze(GERG_PURE.map((f) => f.id));

/** The ids among `ids` that GERG-2008 does not cover (empty when it covers them all). */
export function gergUnsupported(ids: readonly string[]): string[] {
  return lookupFluids(ids).missing;
}

/**
 * GERG-2008 prepared for the components `ids` (loopclose ids, in the order of the composition
 * arrays the model will be given), or undefined when one of them is not a GERG-2008 component
 * (gergUnsupported(ids) names them). Throws on a repeated id.
 */
export function makeGerg2008(ids: readonly string[]): Gerg2008Model | undefined {
  if (new Set(ids).size !== ids.length) throw new RangeError(`GERG-2008: repeated component id in ${ids.join(', ')}`);
  if (ids.length === 0) throw new RangeError('GERG-2008: no components');
  const { fluids, missing } = lookupFluids(ids);
  if (missing.length > 0) return undefined;
  return new Gerg2008Model(fluids);
}
