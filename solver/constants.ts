/**
 * Physical constants, CODATA 2018 values (exact where the 2019 SI redefinition fixed them).
 * Source: CODATA 2018 recommended values (Tiesinga et al., Rev. Mod. Phys. 93, 025010 (2021);
 * NIST reference on constants, units and uncertainty).
 *
 * Units are stated beside each constant. Pure numbers, no imports: usable in the browser.
 */

/** Boltzmann constant k_B, J/K (exact). */
export const K_B = 1.380649e-23;

/** Planck constant h, J·s (exact). */
export const H_PLANCK = 6.62607015e-34;

/** Avogadro constant N_A, 1/mol (exact). */
export const N_A = 6.02214076e23;

/** Molar gas constant R = k_B·N_A, J/(mol·K) (exact by definition; ≈ 8.314462618). */
export const R_GAS = K_B * N_A;

/** Speed of light in vacuum c, m/s (exact). */
export const C_LIGHT = 299792458;

/** Speed of light in cm/s, for wavenumbers in cm⁻¹. */
export const C_LIGHT_CM = C_LIGHT * 100;

/** Elementary charge e, C (exact). 1 eV = e joules. */
export const E_CHARGE = 1.602176634e-19;

/** Hartree energy E_h, J (CODATA 2018: 4.3597447222071(85)e-18 J). */
export const HARTREE_J = 4.3597447222071e-18;

/** Standard pressure p° (IUPAC, since 1982), Pa. */
export const P_STANDARD = 1e5;

/** Standard atmosphere, Pa (exact by definition). */
export const P_ATM = 101325;

/** Thermochemical calorie, J (exact by definition). */
export const CAL_TH = 4.184;

/** k_B/h, 1/(s·K): the Eyring frequency factor per kelvin. */
export const KB_OVER_H = K_B / H_PLANCK;

/** ln(k_B/h), with k_B/h in 1/(s·K). */
export const LN_KB_OVER_H = Math.log(KB_OVER_H);

/** Faraday constant F = e·N_A, C/mol (exact); also J/mol per eV per particle. */
export const FARADAY = E_CHARGE * N_A;
