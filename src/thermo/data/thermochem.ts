/**
 * Thermochemical data of the built-in components: ideal-gas heat capacity with its range, the
 * standard enthalpy of formation of the ideal gas at 298.15 K (hf) and the standard Gibbs energy
 * of formation of the ideal gas at 298.15 K and 1 bar (gf), each with its source. This table is
 * kept apart from components.ts, which holds one short row of critical constants per component,
 * and is keyed by the same ids; components.ts joins the two.
 *
 * Heat capacity. For 40 components: the NASA Glenn 7-coefficient polynomials in two ranges,
 *   Cp/R = a1 + a2 T + a3 T^2 + a4 T^3 + a5 T^4      (200 or 298.15 K .. 1000 K .. 5000 or 6000 K;
 *   five older fits are stated from 300 K, see LOWER_LIMIT_NOTE)
 * from the NASA thermodynamic database (McBride, Gordon and Reno, "Coefficients for calculating
 * thermodynamic and transport properties of individual species", NASA TM-4513, 1993; the later
 * 200-1000-6000 K fits are McBride's, NASA Glenn), copied coefficient by coefficient from that
 * database (a public US-government work). n-hexane's polynomial is the NASA Glenn fit dated
 * 6/01 (TRC 1985 data) as reproduced in Burcat and Ruscic, "Third millennium ideal gas and
 * condensed phase thermochemical database", ANL-05/20 and TAE 960 (2005; 2015 file). The a6 and a7
 * terms (enthalpy and entropy constants on the NASA basis) are kept in `NASA7` for the checks
 * in the tests; the model uses a1..a5 only. n-Nonane and n-decane have no NASA polynomial
 * that we could check against a second source (the only two-range fit found for n-nonane is
 * about 11 % low in Cp at 300 K against the TRC-based values of Poling et al.), so they take the
 * one-range polynomial of Poling, Prausnitz and O'Connell, The Properties of Gases and Liquids,
 * 5th ed. (2001), Appendix A, 200-1000 K. Methane's NASA polynomial runs 2.5 % above JANAF near
 * 1000 K, so methane takes the NIST WebBook's Shomate fit of JANAF instead (two ranges, t = T/1000,
 * rescaled here to the Cp/R form: a0 = A/R, a1 = B/(1000 R), a2 = C/(10^6 R), a3 = D/(10^9 R),
 * d = 10^6 E/R).
 *
 * Formation data, in this order of preference:
 *   1. CODATA key values (Cox, Wagman and Medvedev, CODATA Key Values for Thermodynamics, 1989)
 *      for hf and the absolute entropy S°: H2O, CO, CO2, NH3, HCl, H2S, SO2 (values recalled,
 *      so marked "(from memory)"; the tests hold them against NIST-JANAF, 4th ed., 1998).
 *   2. Active Thermochemical Tables (Ruscic et al., ATcT ver. 1.112) for hf, with the entropy of
 *      formation from NIST-JANAF 4th ed. (gf = hf - (hf - gf)_JANAF) where JANAF has the species,
 *      or from the NASA polynomial's absolute entropy at 298.15 K otherwise.
 *   3. NIST-JANAF 4th ed. (Chase 1998) hf and gf as tabulated: SO3, COS.
 *   4. The value carried by the NASA polynomial (its H at 298.15 K is hf on the NASA basis):
 *      acetic acid, n-pentane, isopentane; published values of the original studies for
 *      n-nonane and n-decane (see their rows).
 * Where gf is computed it is gf = hf - 298.15 K x (S° - sum of the elements' S° in their
 * reference states), with the CODATA 1989 element entropies below; the tests recompute every
 * such gf from the stated inputs.
 */
import type { CpCorrelation } from '../types.js';

/** A NASA 7-coefficient polynomial pair: ranges [Tlow, Tmid, Thigh] (K), coefficients a1..a7 below and above Tmid. */
export interface Nasa7 {
  T: readonly [number, number, number];
  low: readonly number[];
  high: readonly number[];
}

/** What a component needs for the energy balance and for chemical equilibrium. */
export interface ThermoEntry {
  cp: CpCorrelation;
  /** Standard enthalpy of formation of the ideal gas at 298.15 K, J/mol. */
  hf: number;
  /** Standard Gibbs energy of formation of the ideal gas at 298.15 K and 1 bar, J/mol. */
  gf: number;
  thermoSource: string;
}

/**
 * Standard entropies of the elements in their reference states at 298.15 K and 1 bar, J/(mol K),
 * per mole of the species named: CODATA Key Values (Cox, Wagman and Medvedev, 1989) (from memory).
 */
export const ELEMENT_S298: Readonly<Record<string, number>> = Object.freeze({
  H2: 130.68,
  O2: 205.152,
  N2: 191.609,
  Cl2: 223.081,
  'C(graphite)': 5.74,
  'S(rhombic)': 32.054,
});

/**
 * LOWER_LIMIT_NOTE: five of the older NASA fits (COS, H2S, HCl, SO2, SO3) are stated for 300 K
 * upwards, but their a6 and a7 are fixed at 298.15 K, where the formation data are defined; they
 * are used here from 298.15 K, 1.85 K below the stated limit (common practice, no source).
 */
/** NASA 7-coefficient polynomials (see the header), by component id. */
export const NASA7: Readonly<Record<string, Nasa7>> = Object.freeze({
  // CH4: the NASA TM-4513 polynomial (the one also carried by GRI-Mech 3.0) runs 2.5 % above JANAF at
  // 1000-1300 K (73.6 against 71.8 J/(mol K) at 1000 K); methane takes JANAF's Shomate fit instead (SHOMATE).
  CH3OH: {
    T: [200, 1000, 6000],
    low: [5.71539582, -0.0152309129, 6.52441155e-5, -7.10806889e-8, 2.61352698e-11, -25642.7656, -1.50409823],
    high: [3.60134486, 0.0102430954, -3.59985517e-6, 5.72505986e-10, -3.3911764e-14, -25997.191, 4.70512253],
  },
  CO: {
    T: [200, 1000, 6000],
    low: [3.57953347, -6.1035368e-4, 1.01681433e-6, 9.07005884e-10, -9.04424499e-13, -14344.086, 3.50840928],
    high: [3.04848583, 0.00135172818, -4.85794075e-7, 7.88536486e-11, -4.69807489e-15, -14266.1171, 6.0170979],
  },
  COS: {
    T: [298.15, 1000, 5000], // NASA: 300-1000-5000 K; see LOWER_LIMIT_NOTE
    low: [2.4625321, 0.011947992, -1.379437e-5, 8.0707736e-9, -1.8327653e-12, -17803.987, 10.8058688],
    high: [5.2392, 0.0024100584, -9.6064522e-7, 1.7778347e-10, -1.2235704e-14, -18480.455, -3.07773889],
  },
  CO2: {
    T: [200, 1000, 6000],
    low: [2.35677352, 0.00898459677, -7.12356269e-6, 2.45919022e-9, -1.43699548e-13, -48371.9697, 9.90105222],
    high: [4.63659493, 0.00274131991, -9.95828531e-7, 1.60373011e-10, -9.16103468e-15, -49024.9341, -1.93534855],
  },
  C2H2: {
    T: [200, 1000, 6000],
    low: [0.808681094, 0.0233615629, -3.55171815e-5, 2.80152437e-8, -8.50072974e-12, 26428.9807, 13.9397051],
    high: [4.65878504, 0.00488396547, -1.60828775e-6, 2.46974226e-10, -1.3860568e-14, 25759.4044, -3.99834772],
  },
  C2H4: {
    T: [200, 1000, 6000],
    low: [3.95920148, -0.00757052247, 5.70990292e-5, -6.91588753e-8, 2.69884373e-11, 5089.77593, 4.09733096],
    high: [3.99182761, 0.010483391, -3.71721385e-6, 5.94628514e-10, -3.53630526e-14, 4268.65819, -0.269052151],
  },
  C2H4O: {
    T: [200, 1000, 6000],
    low: [3.75904931, -0.00944119292, 8.0309677e-5, -1.00807756e-7, 4.00398357e-11, -7560.81402, 7.8497703],
    high: [5.48888429, 0.0120460231, -4.33361545e-6, 7.00269e-10, -4.1948187e-14, -9180.47576, -7.08063868],
  },
  CH3CHO: {
    T: [200, 1000, 6000],
    low: [4.72947627, -0.00319343161, 4.75353505e-5, -5.74590474e-8, 2.19312619e-11, -21572.8799, 4.10295455],
    high: [5.40417899, 0.0117229675, -4.2262683e-6, 6.83715733e-10, -4.09842676e-14, -22593.1508, -3.48117593],
  },
  CH3COOH: {
    T: [200, 1000, 6000],
    low: [2.78936844, 0.0100001016, 3.42557978e-5, -5.09017919e-8, 2.06217504e-11, -53475.2292, 14.1059504],
    high: [7.67083678, 0.0135152695, -5.25874688e-6, 8.93185062e-10, -5.53180891e-14, -55756.0971, -15.467659],
  },
  C2H6: {
    T: [200, 1000, 6000],
    low: [4.29142492, -0.0055015427, 5.99438288e-5, -7.08466285e-8, 2.68685771e-11, -11522.2055, 2.66682316],
    high: [4.04666674, 0.0153538766, -5.47039321e-6, 8.77826228e-10, -5.23167305e-14, -12447.3512, -0.968683607],
  },
  CH3OCH3: {
    T: [200, 1000, 6000],
    low: [5.30562279, -0.00214254272, 5.30873244e-5, -6.23147136e-8, 2.30731036e-11, -23986.6295, 0.713264209],
    high: [5.64844183, 0.0163381899, -5.86802367e-6, 9.46836869e-10, -5.66504738e-14, -25107.469, -5.96264939],
  },
  C2H5OH: {
    T: [200, 1000, 6000],
    low: [4.85868178, -0.0037400674, 6.95550267e-5, -8.86541147e-8, 3.5168443e-11, -29996.1309, 4.80192294],
    high: [6.5628977, 0.0152034264, -5.38922247e-6, 8.62150224e-10, -5.12824683e-14, -31525.7984, -9.47557644],
  },
  C3H6: {
    T: [200, 1000, 6000],
    low: [3.83464524, 0.00329078405, 5.05228184e-5, -6.66251418e-8, 2.63707585e-11, 753.838295, 7.53410995],
    high: [6.03870499, 0.0162963895, -5.82130624e-6, 9.35936483e-10, -5.58602903e-14, -776.595092, -8.43824322],
  },
  C3H8: {
    T: [200, 1000, 6000],
    low: [4.2110262, 0.00171599803, 7.06183472e-5, -9.19594116e-8, 3.64421372e-11, -14381.2106, 5.60930491],
    high: [6.66789363, 0.0206120214, -7.36553027e-6, 1.18440761e-9, -7.0695321e-14, -16274.8521, -13.1859503],
  },
  iC4H10: {
    T: [200, 1000, 6000],
    low: [4.45479276, 0.00826057985, 8.29886664e-5, -1.14647642e-7, 4.64570101e-11, -18459.3931, 4.92743175],
    high: [9.76991245, 0.025499721, -9.14142932e-6, 1.47328271e-9, -8.80800188e-14, -21405.2647, -30.0329101],
  },
  nC4H10: {
    T: [200, 1000, 6000],
    low: [6.14746806, 1.55947389e-4, 9.67913517e-5, -1.2548391e-7, 4.97816555e-11, -17599.4402, -1.09409879],
    high: [9.44535834, 0.0257858073, -9.23619122e-6, 1.48632755e-9, -8.87897158e-14, -20138.2165, -26.3470076],
  },
  nC5H12: {
    T: [298.15, 1000, 5000],
    low: [1.8983679, 0.041203037, 1.2312175e-5, -3.6589501e-8, 1.5042509e-11, -20091.5, 18.679082],
    high: [13.546998, 0.028421786, -9.4174648e-6, 1.3893589e-9, -7.4212609e-14, -24577.68, -47.021175],
  },
  iC5H12: {
    T: [298.15, 1000, 5000],
    low: [1.0832882, 0.044571076, 8.2389934e-6, -3.5258047e-8, 1.5785762e-11, -20807.535, 21.795155],
    high: [12.327787, 0.030613087, -9.8415785e-6, 1.3919776e-9, -7.0337345e-14, -25037.492, -41.133494],
  },
  C6H6: {
    T: [200, 1000, 6000],
    low: [0.503469664, 0.0185142363, 7.37864409e-5, -1.18106127e-7, 5.07182527e-11, 8552.66293, 21.6481796],
    high: [11.0771708, 0.0207067895, -7.516251e-6, 1.22209416e-9, -7.35312513e-14, 4309.88395, -40.011695],
  },
  C6H12: {
    T: [200, 1000, 6000],
    low: [4.04348764, -0.00619527424, 1.76621086e-4, -2.22967809e-7, 8.6366739e-11, -16920.2872, 8.52566766],
    high: [13.2147562, 0.035824241, -1.32110595e-5, 2.17202254e-9, -1.3173054e-13, -22809.1954, -55.3526464],
  },
  C7H8: {
    T: [200, 1000, 6000],
    low: [1.611914, 0.0211188902, 8.53221453e-5, -1.32566876e-7, 5.59406109e-11, 4096.51976, 20.2973614],
    high: [12.939475, 0.0266921558, -9.68420108e-6, 1.5739214e-9, -9.46670482e-14, -677.035769, -46.7255302],
  },
  nC7H16: {
    T: [200, 1000, 6000],
    low: [11.1532484, -0.00949415433, 1.95571181e-4, -2.4975252e-7, 9.84873213e-11, -26771.1735, -15.909611],
    high: [18.5354704, 0.0391420468, -1.38030268e-5, 2.22403874e-9, -1.3345258e-13, -31950.0783, -70.190284],
  },
  nC8H18: {
    T: [200, 1000, 6000],
    low: [12.5244908, -0.0101018365, 2.21991595e-4, -2.8486242e-7, 1.12409624e-10, -29843.3034, -19.7108554],
    high: [22.1755407, 0.0424426161, -1.49161103e-5, 2.40376673e-9, -1.44359037e-13, -36103.0944, -88.0854457],
  },
  Cl2: {
    T: [200, 1000, 6000],
    low: [2.73638114, 0.007835257, -1.45104963e-5, 1.25730834e-8, -4.13247145e-12, -1058.80114, 9.44555879],
    high: [4.74727508, -4.8858171e-4, 2.68444871e-7, -2.43476083e-11, -1.03683148e-15, -1511.01862, -0.344551305],
  },
  H2: {
    T: [200, 1000, 6000],
    low: [2.34433112, 0.00798052075, -1.9478151e-5, 2.01572094e-8, -7.37611761e-12, -917.935173, 0.683010238],
    high: [2.93286579, 8.26607967e-4, -1.46402335e-7, 1.54100359e-11, -6.88804432e-16, -813.065597, -1.02432887],
  },
  CH2O: {
    T: [200, 1000, 6000],
    low: [4.79372315, -0.00990833369, 3.73220008e-5, -3.79285261e-8, 1.31772652e-11, -14308.9567, 0.6028129],
    high: [3.16952654, 0.00619320583, -2.25056377e-6, 3.6597568e-10, -2.2014947e-14, -14478.4444, 6.04209449],
  },
  H2O: {
    T: [200, 1000, 6000],
    low: [4.19864056, -0.0020364341, 6.52040211e-6, -5.48797062e-9, 1.77197817e-12, -30293.7267, -0.849032208],
    high: [2.67703787, 0.00297318329, -7.7376969e-7, 9.44336689e-11, -4.26900959e-15, -29885.8938, 6.88255571],
  },
  H2S: {
    T: [298.15, 1000, 5000], // NASA: 300-1000-5000 K; see LOWER_LIMIT_NOTE
    low: [3.9323476, -5.0260905e-4, 4.5928473e-6, -3.1807214e-9, 6.6497561e-13, -3650.5359, 2.3157905],
    high: [2.7452199, 0.0040434607, -1.538451e-6, 2.7520249e-10, -1.8592095e-14, -3419.9444, 8.0546745],
  },
  He: {
    T: [200, 1000, 6000],
    low: [2.5, 0, 0, 0, 0, -745.375, 0.928724724],
    high: [2.5, 0, 0, 0, 0, -745.375, 0.928724724],
  },
  HCl: {
    T: [298.15, 1000, 5000], // NASA: 300-1000-5000 K; see LOWER_LIMIT_NOTE
    low: [3.5248171, 2.9984862e-5, -8.6221891e-7, 2.0979721e-9, -9.8658191e-13, -12150.509, 2.40892359],
    high: [2.7665884, 0.0014381883, -4.6993e-7, 7.3499408e-11, -4.3731106e-15, -11917.468, 6.47150629],
  },
  N2: {
    T: [200, 1000, 6000],
    low: [3.53100528, -1.23660987e-4, -5.02999437e-7, 2.43530612e-9, -1.40881235e-12, -1046.97628, 2.96747468],
    high: [2.95257626, 0.00139690057, -4.92631691e-7, 7.86010367e-11, -4.60755321e-15, -923.948645, 5.87189252],
  },
  N2O: {
    T: [200, 1000, 6000],
    low: [2.2571686, 0.0113046338, -1.3671035e-5, 9.68162098e-9, -2.93055583e-12, 8741.77146, 10.7579154],
    high: [4.82318873, 0.00262685279, -9.58426058e-7, 1.59991296e-10, -9.77416939e-15, 8073.35662, -2.202366],
  },
  NH3: {
    T: [200, 1000, 6000],
    low: [4.30177808, -0.0047712733, 2.19341619e-5, -2.29856489e-8, 8.28992268e-12, -6748.06394, -0.690644393],
    high: [2.71709692, 0.00556856338, -1.76886396e-6, 2.6741726e-10, -1.52731419e-14, -6584.51989, 6.09289837],
  },
  NO: {
    T: [200, 1000, 6000],
    low: [4.21859896, -0.00463988124, 1.10443049e-5, -9.34055507e-9, 2.80554874e-12, 9845.09964, 2.28061001],
    high: [3.26071234, 0.00119101135, -4.29122646e-7, 6.94481463e-11, -4.03295681e-15, 9921.43132, 6.36900518],
  },
  Ne: {
    T: [200, 1000, 6000],
    low: [2.5, 0, 0, 0, 0, -745.375, 3.35532272],
    high: [2.5, 0, 0, 0, 0, -745.375, 3.35532272],
  },
  O2: {
    T: [200, 1000, 6000],
    low: [3.78245636, -0.00299673415, 9.847302e-6, -9.68129508e-9, 3.24372836e-12, -1063.94356, 3.65767573],
    high: [3.66096083, 6.56365523e-4, -1.41149485e-7, 2.05797658e-11, -1.29913248e-15, -1215.97725, 3.41536184],
  },
  SO2: {
    T: [298.15, 1000, 5000], // NASA: 300-1000-5000 K; see LOWER_LIMIT_NOTE
    low: [3.2665338, 0.0053237902, 6.8437552e-7, -5.2810047e-9, 2.5590454e-12, -36908.148, 9.66465108],
    high: [5.2451364, 0.0019704204, -8.0375769e-7, 1.5149969e-10, -1.0558004e-14, -37558.227, -1.07404892],
  },
  SO3: {
    T: [298.15, 1000, 5000], // NASA: 300-1000-5000 K; see LOWER_LIMIT_NOTE
    low: [2.5780385, 0.014556335, -9.1764173e-6, -7.9203022e-10, 1.9709473e-12, -48931.753, 12.2651384],
    high: [7.0757376, 0.0031763387, -1.353576e-6, 2.5630912e-10, -1.7936044e-14, -50211.376, -11.1875176],
  },
  // Monatomic gas: Cp/R = 5/2 exactly; a7 from the NASA Glenn 2002 database (McBride, Zehe and Gordon, NASA TP-2002-211556).
  Ar: {
    T: [200, 1000, 6000],
    low: [2.5, 0, 0, 0, 0, -745.375, 4.37967491],
    high: [2.5, 0, 0, 0, 0, -745.375, 4.37967491],
  },
  // NASA Glenn fit dated 6/01 to TRC (1985) data, as reproduced by Burcat and Ruscic (see the header).
  nC6H14: {
    T: [200, 1000, 6000],
    low: [9.87121167, -0.00936699002, 1.69887865e-4, -2.1501952e-7, 8.45407091e-11, -23718.5495, -12.4999353],
    high: [19.5158086, 0.0267753942, -7.49783741e-6, 1.19510646e-9, -7.51957473e-14, -29436.2466, -77.4895497],
  },
});

/**
 * One-range polynomials Cp/R = a0 + a1 T + a2 T^2 + a3 T^3 + a4 T^4 from Poling, Prausnitz and
 * O'Connell, The Properties of Gases and Liquids, 5th ed. (McGraw-Hill, 2001), Appendix A
 * (coefficients as printed there, a1..a4 already multiplied out), [Tmin, Tmax] in K.
 */
export const POLING_CP: Readonly<Record<string, { T: readonly [number, number]; a: readonly number[] }>> = Object.freeze({
  nC9H20: { T: [200, 1000], a: [12.152, 0.004575, 2.0416e-4, -2.6777e-7, 1.0465e-10] },
  nC10H22: { T: [200, 1000], a: [13.467, 0.004139, 2.3127e-4, -3.0477e-7, 1.197e-10] },
});

/**
 * Shomate parameters of the NIST Chemistry WebBook (fits of NIST-JANAF 4th ed., Chase 1998),
 * Cp = A + B t + C t^2 + D t^3 + E / t^2 J/(mol K) with t = T/1000, over [T0, T1] and [T1, T2] K.
 */
export const SHOMATE: Readonly<Record<string, { T: readonly [number, number, number]; low: readonly number[]; high: readonly number[] }>> =
  Object.freeze({
    CH4: {
      T: [298, 1300, 6000],
      low: [-0.703029, 108.4773, -42.52157, 5.862788, 0.678565],
      high: [85.81217, 11.26467, -2.114146, 0.13819, -26.42221],
    },
  });

/** Gas constant used to make the Shomate parameters dimensionless, J/(mol K) (as src/thermo/constants.ts). */
const R_SHOMATE = 8.314462618;

function shomatePiece(p: readonly number[], Tmin: number, Tmax: number) {
  const [A, B, C, D, E] = p;
  return Object.freeze({
    a: Object.freeze([A / R_SHOMATE, B / (1e3 * R_SHOMATE), C / (1e6 * R_SHOMATE), D / (1e9 * R_SHOMATE)]),
    d: (E * 1e6) / R_SHOMATE,
    Tmin,
    Tmax,
  });
}

function fromShomate(s: { T: readonly [number, number, number]; low: readonly number[]; high: readonly number[] }): CpCorrelation {
  return Object.freeze({ pieces: Object.freeze([shomatePiece(s.low, s.T[0], s.T[1]), shomatePiece(s.high, s.T[1], s.T[2])]) });
}

function fromNasa7(n: Nasa7): CpCorrelation {
  return Object.freeze({
    pieces: Object.freeze([
      Object.freeze({ a: Object.freeze(n.low.slice(0, 5)), Tmin: n.T[0], Tmax: n.T[1] }),
      Object.freeze({ a: Object.freeze(n.high.slice(0, 5)), Tmin: n.T[1], Tmax: n.T[2] }),
    ]),
  });
}

function fromPoling(p: { T: readonly [number, number]; a: readonly number[] }): CpCorrelation {
  return Object.freeze({ pieces: Object.freeze([Object.freeze({ a: Object.freeze([...p.a]), Tmin: p.T[0], Tmax: p.T[1] })]) });
}

const CP_NASA = 'Cp: NASA Glenn 7-coefficient polynomials (McBride, Gordon and Reno, NASA TM-4513, 1993)';
const CP_SHOMATE = 'Cp: NIST Chemistry WebBook Shomate parameters, fits of NIST-JANAF 4th ed. (Chase, 1998), 298-1300-6000 K';
const CP_POLING = "Cp: Poling, Prausnitz and O'Connell, 5th ed. (2001), App. A polynomial, 200-1000 K";
const CODATA = 'hf and S°: CODATA Key Values (Cox, Wagman and Medvedev, 1989) (from memory), gf = hf - T (S° - S° elements)';
const ATCT = 'hf: Active Thermochemical Tables (Ruscic et al., ATcT ver. 1.112)';
const JANAF = 'NIST-JANAF Thermochemical Tables, 4th ed. (Chase, 1998)';
const S_JANAF = `gf = hf - (hf - gf) of ${JANAF}`;
const S_NASA = 'gf = hf - T (S° - S° elements, CODATA 1989) with S° from the NASA polynomial at 298.15 K';

function entry(id: string, hf: number, gf: number, source: string): ThermoEntry {
  const n = NASA7[id];
  const sh = SHOMATE[id];
  const p = POLING_CP[id];
  const cp = n ? fromNasa7(n) : sh ? fromShomate(sh) : p ? fromPoling(p) : undefined;
  if (!cp) throw new Error(`thermochemistry table: no heat capacity for ${id}`);
  return Object.freeze({ cp, hf, gf, thermoSource: `${n ? CP_NASA : sh ? CP_SHOMATE : CP_POLING}; ${source}` });
}

/** Thermochemical data by component id. hf and gf in J/mol (ideal gas, 298.15 K, 1 bar). */
export const THERMO: Readonly<Record<string, ThermoEntry>> = Object.freeze({
  // Elements in their reference states: hf = gf = 0 by definition.
  H2: entry('H2', 0, 0, 'reference state of the element'),
  He: entry('He', 0, 0, 'reference state of the element'),
  Ne: entry('Ne', 0, 0, 'reference state of the element'),
  Ar: entry('Ar', 0, 0, 'reference state of the element'),
  N2: entry('N2', 0, 0, 'reference state of the element'),
  O2: entry('O2', 0, 0, 'reference state of the element'),
  Cl2: entry('Cl2', 0, 0, 'reference state of the element'),
  // 1. CODATA key values: hf and S° (J/(mol K)) in the comment; gf computed from them.
  CO: entry('CO', -110530, -137168, CODATA), //            S° 197.660
  CO2: entry('CO2', -393510, -394373, CODATA), //          S° 213.785
  H2O: entry('H2O', -241826, -228582, CODATA), //          S° 188.835
  NH3: entry('NH3', -45940, -16407, CODATA), //            S° 192.77
  HCl: entry('HCl', -92310, -95298, CODATA), //            S° 186.902
  H2S: entry('H2S', -20600, -33443, CODATA), //            S° 205.81
  SO2: entry('SO2', -296810, -300095, CODATA), //          S° 248.223
  // 2a. ATcT hf; entropy of formation from JANAF: (hf, gf)_JANAF in the comment.
  CH4: entry('CH4', -74534, -50429, `${ATCT}; ${S_JANAF}`), //        JANAF -74873, -50768
  C2H4: entry('C2H4', 52560, 68514, `${ATCT}; ${S_JANAF}`), //        JANAF 52467, 68421
  C2H2: entry('C2H2', 228320, 210789, `${ATCT}; ${S_JANAF}`), //      JANAF 226731, 209200
  CH2O: entry('CH2O', -109160, -103184, `${ATCT}; ${S_JANAF}`), //    JANAF -115897, -109921
  C2H4O: entry('C2H4O', -52680, -13204, `${ATCT}; ${S_JANAF}`), //    JANAF -52635, -13159
  NO: entry('NO', 91089, 87398, `${ATCT}; ${S_JANAF}`), //            JANAF 90291, 86600
  N2O: entry('N2O', 82574, 104705, `${ATCT}; ${S_JANAF}`), //         JANAF 82048, 104179
  // 2b. ATcT hf; S° of the NASA polynomial at 298.15 K (J/(mol K)) in the comment.
  C2H6: entry('C2H6', -83780, -31812, `${ATCT}; ${S_NASA}`), //       S° 229.220
  C3H8: entry('C3H8', -104390, -24003, `${ATCT}; ${S_NASA}`), //      S° 270.320
  C3H6: entry('C3H6', 20370, 62884, `${ATCT}; ${S_NASA}`), //         S° 266.666
  nC4H10: entry('nC4H10', -125850, -16584, `${ATCT}; ${S_NASA}`), //  S° 309.880
  iC4H10: entry('iC4H10', -135360, -21804, `${ATCT}; ${S_NASA}`), //  S° 295.491
  nC6H14: entry('nC6H14', -166940, 128, `${ATCT}; ${S_NASA}`), //     S° 388.850
  nC7H16: entry('nC7H16', -187340, 8703, `${ATCT}; ${S_NASA}`), //    S° 428.087
  nC8H18: entry('nC8H18', -208220, 16791, `${ATCT}; ${S_NASA}`), //   S° 467.348
  CH3OH: entry('CH3OH', -200700, -161980, `${ATCT}; ${S_NASA}`), //   S° 239.809
  C2H5OH: entry('C2H5OH', -234570, -167336, `${ATCT}; ${S_NASA}`), // S° 280.591
  CH3CHO: entry('CH3CHO', -165370, -132137, `${ATCT}; ${S_NASA}`), // S° 263.951
  CH3OCH3: entry('CH3OCH3', -184020, -112847, `${ATCT}; ${S_NASA}`), // S° 267.380
  C6H6: entry('C6H6', 83180, 130083, `${ATCT}; ${S_NASA}`), //        S° 269.165
  C7H8: entry('C7H8', 50410, 122775, `${ATCT}; ${S_NASA}`), //        S° 320.187
  C6H12: entry('C6H12', -122080, 33295, `${ATCT}; ${S_NASA}`), //     S° 297.390
  // 3. JANAF as tabulated.
  SO3: entry('SO3', -395765, -371016, `hf and gf: ${JANAF}`),
  COS: entry('COS', -138407, -165601, `hf and gf: ${JANAF}`),
  // 4. The NASA polynomial's own hf (H at 298.15 K; NASA basis) and S°.
  CH3COOH: entry('CH3COOH', -432247, -374251, `hf: NASA polynomial value; ${S_NASA}`), // S° 283.471
  nC5H12: entry('nC5H12', -146755, -8624, `hf: NASA polynomial value (TRC); ${S_NASA}`), // S° 349.487
  iC5H12: entry('iC5H12', -153759, -13914, `hf: NASA polynomial value (TRC); ${S_NASA}`), // S° 343.737
  // n-Decane: hf -59.64 kcal/mol and S° 545.674 J/(mol K) of Scott, US Bureau of Mines Bulletin
  // 666 (1974), as quoted by Burcat and Ruscic (2015 file); gf from them with the CODATA elements.
  nC10H22: entry(
    'nC10H22',
    -249532,
    33474,
    'hf and S° 545.674 J/(mol K): Scott, US Bureau of Mines Bulletin 666 (1974), as quoted by Burcat and Ruscic (ANL-05/20); gf = hf - T (S° - S° elements, CODATA 1989)',
  ),
  // n-Nonane: hf -228.3 kJ/mol (Good, J. Chem. Eng. Data 14 (1969) 231, as quoted by Burcat and
  // Ruscic). S° 506.511 J/(mol K) interpolated midway between n-octane (NASA) and n-decane
  // (Scott 1974): common practice, no source (each CH2 adds a constant increment, group additivity).
  nC9H20: entry(
    'nC9H20',
    -228300,
    25709,
    'hf: Good (1969), as quoted by Burcat and Ruscic (ANL-05/20); S° 506.511 J/(mol K) interpolated between n-octane and n-decane (common practice, no source); gf = hf - T (S° - S° elements, CODATA 1989)',
  ),
});
