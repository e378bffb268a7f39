/**
 * Physical constants, SI units, CODATA 2018 recommended values
 * (E. Tiesinga et al., Rev. Mod. Phys. 93, 025010 (2021); NIST SP 961).
 *
 * h, e and c are exact by definition of the SI since 20 May 2019; the electron
 * mass is a measured value, quoted with its standard uncertainty.
 */

/** Planck constant h, J s (exact). */
export const PLANCK_J_S = 6.62607015e-34;

/** Elementary charge e, C (exact). */
export const ELEMENTARY_CHARGE_C = 1.602176634e-19;

/** Speed of light in vacuum c, m/s (exact). */
export const SPEED_OF_LIGHT_M_PER_S = 299792458;

/** Electron rest mass m_e, kg (CODATA 2018: 9.1093837015(28) x 10^-31 kg). */
export const ELECTRON_MASS_KG = 9.1093837015e-31;

/** Standard uncertainty of the electron rest mass, kg (CODATA 2018). */
export const ELECTRON_MASS_SIGMA_KG = 0.0000000028e-31;

/** Electron rest energy m_e c^2 expressed in electronvolts, derived from the values above. */
export const ELECTRON_REST_ENERGY_EV =
  (ELECTRON_MASS_KG * SPEED_OF_LIGHT_M_PER_S * SPEED_OF_LIGHT_M_PER_S) / ELEMENTARY_CHARGE_C;

/** Metres per angstrom. */
export const M_PER_ANGSTROM = 1e-10;
