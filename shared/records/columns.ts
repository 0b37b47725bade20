/**
 * The flat, spreadsheet-shaped view of a rate record: one column per field, units in the header
 * ("rate (ns-1)"). Used by the CSV/XLSX templates, the upload check and the entry form alike.
 */
import { ENERGY_UNITS, POTENTIAL_UNITS, RATE_UNITS, TIME_UNITS } from '../physics/units'
import { TECHNIQUES } from './types'
import { REFERENCE_ELECTRODES } from '../physics/redox'
import type { ColumnDef } from './column-def'
import { SYSTEM_COLUMNS } from './columns-system'

export type { ColumnDef, ColumnKind } from './column-def'

const ENERGY = [...ENERGY_UNITS] as string[]
const BIMOLECULAR = ['M-1 s-1']

export const COLUMNS: ColumnDef[] = [
  ...SYSTEM_COLUMNS,
  {
    key: 'rate',
    kind: 'number',
    units: [...RATE_UNITS, ...BIMOLECULAR],
    pointer: '/rate/value',
    help: 'Rate constant (or give the two lifetimes)',
    example: '1.2e9'
  },
  {
    key: 'rate_uncertainty',
    kind: 'number',
    units: [...RATE_UNITS, ...BIMOLECULAR],
    pointer: '/rate/uncertainty',
    help: 'One standard uncertainty of the rate',
    example: '1e8'
  },
  {
    key: 'lifetime',
    kind: 'number',
    units: TIME_UNITS,
    pointer: '/rate/lifetimeS',
    help: 'Donor lifetime with the acceptor, τ (rate then k = 1/τ − 1/τ_ref)',
    example: ''
  },
  {
    key: 'reference_lifetime',
    kind: 'number',
    units: TIME_UNITS,
    pointer: '/rate/referenceLifetimeS',
    help: 'Donor lifetime without the acceptor, τ_ref',
    example: ''
  },
  {
    key: 'delta_g',
    kind: 'number',
    units: ENERGY,
    pointer: '/drivingForce/value',
    help: 'Driving force ΔG° (negative = downhill); or give the potentials',
    example: '-0.74'
  },
  {
    key: 'delta_g_uncertainty',
    kind: 'number',
    units: ENERGY,
    pointer: '/drivingForce/uncertainty',
    help: 'One standard uncertainty of ΔG°',
    example: '0.05'
  },
  {
    key: 'delta_g_method',
    kind: 'enum',
    values: ['measured', 'redox-potentials', 'computed', 'estimated'],
    pointer: '/drivingForce/method',
    help: 'How ΔG° was obtained (default: measured, or redox-potentials when potentials are given)',
    example: 'estimated'
  },
  {
    key: 'donor_oxidation_potential',
    kind: 'number',
    units: POTENTIAL_UNITS,
    pointer: '/drivingForce/redox/donorOxidationPotential',
    help: 'E(D⁺/D)',
    example: ''
  },
  {
    key: 'donor_reference',
    kind: 'enum',
    values: REFERENCE_ELECTRODES,
    pointer: '/drivingForce/redox/donorReference',
    help: 'Reference electrode of E(D⁺/D)',
    example: ''
  },
  {
    key: 'acceptor_reduction_potential',
    kind: 'number',
    units: POTENTIAL_UNITS,
    pointer: '/drivingForce/redox/acceptorReductionPotential',
    help: 'E(A/A⁻)',
    example: ''
  },
  {
    key: 'acceptor_reference',
    kind: 'enum',
    values: REFERENCE_ELECTRODES,
    pointer: '/drivingForce/redox/acceptorReference',
    help: 'Reference electrode of E(A/A⁻)',
    example: ''
  },
  {
    key: 'reference_offset',
    kind: 'number',
    units: POTENTIAL_UNITS,
    pointer: '/drivingForce/redox/referenceOffset',
    help: 'Recorded offset added to E(A/A⁻) to put it on the donor\'s reference',
    example: ''
  },
  {
    key: 'excitation_energy',
    kind: 'number',
    units: [...ENERGY, 'nm'],
    pointer: '/drivingForce/redox/excitationEnergy',
    help: 'E₀₀ of the excited partner (a wavelength in nm is converted)',
    example: ''
  },
  {
    key: 'lambda_solvent',
    kind: 'number',
    units: ENERGY,
    pointer: '/reportedParameters/lambdaSolvent',
    help: 'Reported λ_s',
    example: ''
  },
  {
    key: 'lambda_internal',
    kind: 'number',
    units: ENERGY,
    pointer: '/reportedParameters/lambdaInternal',
    help: 'Reported λ_i',
    example: ''
  },
  {
    key: 'coupling',
    kind: 'number',
    units: ENERGY,
    pointer: '/reportedParameters/coupling',
    help: 'Reported electronic coupling V',
    example: ''
  },
  {
    key: 'vibration_energy',
    kind: 'number',
    units: ENERGY,
    pointer: '/reportedParameters/vibrationEnergy',
    help: 'Reported ħω',
    example: ''
  },
  {
    key: 'technique',
    kind: 'enum',
    values: TECHNIQUES,
    required: true,
    pointer: '/technique/method',
    help: 'Measurement technique',
    example: 'transient-absorption'
  },
  {
    key: 'excitation_wavelength',
    kind: 'number',
    units: ['nm'],
    pointer: '/technique/excitationWavelengthNm',
    help: 'Pump wavelength',
    example: '420'
  },
  {
    key: 'time_resolution',
    kind: 'number',
    units: TIME_UNITS,
    pointer: '/technique/timeResolutionS',
    help: 'Instrument time resolution',
    example: ''
  },
  { key: 'notes', kind: 'text', pointer: '/notes', help: 'Free-text notes', example: '' },
  {
    key: 'location',
    kind: 'text',
    pointer: '/location',
    help: 'Where in the article the number is',
    example: 'Table 2'
  }
]

export const COLUMN_BY_KEY = new Map(COLUMNS.map(c => [c.key, c]))

/** Header text for a column: "rate (s-1)" with its default unit. */
export function headerFor (c: ColumnDef, unit = c.units?.[0]): string {
  return unit ? `${c.key} (${unit})` : c.key
}

/** Splits "rate (ns-1)" or "rate [ns-1]" into key and unit. */
export function parseHeader (h: string): { key: string, unit?: string } {
  const m = h.trim().match(/^([A-Za-z0-9_ ]+?)\s*(?:[([]\s*([^)\]]*?)\s*[)\]])?$/)
  if (!m) return { key: h.trim().toLowerCase() }
  return { key: m[1]!.trim().toLowerCase().replace(/\s+/g, '_'), unit: m[2] || undefined }
}

/** Which column a record pointer belongs to (longest matching prefix). */
export function columnForPointer (pointer: string): string | undefined {
  let best: ColumnDef | undefined
  for (const c of COLUMNS)
    if (
      (pointer === c.pointer || pointer.startsWith(c.pointer + '/'))
      && (!best || c.pointer.length > best.pointer.length)
    )
      best = c
  if (best) return best.key
  if (pointer.startsWith('/rate')) return 'rate'
  if (pointer.startsWith('/drivingForce')) return 'delta_g'
  if (pointer.startsWith('/medium')) return 'solvent'
  return undefined
}
