import { describe, expect, it } from 'vitest'
import {
  BOLTZMANN_EV_PER_K, COULOMB_EV_ANGSTROM, HBAR_EV_S, HC_EV_NM, KCAL_PER_MOL_PER_EV, KJ_PER_MOL_PER_EV, WAVENUMBER_PER_EV,
  GAS_CONSTANT_J_PER_MOL_K, thermalEnergyEv, PLANCK_EV_S
} from '../../../../shared/physics/constants'
import {
  convertEnergy, energyToEv, evToWavelengthNm, wavelengthNmToEv, temperatureToK, timeToSeconds, distanceToAngstrom,
  rateToPerSecond
} from '../../../../shared/physics/units'
import worked from '../../../fixtures/physics/worked-checks-mpmath.json'

// Each expected value is the CODATA 2018 recommended value as published by NIST
// (physics.nist.gov/constants, "CODATA Recommended Values of the Fundamental Physical Constants: 2018"),
// quoted to the digits NIST gives; relative tolerance 1e-9 (the published rounding).
const CODATA_2018: [string, number, number][] = [
  ['reduced Planck constant ħ in eV s', HBAR_EV_S, 6.582119569e-16],
  ['Planck constant h in eV s', PLANCK_EV_S, 4.135667696e-15],
  ['Boltzmann constant in eV/K', BOLTZMANN_EV_PER_K, 8.617333262e-5],
  ['electron volt–inverse metre relationship, per cm', WAVENUMBER_PER_EV, 8065.543937],
  ['molar gas constant R, J/(mol K)', GAS_CONSTANT_J_PER_MOL_K, 8.314462618],
  ['h c in eV nm (1239.84198…)', HC_EV_NM, 1239.841984]
]

describe('constants derived from the SI defining values', () => {
  it.each(CODATA_2018)('%s', (_name, actual, expected) => {
    expect(Math.abs(actual / expected - 1)).toBeLessThan(1e-9)
  })
  // derived figures, from CODATA 2018 (e²/4πε₀ with the measured ε₀); e²/4πε₀ also by mpmath in worked-checks-mpmath.json
  it.each([
    ['kJ/mol per eV', KJ_PER_MOL_PER_EV, 96.48533212],
    ['kcal/mol per eV (thermochemical calorie 4.184 J, exact)', KCAL_PER_MOL_PER_EV, 23.06054783],
    ['e²/(4πε₀) in eV Å', COULOMB_EV_ANGSTROM, worked.checks.coulomb_eV_A.value]
  ])('%s', (_n, actual, expected) => {
    expect(Math.abs(actual / expected - 1)).toBeLessThan(2e-9)
  })
  it('k_B T at 298.15 K and k_B T/h (mpmath from CODATA 2018: tests/fixtures/physics/worked-checks-mpmath.json)', () => {
    expect(thermalEnergyEv(298.15) / worked.checks.kT_eV_298.value).toBeCloseTo(1, 12)
    expect(thermalEnergyEv(298.15) / PLANCK_EV_S / worked.checks.kT_over_h_298.value).toBeCloseTo(1, 12)
  })
})

describe('unit conversions', () => {
  it('energy units round-trip and agree with the CODATA factors', () => {
    expect(energyToEv(8065.543937, 'cm-1')).toBeCloseTo(1, 9)
    expect(energyToEv(1000, 'meV')).toBe(1)
    expect(convertEnergy(1, 'kcal/mol', 'kJ/mol')).toBeCloseTo(4.184, 12) // thermochemical calorie, exact by definition
    expect(convertEnergy(convertEnergy(0.37, 'eV', 'cm-1'), 'cm-1', 'eV')).toBeCloseTo(0.37, 14)
  })
  it('wavelength ↔ photon energy: 500 nm is 2.479684 eV (E = hc/λ with CODATA 2018 hc)', () => {
    expect(wavelengthNmToEv(500)).toBeCloseTo(2.479684, 6)
    expect(evToWavelengthNm(wavelengthNmToEv(532))).toBeCloseTo(532, 10)
  })
  it('temperature, time, distance and rate units', () => {
    expect(temperatureToK(25, 'degC')).toBe(298.15) // ITS-90 offset, exact
    expect(timeToSeconds(5, 'ns')).toBe(5e-9)
    expect(distanceToAngstrom(1.2, 'nm')).toBe(12)
    expect(rateToPerSecond(2, 'ns-1')).toBe(2e9)
  })
})
