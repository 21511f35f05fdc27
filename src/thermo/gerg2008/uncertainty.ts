/**
 * The uncertainty in density that GERG-2008's authors state for the region a state falls in, for
 * the meters' uncertainty budget (the SRK/PR error is measured against GERG-2008 separately;
 * this is GERG-2008's own share).
 *
 * Source: O. Kunz and W. Wagner, J. Chem. Eng. Data 57 (2012) 3032-3091, the abstract (normal
 * range 90 K to 450 K up to 35 MPa; extended range 60 K to 700 K up to 70 MPa) and the section on
 * the range of validity and the estimated uncertainties (the figures below; recalled from memory,
 * the section and table numbers not verified: the paper could not be consulted here):
 *   - gas phase, 250 K to 450 K, up to 35 MPa: 0.1 % in density (natural gases and similar
 *     mixtures) (from memory);
 *   - liquid phase: 0.1 % to 0.5 % in density (from memory); the upper end is returned;
 *   - extended range beyond the normal one: about 0.2 % to 0.5 % in density (from memory); the
 *     upper end is returned.
 * The paper states expanded uncertainties with a coverage factor k = 2.
 *
 * Below 250 K in the gas phase the paper's 0.1 % does not apply; no figure of the paper is
 * returned for that region: the function gives 0.5 % as a bound of this project's choosing
 * (stated: false), so that a budget has a number and the report can say where it comes from.
 */
import type { GergPhase } from './types.js';

export type GergUncertaintyRegion =
  | 'gas-normal'
  | 'gas-normal-below-250K'
  | 'liquid-normal'
  | 'extended'
  | 'outside';

export interface GergUncertainty {
  /** Relative expanded (k = 2) uncertainty in density, or null outside the extended range. */
  relative: number | null;
  coverage: 2;
  region: GergUncertaintyRegion;
  /** 90 K <= T <= 450 K and P <= 35 MPa. */
  inNormalRange: boolean;
  /** 60 K <= T <= 700 K and P <= 70 MPa. */
  inExtendedRange: boolean;
  /** true: the authors' figure for the region; false: a bound of this project's choosing. */
  stated: boolean;
  source: string;
  notes: string[];
}

const SOURCE =
  'Kunz and Wagner, J. Chem. Eng. Data 57 (2012) 3032-3091, range of validity and estimated uncertainties (figures from memory)';

/** Methane fraction below which the notes say the mixture is not natural-gas-like (this project's flag, no source). */
const METHANE_FLAG = 0.5;

/**
 * Relative expanded (k = 2) uncertainty in GERG-2008 density at temperature T (K) and pressure
 * P (Pa) for a gas of composition x (mole fractions by loopclose id), in the given phase (from
 * the density result's `phase`; default gas-like).
 */
export function gergDensityUncertainty(
  T: number,
  P: number,
  x: Readonly<Record<string, number>>,
  phase: GergPhase = 'gas-like',
): GergUncertainty {
  const inNormalRange = T >= 90 && T <= 450 && P > 0 && P <= 35e6;
  const inExtendedRange = T >= 60 && T <= 700 && P > 0 && P <= 70e6;
  const notes: string[] = [];
  let region: GergUncertaintyRegion;
  let relative: number | null;
  let stated = true;
  if (!inExtendedRange) {
    region = 'outside';
    relative = null;
    notes.push('outside the extended range of validity (60 K to 700 K, up to 70 MPa): GERG-2008 has no stated uncertainty here');
  } else if (!inNormalRange) {
    region = 'extended';
    relative = 0.005;
    notes.push('extended range (outside 90 K to 450 K, 35 MPa): the stated figure is about 0.2 % to 0.5 %; the upper end is returned');
  } else if (phase === 'liquid-like') {
    // 'dense' supercritical states fall under the gas-phase figure, which the paper states up
    // to 35 MPa for the homogeneous gas and supercritical region of natural gases.
    region = 'liquid-normal';
    relative = 0.005;
    notes.push('liquid-like state: the stated figure is 0.1 % to 0.5 %; the upper end is returned');
  } else if (T >= 250) {
    region = 'gas-normal';
    relative = 0.001;
  } else {
    region = 'gas-normal-below-250K';
    relative = 0.005;
    stated = false;
    notes.push('gas phase below 250 K: the 0.1 % figure is stated from 250 K up; 0.5 % is a bound of this project\'s choosing, not a figure of the paper');
  }
  const methane = x.CH4 ?? 0;
  if (relative !== null && methane < METHANE_FLAG) {
    notes.push(
      `methane fraction ${methane} is below ${METHANE_FLAG}: the stated figures are for natural gases and similar mixtures; for other gases (hydrogen-rich synthesis gas, nitrogen-rich gas) the paper's binary-specific uncertainties apply and may be larger`,
    );
  }
  return { relative, coverage: 2, region, inNormalRange, inExtendedRange, stated, source: SOURCE, notes };
}
