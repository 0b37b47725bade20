/**
 * Unit tables and conversions to the canonical set used inside Crosspoint:
 * energies in eV, temperature in K, distance in Å, rates in s⁻¹ (bimolecular M⁻¹ s⁻¹), time in s.
 */
import { HC_EV_NM, KCAL_PER_MOL_PER_EV, KJ_PER_MOL_PER_EV, WAVENUMBER_PER_EV } from './constants'

export const ENERGY_UNITS = ['eV', 'meV', 'cm-1', 'kJ/mol', 'kcal/mol'] as const
export type EnergyUnit = (typeof ENERGY_UNITS)[number]

/** How many of each unit make one eV. */
const PER_EV: Record<EnergyUnit, number> = {
  'eV': 1,
  'meV': 1000,
  'cm-1': WAVENUMBER_PER_EV,
  'kJ/mol': KJ_PER_MOL_PER_EV,
  'kcal/mol': KCAL_PER_MOL_PER_EV
}

export function isEnergyUnit (u: string): u is EnergyUnit {
  return (ENERGY_UNITS as readonly string[]).includes(u)
}

export function energyToEv (value: number, unit: EnergyUnit): number {
  return value / PER_EV[unit]
}

export function energyFromEv (valueEv: number, unit: EnergyUnit): number {
  return valueEv * PER_EV[unit]
}

export function convertEnergy (value: number, from: EnergyUnit, to: EnergyUnit): number {
  return energyFromEv(energyToEv(value, from), to)
}

/** Photon energy (eV) of a vacuum wavelength in nm: E = h c / λ. */
export function wavelengthNmToEv (nm: number): number {
  return HC_EV_NM / nm
}

/** Vacuum wavelength (nm) of a photon of the given energy (eV). */
export function evToWavelengthNm (ev: number): number {
  return HC_EV_NM / ev
}

export const TEMPERATURE_UNITS = ['K', 'degC'] as const
export type TemperatureUnit = (typeof TEMPERATURE_UNITS)[number]
export function temperatureToK (value: number, unit: TemperatureUnit): number {
  return unit === 'K' ? value : value + 273.15
}

export const DISTANCE_UNITS = ['angstrom', 'nm', 'pm'] as const
export type DistanceUnit = (typeof DISTANCE_UNITS)[number]
const ANGSTROM_PER: Record<DistanceUnit, number> = { angstrom: 1, nm: 10, pm: 0.01 }
export function distanceToAngstrom (value: number, unit: DistanceUnit): number {
  return value * ANGSTROM_PER[unit]
}

export const TIME_UNITS = ['s', 'ms', 'us', 'ns', 'ps', 'fs'] as const
export type TimeUnit = (typeof TIME_UNITS)[number]
const SECONDS_PER: Record<TimeUnit, number> = { s: 1, ms: 1e-3, us: 1e-6, ns: 1e-9, ps: 1e-12, fs: 1e-15 }
export function timeToSeconds (value: number, unit: TimeUnit): number {
  return value * SECONDS_PER[unit]
}

/** Unimolecular rate units (canonical s⁻¹). */
export const RATE_UNITS = ['s-1', 'ms-1', 'us-1', 'ns-1', 'ps-1'] as const
export type RateUnit = (typeof RATE_UNITS)[number]
const PER_SECOND: Record<RateUnit, number> = { 's-1': 1, 'ms-1': 1e3, 'us-1': 1e6, 'ns-1': 1e9, 'ps-1': 1e12 }
export function rateToPerSecond (value: number, unit: RateUnit): number {
  return value * PER_SECOND[unit]
}

/** Bimolecular rate units (canonical M⁻¹ s⁻¹). */
export const BIMOLECULAR_RATE_UNITS = ['M-1 s-1', 'M-1 ns-1', 'cm3 molecule-1 s-1'] as const
export type BimolecularRateUnit = (typeof BIMOLECULAR_RATE_UNITS)[number]

export const POTENTIAL_UNITS = ['V', 'mV'] as const
export type PotentialUnit = (typeof POTENTIAL_UNITS)[number]
export function potentialToVolt (value: number, unit: PotentialUnit): number {
  return unit === 'V' ? value : value / 1000
}
