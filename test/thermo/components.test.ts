import { describe, expect, it } from 'vitest';
import { COMPONENTS, componentIds, findComponent, nearestComponentIds } from '../../src/thermo/components.js';
import { molarMass, parseFormula } from '../../src/thermo/formula.js';
import type { ComponentData } from '../../src/thermo/types.js';

const BAR = 1e5;
const MPA = 1e6;
const ATM = 101325;

function get(id: string): ComponentData {
  const c = findComponent(id);
  if (!c) throw new Error(`component ${id} missing`);
  return c;
}

const relErr = (a: number, b: number): number => Math.abs(a / b - 1);

describe('COMPONENTS table integrity', () => {
  it('holds the 43 built-in components including the ones gas-phase loops need', () => {
    expect(COMPONENTS.length).toBe(43);
    const required = [
      'H2', 'N2', 'O2', 'Ar', 'He', 'Ne', 'CO', 'CO2', 'CH4', 'C2H6', 'C2H4', 'C2H2', 'C3H8', 'C3H6',
      'nC4H10', 'iC4H10', 'nC5H12', 'H2O', 'NH3', 'CH3OH', 'C2H5OH', 'H2S', 'SO2', 'COS', 'Cl2', 'HCl',
      'N2O', 'NO', 'C2H4O', 'CH3COOH', 'C6H6', 'C7H8', 'C6H12', 'CH2O', 'CH3OCH3',
      'nC7H16', 'nC8H18', 'nC9H20', 'nC10H22',
    ];
    const ids = new Set(componentIds());
    for (const id of required) expect(ids.has(id), id).toBe(true);
  });

  it('has no duplicate ids and no duplicate names', () => {
    const ids = COMPONENTS.map((c) => c.id);
    expect(new Set(ids).size).toBe(ids.length);
    const names = COMPONENTS.map((c) => c.name.toLowerCase());
    expect(new Set(names).size).toBe(names.length);
  });

  it.each(COMPONENTS.map((c) => [c.id, c] as const))('%s: every field present, finite and physical', (_id, c) => {
    expect(c.name.length).toBeGreaterThan(0);
    expect(c.source.trim().length).toBeGreaterThan(0);
    // A row names a dated publication (author and year) or is marked as recalled.
    expect(/\(from memory\)|\b(19|20)\d\d\b/.test(c.source)).toBe(true);
    for (const v of [c.MW, c.Tc, c.Pc, c.omega]) expect(Number.isFinite(v)).toBe(true);
    expect(c.MW).toBeGreaterThan(0);
    // Unit slips (g/mol for kg/mol, bar or MPa for Pa) land far outside these bands.
    expect(c.MW).toBeGreaterThan(0.001);
    expect(c.MW).toBeLessThan(0.3);
    expect(c.Tc).toBeGreaterThan(4);
    expect(c.Tc).toBeLessThan(1000);
    expect(c.Pc).toBeGreaterThan(1e5);
    expect(c.Pc).toBeLessThan(3e7);
    expect(c.omega).toBeGreaterThan(-0.5);
    expect(c.omega).toBeLessThan(1.2);
    // Only the quantum gases and argon have omega below zero.
    if (!['H2', 'He', 'Ne', 'Ar'].includes(c.id)) expect(c.omega).toBeGreaterThanOrEqual(0);
    expect(Object.isFrozen(c)).toBe(true);
  });

  it.each(COMPONENTS.map((c) => [c.id, c] as const))('%s: MW agrees with the formula mass (IUPAC CIAAW 2021 weights) to 0.05 %%', (_id, c) => {
    expect(relErr(c.MW, molarMass(c.formula))).toBeLessThan(5e-4);
  });

  it.each(COMPONENTS.map((c) => [c.id, c] as const))('%s: id and formula name the same atoms', (_id, c) => {
    // Isomer prefixes n (normal) and i (iso) come off before parsing.
    const bare = /^[ni][A-Z]/.test(c.id) ? c.id.slice(1) : c.id;
    expect(parseFormula(bare)).toEqual(parseFormula(c.formula));
  });

  it('cannot be modified by a caller', () => {
    expect(Object.isFrozen(COMPONENTS)).toBe(true);
    const ids = componentIds();
    ids.push('XX');
    expect(componentIds()).not.toContain('XX');
  });
});

// Row-by-row review of the critical constants against evaluated compilations read for the purpose.
// Columns: the value here (Tc K, Pc bar, omega) and, where the compilation has the fluid,
//  EOS   constants adopted with the reference (Helmholtz-energy) equation of state of the fluid, as
//        tabulated with the reference-EOS fluid constants (Tc K, Pc MPa, omega) (Span and Wagner 1996 CO2;
//        Setzmann and Wagner 1991 CH4; Span et al. 2000 N2; IAPWS-95 water; Leachman et al. 2009 H2;
//        Lemmon and Span 2006 for several others; the paper of each fluid was not consulted here);
//  IUPAC the IUPAC critical-property evaluations (Tc K, Pc MPa): Ambrose and Tsonopoulos, J. Chem. Eng.
//        Data 40 (1995) 531 (n-alkanes); Tsonopoulos and Ambrose 1995, 1996 (aromatics, unsaturated);
//        Daubert 1996 (branched and cyclic alkanes); Gude and Teja 1995 (alcohols); Kudchadker,
//        Ambrose and Tsonopoulos 2001 (oxygen compounds);
//  MAT   Mathews, "The critical constants of inorganic substances", Chem. Rev. 72 (1972) 71 (Tc K, Pc bar).
// A transcription or unit slip shows up as a disagreement with every compilation; the tolerances are
// Tc 0.3 %, Pc 1.5 %, omega 0.015, wider than the spread of good measurements and far narrower than a slip.
type Triple = readonly [number, number, number];
interface Review {
  id: string;
  here: Triple;
  eos?: Triple;
  iupac?: readonly [number, number | null];
  mat?: readonly [number, number];
}
// Hydrogen: 13.13 bar here against 12.964 (reference EOS) and 12.97 (Mathews), 1.3 %, inside the 1.5 %
// tolerance. Moving it to 12.964 bar shifts the demo methanol loop enough that the infeasible-target case
// of test/study/targets.test.ts ends not-converged instead of infeasible, so it is left for the solver side.
const REVIEW: readonly Review[] = [
  { id: 'H2', here: [33.19, 13.13, -0.216], eos: [33.145, 1.2964, -0.219], mat: [33.2, 12.9696] },
  { id: 'He', here: [5.19, 2.27, -0.39], eos: [5.1953, 0.22832, -0.3836], mat: [5.1889, 2.26968] },
  { id: 'Ne', here: [44.4, 26.62, -0.0355], eos: [44.4, 2.66163, -0.0355], mat: [44.4, 27.5604] },
  { id: 'Ar', here: [150.86, 48.98, -0.002], eos: [150.687, 4.863, -0.00219], mat: [150.8, 48.7373] },
  { id: 'N2', here: [126.2, 33.98, 0.037], eos: [126.192, 3.3958, 0.0372], mat: [126.2, 33.9439] },
  { id: 'O2', here: [154.58, 50.43, 0.022], eos: [154.581, 5.043, 0.0222], mat: [154.58, 50.4295] },
  { id: 'CO', here: [132.85, 34.94, 0.045], eos: [132.86, 3.494, 0.0497], mat: [132.91, 34.9875] },
  { id: 'CO2', here: [304.12, 73.74, 0.225], eos: [304.1282, 7.3773, 0.22394], mat: [304.2, 73.7646] },
  { id: 'CH4', here: [190.56, 45.99, 0.011], eos: [190.564, 4.5992, 0.01142], iupac: [190.564, 4.599] },
  { id: 'C2H6', here: [305.32, 48.72, 0.099], eos: [305.322, 4.8722, 0.0995], iupac: [305.32, 4.872] },
  { id: 'C2H4', here: [282.34, 50.41, 0.087], eos: [282.35, 5.0418, 0.0866], iupac: [282.34, 5.041] },
  { id: 'C2H2', here: [308.3, 61.14, 0.189], eos: [308.3, 5.9882, 0.178], iupac: [308.3, 6.138] },
  { id: 'C3H8', here: [369.83, 42.48, 0.152], eos: [369.89, 4.2512, 0.1521], iupac: [369.83, 4.248] },
  { id: 'C3H6', here: [364.9, 46.0, 0.142], eos: [364.211, 4.555, 0.146], iupac: [364.9, 4.6] },
  { id: 'nC4H10', here: [425.12, 37.96, 0.2], eos: [425.125, 3.796, 0.201], iupac: [425.12, 3.796] },
  { id: 'iC4H10', here: [407.85, 36.4, 0.186], eos: [407.81, 3.629, 0.184], iupac: [407.8, 3.64] },
  { id: 'nC5H12', here: [469.7, 33.7, 0.252], eos: [469.7, 3.3675, 0.251], iupac: [469.7, 3.37] },
  { id: 'iC5H12', here: [460.39, 33.81, 0.229], eos: [460.35, 3.378, 0.2274], iupac: [460.4, 3.38] },
  { id: 'nC6H14', here: [507.6, 30.25, 0.3], eos: [507.82, 3.0441, 0.3], iupac: [507.6, 3.025] },
  { id: 'H2O', here: [647.14, 220.64, 0.344], eos: [647.096, 22.064, 0.3443], mat: [647.14, 220.4832] },
  { id: 'NH3', here: [405.65, 112.8, 0.253], eos: [405.56, 11.3634, 0.256], mat: [405.6, 112.7747] },
  { id: 'CH3OH', here: [512.64, 80.97, 0.565], eos: [513.38, 8.21585, 0.5625], iupac: [512.5, 8.084] },
  { id: 'C2H5OH', here: [513.92, 61.48, 0.649], eos: [514.71, 6.268, 0.646], iupac: [514.0, 6.137] },
  { id: 'H2S', here: [373.4, 89.63, 0.09], eos: [373.1, 9.0, 0.1005], mat: [373.2, 89.3687] },
  { id: 'SO2', here: [430.75, 78.84, 0.245], eos: [430.64, 7.8866, 0.256], mat: [430.8, 78.841] },
  { id: 'SO3', here: [490.85, 82.1, 0.424], mat: [491, 82.0733] },
  { id: 'COS', here: [378.8, 63.49, 0.097], eos: [378.77, 6.37, 0.0978], mat: [375, 58.7685] },
  { id: 'Cl2', here: [416.87, 76.42, 0.07], eos: [416.8654, 7.6424, 0.07], mat: [417, 77.007] },
  { id: 'HCl', here: [324.65, 83.09, 0.131], eos: [324.68, 8.3135, 0.129], mat: [324.6, 83.0865] },
  { id: 'N2O', here: [309.57, 72.45, 0.162], eos: [309.52, 7.245, 0.162], mat: [309.56, 72.4474] },
  { id: 'NO', here: [180.15, 64.8, 0.583], mat: [180, 64.848] },
  { id: 'C2H4O', here: [469.15, 71.9, 0.197], eos: [468.92, 7.3047, 0.21], iupac: [469, 7.2] },
  { id: 'CH3CHO', here: [466.0, 55.7, 0.291], iupac: [466, null] },
  { id: 'CH3COOH', here: [592.0, 57.86, 0.467], iupac: [590.7, 5.78] },
  { id: 'CH2O', here: [408.0, 65.9, 0.282] },
  { id: 'CH3OCH3', here: [400.1, 53.7, 0.2], eos: [400.378, 5.3368, 0.196], iupac: [400.2, 5.34] },
  { id: 'C6H6', here: [562.05, 48.95, 0.21], eos: [562.02, 4.907277, 0.211], iupac: [562.05, 4.895] },
  { id: 'C7H8', here: [591.75, 41.08, 0.264], eos: [591.75, 4.1263, 0.2657], iupac: [591.75, 4.108] },
  { id: 'C6H12', here: [553.5, 40.73, 0.211], eos: [553.6, 4.0805, 0.2096], iupac: [553.8, 4.08] },
  { id: 'nC7H16', here: [540.2, 27.4, 0.349], eos: [540.2, 2.73573, 0.349], iupac: [540.2, 2.74] },
  { id: 'nC8H18', here: [568.7, 24.9, 0.398], eos: [568.74, 2.48359, 0.398], iupac: [568.7, 2.49] },
  { id: 'nC9H20', here: [594.6, 22.9, 0.4433], eos: [594.55, 2.281, 0.4433], iupac: [594.6, 2.29] },
  { id: 'nC10H22', here: [617.7, 21.1, 0.4884], eos: [617.7, 2.103, 0.4884], iupac: [611.7, 2.11] },
];

// Comparisons outside the tolerances above, each with its reason and the wider bound it is held to.
const KNOWN_DISAGREEMENTS: Readonly<Record<string, { bound: number; reason: string }>> = {
  'Ne Pc MAT': { bound: 0.04, reason: 'Mathews (1972) 27.56 bar is the value this row used to follow; the reference EOS gives 26.62 bar' },
  'C2H2 Pc EOS': { bound: 0.03, reason: 'the reference-EOS table gives 59.88 bar, IUPAC (Tsonopoulos and Ambrose 1996) 61.38 bar; the row follows Poling and IUPAC' },
  'C2H5OH Pc EOS': { bound: 0.025, reason: "the ethanol EOS's critical point, 62.68 bar, lies 2 % above the measured values evaluated by Gude and Teja (61.37 bar) and Poling (61.48 bar)" },
  'COS Tc MAT': { bound: 0.015, reason: 'Mathews (1972) quotes an older determination (375 K, 58.0 atm); the reference EOS and Poling agree on 378.8 K, 63.5-63.7 bar' },
  'COS Pc MAT': { bound: 0.09, reason: 'as for its Tc' },
  'C2H4O Pc EOS': { bound: 0.02, reason: 'IUPAC (Kudchadker et al. 2001) 72.0 bar and the reference EOS 73.05 bar differ by 1.5 %; the row follows Poling and IUPAC' },
  'nC10H22 Tc IUPAC': { bound: 0.011, reason: 'the transcription read gives 611.7 K, which we take for a misprint of 617.7 K (Ambrose and Tsonopoulos 1995 (from memory); the reference EOS gives 617.7 K)' },
};

/** The value of a compilation for field idx (0 Tc, 1 Pc, 2 omega) in the units of `here` (K, bar). */
function compiled(r: Review, src: string, idx: number): number {
  if (src === 'EOS') return idx === 1 ? r.eos![1] * 10 : r.eos![idx];
  if (src === 'IUPAC') return idx === 1 ? (r.iupac![1] as number) * 10 : r.iupac![0];
  return idx === 1 ? r.mat![1] : r.mat![0];
}

describe('critical constants reviewed against evaluated compilations', () => {
  it('reviews every built-in row, and every row but formaldehyde against at least one compilation', () => {
    expect(REVIEW.map((r) => r.id).sort()).toEqual(componentIds().sort());
    for (const r of REVIEW) if (r.id !== 'CH2O') expect(Boolean(r.eos || r.iupac || r.mat), r.id).toBe(true);
  });

  it.each(REVIEW.map((r) => [r.id, r] as const))('%s: the table holds the reviewed values', (id, r) => {
    const c = get(id);
    expect(c.Tc).toBeCloseTo(r.here[0], 9);
    expect(c.Pc / BAR).toBeCloseTo(r.here[1], 9);
    expect(c.omega).toBeCloseTo(r.here[2], 12);
  });

  it.each(REVIEW.map((r) => [r.id, r] as const))('%s: agrees with each compilation within the tolerances', (id, r) => {
    const check = (field: string, src: string, here: number, there: number, tol: number, abs = false): void => {
      const dev = abs ? Math.abs(here - there) : relErr(here, there);
      const known = KNOWN_DISAGREEMENTS[`${id} ${field} ${src}`];
      expect(dev, `${id} ${field} vs ${src}: ${here} against ${there}`).toBeLessThan(known ? known.bound : tol);
    };
    const c = get(id);
    const here = [c.Tc, c.Pc / BAR, c.omega];
    if (r.eos) {
      check('Tc', 'EOS', here[0], r.eos[0], 0.003);
      check('Pc', 'EOS', here[1], r.eos[1] * 10, 0.015);
      check('omega', 'EOS', here[2], r.eos[2], 0.015, true);
    }
    if (r.iupac) {
      check('Tc', 'IUPAC', here[0], r.iupac[0], 0.003);
      if (r.iupac[1] !== null) check('Pc', 'IUPAC', here[1], r.iupac[1] * 10, 0.015);
    }
    if (r.mat) {
      check('Tc', 'MAT', here[0], r.mat[0], 0.003);
      check('Pc', 'MAT', here[1], r.mat[1], 0.015);
    }
  });

  it('records only disagreements that still exist (each exception exceeds the normal tolerance)', () => {
    const normal: Record<string, number> = { Tc: 0.003, Pc: 0.015, omega: 0.015 };
    for (const key of Object.keys(KNOWN_DISAGREEMENTS)) {
      const [id, field, src] = key.split(' ');
      const r = REVIEW.find((x) => x.id === id)!;
      const idx = field === 'Tc' ? 0 : field === 'Pc' ? 1 : 2;
      const there = compiled(r, src, idx);
      const dev = idx === 2 ? Math.abs(r.here[idx] - there) : relErr(r.here[idx], there);
      expect(dev, key).toBeGreaterThan(normal[field]);
    }
  });

  it('chlorine and neon follow the reference EOS, not the single compilation they used to follow', () => {
    // Brief of the review: chlorine Pc 79.8 bar and omega 0.090, neon Pc 27.6 bar disagreed with the evaluated sources.
    expect(get('Cl2').Pc / BAR).toBeLessThan(77.5);
    expect(get('Cl2').omega).toBeCloseTo(0.07, 6);
    expect(get('Ne').Pc / BAR).toBeLessThan(27);
  });
});

describe('independent published values (cross-checks with tolerances)', () => {
  it('water: IAPWS critical point', () => {
    // IAPWS R2-83 (1992), Release on the Values of Temperature, Pressure and Density of Ordinary and
    // Heavy Water Substances at their Respective Critical Points: Tc = 647.096 K, Pc = 22.064 MPa
    // (values as quoted in the public repository github.com/MilanSkocic/iapws, documentation of R2-83).
    const w = get('H2O');
    expect(relErr(w.Tc, 647.096)).toBeLessThan(1e-4); // measured: 6.8e-5 (647.14 vs 647.096 K)
    expect(relErr(w.Pc, 22.064 * MPA)).toBeLessThan(1e-4); // measured: 0
  });

  it('methane: Tc, Pc, omega from a published table', () => {
    // Oil & Gas Science and Technology - Rev. IFP Energies nouvelles 76 (2021), article ogst210137, Table 3
    // (https://ogst.ifpenergiesnouvelles.fr/fr/articles/ogst/full_html/2021/01/ogst210137/T3.html):
    // Tc = 190.564 K, Pc = 4.599 MPa, omega = 0.0115.
    const m = get('CH4');
    expect(relErr(m.Tc, 190.564)).toBeLessThan(1e-4);
    expect(relErr(m.Pc, 4.599 * MPA)).toBeLessThan(5e-4);
    expect(Math.abs(m.omega - 0.0115)).toBeLessThan(1e-3);
  });

  // Textbook table of critical-point properties, "Critical Properties of Phase-Change Fluids",
  // https://people.ohio.edu/urieli/thermo/property_tables/gas/Critical.html (adapted from
  // S. Bhattacharjee's TEST property tables), and the SI "TABLE A-1 Molar mass, gas constant, and
  // critical-point properties" reproduced at https://studylibfr.com/doc/10172698/thermodynamic-tables-si
  // (marked below). These tables round to 3-4 digits and some use older measurements, so the
  // check is loose (Tc within 1.5 % or 0.2 K, Pc within 5 %, M within 0.1 %): it catches swapped
  // digits, wrong rows and unit slips, not the last digit.
  it.each([
    // id        M g/mol  Tc K   Pc MPa
    ['NH3', 17.03, 405.5, 11.28],
    ['Ar', 39.948, 151, 4.86],
    ['C6H6', 78.115, 562, 4.92],
    ['nC4H10', 58.124, 425.2, 3.8],
    ['CO2', 44.01, 304.2, 7.39],
    ['CO', 28.011, 133, 3.5],
    ['Cl2', 70.906, 417, 7.71],
    // ethane is checked against the second table below: this one prints Pc = 4.48 MPa, which disagrees
    // with 48.8 bar in that table and 48.72 bar in ours (a misprint of 4.88 on the reproduced page, we judge)
    ['C2H4', 28.054, 282.4, 5.12],
    ['He', 4.003, 5.3, 0.23],
    ['H2', 2.016, 33.3, 1.3],
    ['CH4', 16.043, 191.1, 4.64],
    ['Ne', 20.183, 44.5, 2.68],
    ['N2', 28.013, 126.2, 3.39],
    ['O2', 31.999, 154.8, 5.08],
    ['C3H8', 44.097, 370, 4.26],
    ['C3H6', 42.081, 365, 4.62],
    ['SO2', 64.063, 430.7, 7.88],
    ['H2O', 18.015, 647.1, 22.064],
    ['C2H5OH', 46.07, 516, 6.38],
    ['CH3OH', 32.042, 513.2, 7.95],
    ['N2O', 44.013, 309.7, 7.27],
  ] as const)('%s against the textbook critical-point table', (id, M, Tc, Pc_MPa) => {
    const c = get(id);
    expect(relErr(c.MW, M * 1e-3)).toBeLessThan(1e-3);
    expect(Math.abs(c.Tc - Tc)).toBeLessThan(Math.max(0.015 * Tc, 0.2));
    expect(relErr(c.Pc, Pc_MPa * MPA)).toBeLessThan(0.05);
  });

  // Moran and Shapiro, Fundamentals of Engineering Thermodynamics, SI "Table A-1 Atomic or Molecular Weights and Critical Properties of
  // Selected Elements and Compounds" (adapted there from the International Critical Tables and Nelson and
  // Obert, Chem. Eng. 61 (1954) 203), as reproduced at https://www.scribd.com/document/523360446/Tabla-Masa-Molecular
  // (Tc in K to 3 digits, Pc in bar; edition not stated on the page, book attribution from memory).
  // Same loose tolerances.
  it.each([
    ['C2H6', 30.07, 305, 48.8],
    ['C2H2', 26.04, 309, 62.8],
    ['C2H5OH', 46.07, 516, 63.8],
    ['CH3OH', 32.04, 513, 79.5],
    ['C3H8', 44.09, 370, 42.7],
    ['SO2', 64.06, 431, 78.7],
  ] as const)('%s against Table A-1 (International Critical Tables values)', (id, M, Tc, Pc_bar) => {
    const c = get(id);
    expect(relErr(c.MW, M * 1e-3)).toBeLessThan(1e-3);
    expect(Math.abs(c.Tc - Tc)).toBeLessThan(0.015 * Tc);
    expect(relErr(c.Pc, Pc_bar * BAR)).toBeLessThan(0.05);
  });

  // Felder and Rousseau, Elementary Principles of Chemical Processes, Appendix B, Table B.1
  // "Selected Physical Property Data" (Tc in K, Pc in atm), p. 628, as reproduced at
  // https://scribd.com/document/647828134/Physical-properties-table. Same loose tolerances.
  it.each([
    ['CH3COOH', 594.8, 57.1],
    ['C2H2', 309.5, 61.6],
    ['NH3', 405.5, 111.3],
    ['C6H6', 562.6, 48.6],
    ['CH3CHO', 461.0, Number.NaN], // no Pc given in that table
  ] as const)('%s against Table B.1 of Felder and Rousseau', (id, Tc, Pc_atm) => {
    const c = get(id);
    expect(Math.abs(c.Tc - Tc)).toBeLessThan(0.015 * Tc);
    if (!Number.isNaN(Pc_atm)) expect(relErr(c.Pc, Pc_atm * ATM)).toBeLessThan(0.05);
  });

  it('orders homologues and isomers as physics requires', () => {
    // Common practice, no source: within the n-alkanes Tc and omega rise and Pc falls with chain length;
    // a branched isomer has a lower Tc than the straight chain.
    const alkanes = ['CH4', 'C2H6', 'C3H8', 'nC4H10', 'nC5H12', 'nC6H14', 'nC7H16', 'nC8H18', 'nC9H20', 'nC10H22'].map(get);
    for (let i = 1; i < alkanes.length; i++) {
      expect(alkanes[i].Tc).toBeGreaterThan(alkanes[i - 1].Tc);
      expect(alkanes[i].omega).toBeGreaterThan(alkanes[i - 1].omega);
      if (i >= 2) expect(alkanes[i].Pc).toBeLessThan(alkanes[i - 1].Pc);
    }
    expect(get('iC4H10').Tc).toBeLessThan(get('nC4H10').Tc);
    expect(get('iC5H12').Tc).toBeLessThan(get('nC5H12').Tc);
  });
});

describe('findComponent', () => {
  it('finds exact ids, case-sensitively', () => {
    expect(findComponent('H2')?.name).toBe('hydrogen');
    expect(findComponent('nC4H10')?.name).toBe('n-butane');
    expect(findComponent('h2')).toBeUndefined();
    expect(findComponent('Co')).toBeUndefined(); // cobalt is not carbon monoxide
    expect(findComponent('co2')).toBeUndefined();
  });

  it('finds names and common aliases, case-insensitively', () => {
    expect(findComponent('hydrogen')?.id).toBe('H2');
    expect(findComponent('HYDROGEN')?.id).toBe('H2');
    expect(findComponent('n-butane')?.id).toBe('nC4H10');
    expect(findComponent('Isobutane')?.id).toBe('iC4H10');
    expect(findComponent('methanol')?.id).toBe('CH3OH');
    expect(findComponent('Methyl Alcohol')?.id).toBe('CH3OH');
    expect(findComponent('ethylene oxide')?.id).toBe('C2H4O');
    expect(findComponent('dimethyl ether')?.id).toBe('CH3OCH3');
    expect(findComponent('hydrogen sulphide')?.id).toBe('H2S');
    expect(findComponent('n-decane')?.id).toBe('nC10H22');
    expect(findComponent('Heptane')?.id).toBe('nC7H16');
  });

  it('returns undefined for unknown input', () => {
    expect(findComponent('unobtainium')).toBeUndefined();
    expect(findComponent('')).toBeUndefined();
  });
});

describe('componentIds and nearestComponentIds', () => {
  it('lists ids in table order', () => {
    expect(componentIds()).toEqual(COMPONENTS.map((c) => c.id));
  });

  it('suggests the intended id first for typical slips', () => {
    expect(nearestComponentIds('C02')[0]).toBe('CO2'); // digit zero for letter O
    expect(nearestComponentIds('co2')[0]).toBe('CO2'); // wrong case
    expect(nearestComponentIds('CH3OHH')[0]).toBe('CH3OH');
    expect(nearestComponentIds('nC4H01')[0]).toBe('nC4H10');
    expect(nearestComponentIds('metanol')[0]).toBe('CH3OH'); // misspelt name
  });

  it('returns k distinct known ids', () => {
    const s = nearestComponentIds('XYZ', 5);
    expect(s).toHaveLength(5);
    expect(new Set(s).size).toBe(5);
    for (const id of s) expect(findComponent(id)).toBeDefined();
    expect(nearestComponentIds('H2')).toHaveLength(3);
    expect(nearestComponentIds('H2')[0]).toBe('H2');
    expect(nearestComponentIds('H2', 0)).toEqual([]);
  });
});
