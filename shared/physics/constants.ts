/**
 * Physical constants, all derived here from the CODATA 2018 / SI 2019 defining values.
 * Every other module takes its constants from this file so that no rounded value is typed twice.
 */

/** Planck constant, J s (exact, SI 2019). */
export const PLANCK_J_S = 6.62607015e-34
/** Elementary charge, C (exact, SI 2019). */
export const ELEMENTARY_CHARGE_C = 1.602176634e-19
/** Boltzmann constant, J/K (exact, SI 2019). */
export const BOLTZMANN_J_PER_K = 1.380649e-23
/** Avogadro constant, 1/mol (exact, SI 2019). */
export const AVOGADRO_PER_MOL = 6.02214076e23
/** Speed of light in vacuum, m/s (exact). */
export const SPEED_OF_LIGHT_M_S = 299792458
/** Vacuum electric permittivity, F/m (CODATA 2018 recommended value, measured). */
export const VACUUM_PERMITTIVITY_F_PER_M = 8.8541878128e-12
/** Molar gas constant, J/(mol K) — N_A k_B, exact. */
export const GAS_CONSTANT_J_PER_MOL_K = AVOGADRO_PER_MOL * BOLTZMANN_J_PER_K
/** Thermochemical calorie, J (exact by definition). */
export const THERMOCHEMICAL_CALORIE_J = 4.184

/** Reduced Planck constant in eV s. */
export const HBAR_EV_S = PLANCK_J_S / (2 * Math.PI) / ELEMENTARY_CHARGE_C
/** Planck constant in eV s. */
export const PLANCK_EV_S = PLANCK_J_S / ELEMENTARY_CHARGE_C
/** Boltzmann constant in eV/K. */
export const BOLTZMANN_EV_PER_K = BOLTZMANN_J_PER_K / ELEMENTARY_CHARGE_C
/** Wavenumbers (cm⁻¹) in one eV: e / (h c), per cm. */
export const WAVENUMBER_PER_EV = ELEMENTARY_CHARGE_C / (PLANCK_J_S * SPEED_OF_LIGHT_M_S) / 100
/** kJ/mol in one eV. */
export const KJ_PER_MOL_PER_EV = (ELEMENTARY_CHARGE_C * AVOGADRO_PER_MOL) / 1000
/** kcal/mol (thermochemical) in one eV. */
export const KCAL_PER_MOL_PER_EV = KJ_PER_MOL_PER_EV / THERMOCHEMICAL_CALORIE_J
/** h c in eV nm, for wavelength ↔ photon energy. */
export const HC_EV_NM = ((PLANCK_J_S * SPEED_OF_LIGHT_M_S) / ELEMENTARY_CHARGE_C) * 1e9
/** Coulomb energy constant e²/(4πε₀) in eV Å. */
export const COULOMB_EV_ANGSTROM = (ELEMENTARY_CHARGE_C / (4 * Math.PI * VACUUM_PERMITTIVITY_F_PER_M)) * 1e10

export const LN10 = Math.LN10

/** Thermal energy k_B T in eV. */
export function thermalEnergyEv (temperatureK: number): number {
  return BOLTZMANN_EV_PER_K * temperatureK
}
