/**
 * Built-in table of pure-component constants: molar mass, critical temperature, critical
 * pressure and acentric factor (for the equations of state), joined with the thermochemical
 * data of src/thermo/data/thermochem.ts (ideal-gas heat capacity, hf, gf; that table is keyed by
 * the same ids and kept apart because its rows are long).
 *
 * Critical constants: Poling, Prausnitz and O'Connell, The Properties of Gases and Liquids, 5th
 * ed. (McGraw-Hill, 2001), Appendix A, recalled while the table was first written ("(from
 * memory)"). Every row has since been reviewed against evaluated compilations that were read
 * for the purpose: the critical constants adopted by the reference (Helmholtz-energy) equations
 * of state, the IUPAC series of critical-property evaluations (Ambrose and Tsonopoulos, J. Chem.
 * Eng. Data 40 (1995) 531 for the n-alkanes, and its companions), Mathews, Chem. Rev. 72 (1972)
 * 71 for inorganic gases, and IAPWS for water. The comparison (component, value here, value in
 * each compilation) is the table REVIEW in test/thermo/components.test.ts. Rows that disagreed
 * were corrected and follow the source named in their `source` (chlorine, neon, the acentric
 * factor of nitrous oxide); the four n-alkanes C7-C10 follow Ambrose and Tsonopoulos.
 *
 * Rows are written in handbook units (g/mol, K, bar) and converted once, here, to SI
 * (kg/mol, K, Pa). Molar masses agree with the formula and the IUPAC (CIAAW 2021) atomic
 * weights to better than 0.05 % (checked by test/thermo/components.test.ts).
 *
 * Ids: the formula where it is unambiguous in this table ("CH4", "CH3OH"); a condensed
 * structural formula where isomers share a formula ("CH3OCH3" vs "C2H5OH", "CH3CHO" vs
 * ethylene oxide "C2H4O"); a prefix for alkane isomers ("nC4H10", "iC4H10"). The
 * `formula` field is always parseable by parseFormula for element balances.
 */
import { editDistance } from '../diagnostics.js';
import { THERMO } from './data/thermochem.js';
import type { ComponentData } from './types.js';

const POLING_5 =
  "Poling, Prausnitz and O'Connell, The Properties of Gases and Liquids, 5th ed. (McGraw-Hill, 2001), Appendix A (from memory); agrees with the evaluated compilations in the REVIEW table of test/thermo/components.test.ts";
const AMBROSE_1995 =
  'Tc, Pc: Ambrose and Tsonopoulos, J. Chem. Eng. Data 40 (1995) 531 (IUPAC evaluation of the n-alkanes); omega: value adopted with the reference equation of state for the fluid';

const BAR = 1e5; // Pa

/** One row in handbook units (g/mol, K, bar) converted to SI, joined with its thermochemical data. */
function row(
  id: string,
  name: string,
  formula: string,
  M_gPerMol: number,
  Tc_K: number,
  Pc_bar: number,
  omega: number,
  source: string = POLING_5,
): ComponentData {
  const t = THERMO[id];
  if (!t) throw new Error(`component table: no thermochemical data for ${id}`);
  return Object.freeze({
    id,
    name,
    formula,
    MW: M_gPerMol * 1e-3,
    Tc: Tc_K,
    Pc: Pc_bar * BAR,
    omega,
    source,
    cp: t.cp,
    hf: t.hf,
    gf: t.gf,
    thermoSource: t.thermoSource,
  });
}

/** The built-in component table, in a fixed order (light gases, hydrocarbons, polar, sulfur/chlorine/nitrogen species, oxygenates, aromatics, heavier n-alkanes). */
export const COMPONENTS: readonly ComponentData[] = Object.freeze([
  //  id          name                 formula    M g/mol  Tc K     Pc bar   omega
  row('H2', 'hydrogen', 'H2', 2.016, 33.19, 13.13, -0.216, POLING_5 + '. Its Pc is 1.3 % above the reference EOS for normal hydrogen (Leachman et al. 2009: 12.964 bar) and Mathews (1972: 12.97 bar), inside the review tolerance (see the note on hydrogen in test/thermo/components.test.ts)'),
  row('He', 'helium', 'He', 4.003, 5.19, 2.27, -0.39),
  row('Ne', 'neon', 'Ne', 20.18, 44.4, 26.62, -0.0355, 'Constants adopted with the reference equation of state for neon (as tabulated with the reference-EOS fluid constants): 44.4 K, 2.66163 MPa, omega -0.0355; the earlier 27.6 bar here agreed only with Mathews, Chem. Rev. 72 (1972) 71 (27.56 bar)'),
  row('Ar', 'argon', 'Ar', 39.948, 150.86, 48.98, -0.002),
  row('N2', 'nitrogen', 'N2', 28.014, 126.2, 33.98, 0.037),
  row('O2', 'oxygen', 'O2', 31.999, 154.58, 50.43, 0.022),
  row('CO', 'carbon monoxide', 'CO', 28.01, 132.85, 34.94, 0.045),
  row('CO2', 'carbon dioxide', 'CO2', 44.01, 304.12, 73.74, 0.225),
  row('CH4', 'methane', 'CH4', 16.043, 190.56, 45.99, 0.011),
  row('C2H6', 'ethane', 'C2H6', 30.07, 305.32, 48.72, 0.099),
  row('C2H4', 'ethylene', 'C2H4', 28.054, 282.34, 50.41, 0.087),
  row('C2H2', 'acetylene', 'C2H2', 26.038, 308.3, 61.14, 0.189),
  row('C3H8', 'propane', 'C3H8', 44.097, 369.83, 42.48, 0.152),
  row('C3H6', 'propylene', 'C3H6', 42.081, 364.9, 46.0, 0.142),
  row('nC4H10', 'n-butane', 'C4H10', 58.123, 425.12, 37.96, 0.2),
  row('iC4H10', 'isobutane', 'C4H10', 58.123, 407.85, 36.4, 0.186),
  row('nC5H12', 'n-pentane', 'C5H12', 72.15, 469.7, 33.7, 0.252),
  row('iC5H12', 'isopentane', 'C5H12', 72.15, 460.39, 33.81, 0.229),
  row('nC6H14', 'n-hexane', 'C6H14', 86.177, 507.6, 30.25, 0.3),
  row('H2O', 'water', 'H2O', 18.015, 647.14, 220.64, 0.344),
  row('NH3', 'ammonia', 'NH3', 17.031, 405.65, 112.8, 0.253),
  row('CH3OH', 'methanol', 'CH3OH', 32.042, 512.64, 80.97, 0.565),
  row('C2H5OH', 'ethanol', 'C2H5OH', 46.069, 513.92, 61.48, 0.649),
  row('H2S', 'hydrogen sulfide', 'H2S', 34.082, 373.4, 89.63, 0.09),
  row('SO2', 'sulfur dioxide', 'SO2', 64.065, 430.75, 78.84, 0.245),
  row('SO3', 'sulfur trioxide', 'SO3', 80.064, 490.85, 82.1, 0.424),
  row('COS', 'carbonyl sulfide', 'COS', 60.076, 378.8, 63.49, 0.097),
  row('Cl2', 'chlorine', 'Cl2', 70.906, 416.87, 76.42, 0.07, 'Constants adopted with the reference equation of state for chlorine (as tabulated with the reference-EOS fluid constants): 416.8654 K, 7.6424 MPa, omega 0.070; Mathews, Chem. Rev. 72 (1972) 71: 417 K, 77.0 bar. The earlier 79.8 bar and 0.090 here agreed with no evaluated compilation'),
  row('HCl', 'hydrogen chloride', 'HCl', 36.461, 324.65, 83.09, 0.131),
  row('N2O', 'nitrous oxide', 'N2O', 44.013, 309.57, 72.45, 0.162, "Tc, Pc: Poling, Prausnitz and O'Connell, 5th ed., App. A (from memory), as Mathews (1972) and the reference EOS; omega: reference equation of state for N2O (Lemmon and Span 2006, value as tabulated with it), the earlier 0.142 here was 0.020 lower"),
  row('NO', 'nitric oxide', 'NO', 30.006, 180.15, 64.8, 0.583),
  row('C2H4O', 'ethylene oxide', 'C2H4O', 44.053, 469.15, 71.9, 0.197),
  row('CH3CHO', 'acetaldehyde', 'CH3CHO', 44.053, 466.0, 55.7, 0.291),
  row('CH3COOH', 'acetic acid', 'CH3COOH', 60.053, 592.0, 57.86, 0.467),
  row('CH2O', 'formaldehyde', 'CH2O', 30.026, 408.0, 65.9, 0.282, "Poling, Prausnitz and O'Connell, The Properties of Gases and Liquids, 5th ed. (McGraw-Hill, 2001), Appendix A (from memory); no second evaluated compilation was found for formaldehyde (it polymerises below its critical point)"),
  row('CH3OCH3', 'dimethyl ether', 'CH3OCH3', 46.069, 400.1, 53.7, 0.2),
  row('C6H6', 'benzene', 'C6H6', 78.114, 562.05, 48.95, 0.21),
  row('C7H8', 'toluene', 'C7H8', 92.141, 591.75, 41.08, 0.264),
  row('C6H12', 'cyclohexane', 'C6H12', 84.161, 553.5, 40.73, 0.211),
  row('nC7H16', 'n-heptane', 'C7H16', 100.204, 540.2, 27.4, 0.349, AMBROSE_1995),
  row('nC8H18', 'n-octane', 'C8H18', 114.231, 568.7, 24.9, 0.398, AMBROSE_1995),
  row('nC9H20', 'n-nonane', 'C9H20', 128.258, 594.6, 22.9, 0.4433, AMBROSE_1995),
  row('nC10H22', 'n-decane', 'C10H22', 142.285, 617.7, 21.1, 0.4884, AMBROSE_1995),
]);

/** Extra names accepted by findComponent besides each row's `name` (matched case-insensitively). */
const EXTRA_NAMES: Readonly<Record<string, string>> = Object.freeze({
  butane: 'nC4H10',
  'normal butane': 'nC4H10',
  'i-butane': 'iC4H10',
  '2-methylpropane': 'iC4H10',
  pentane: 'nC5H12',
  'i-pentane': 'iC5H12',
  '2-methylbutane': 'iC5H12',
  hexane: 'nC6H14',
  heptane: 'nC7H16',
  octane: 'nC8H18',
  nonane: 'nC9H20',
  decane: 'nC10H22',
  ethene: 'C2H4',
  ethyne: 'C2H2',
  propene: 'C3H6',
  'methyl alcohol': 'CH3OH',
  'ethyl alcohol': 'C2H5OH',
  'hydrogen sulphide': 'H2S',
  'sulphur dioxide': 'SO2',
  'sulphur trioxide': 'SO3',
  'carbonyl sulphide': 'COS',
  'dinitrogen monoxide': 'N2O',
  'nitrogen monoxide': 'NO',
  oxirane: 'C2H4O',
  ethanal: 'CH3CHO',
  'ethanoic acid': 'CH3COOH',
  methanal: 'CH2O',
  methoxymethane: 'CH3OCH3',
  methylbenzene: 'C7H8',
});

/** id -> row, and lower-case name -> row; built once from the frozen table. */
const BY_ID: ReadonlyMap<string, ComponentData> = new Map(COMPONENTS.map((c) => [c.id, c]));
const BY_NAME: ReadonlyMap<string, ComponentData> = (() => {
  const m = new Map<string, ComponentData>();
  const put = (name: string, c: ComponentData): void => {
    const key = name.toLowerCase();
    const had = m.get(key);
    if (had && had !== c) throw new Error(`component table: name "${name}" is used by ${had.id} and ${c.id}`);
    m.set(key, c);
  };
  for (const c of COMPONENTS) put(c.name, c);
  for (const [name, id] of Object.entries(EXTRA_NAMES)) {
    const c = BY_ID.get(id);
    if (!c) throw new Error(`component table: alias "${name}" points to unknown id ${id}`);
    put(name, c);
  }
  return m;
})();

/**
 * The row for an id (exact, case-sensitive: "CO" and "Co" differ), or for a name such as
 * "hydrogen", "n-butane", "Methanol" (case-insensitive). undefined when nothing matches.
 */
export function findComponent(id: string): ComponentData | undefined {
  return BY_ID.get(id) ?? BY_NAME.get(id.trim().toLowerCase());
}

/** All ids in table order (a fresh array). */
export function componentIds(): string[] {
  return COMPONENTS.map((c) => c.id);
}

/**
 * The k ids closest to `id` for "did you mean" messages. Distance is the smaller of the
 * edit distance to the id and (case-insensitively) to the row's name; a difference in
 * letter case only counts half so that "co2" suggests "CO2" first. Ties keep table order.
 */
export function nearestComponentIds(id: string, k = 3): string[] {
  if (!(k > 0)) return [];
  const q = id.trim();
  const ql = q.toLowerCase();
  const scored = COMPONENTS.map((c, order) => {
    const exact = editDistance(q, c.id);
    const folded = editDistance(ql, c.id.toLowerCase());
    const byId = Math.min(exact, folded + 0.5 * (exact - folded > 0 ? 1 : 0));
    const byName = editDistance(ql, c.name.toLowerCase());
    return { id: c.id, d: Math.min(byId, byName), order };
  });
  scored.sort((x, y) => x.d - y.d || x.order - y.order);
  return scored.slice(0, Math.floor(k)).map((s) => s.id);
}
