/** Physical constants used by the thermodynamic models. SI units. */

/**
 * Molar gas constant, J/(mol K). CODATA 2018 recommended value (exact since the 2019 SI
 * redefinition: R = N_A k_B). Tiesinga, Mohr, Newell and Taylor, "CODATA recommended values of
 * the fundamental physical constants: 2018", Rev. Mod. Phys. 93, 025010 (2021).
 */
export const R = 8.314462618;
