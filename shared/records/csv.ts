/**
 * The records.csv layout of bundles: one row per record, canonical units in the header. Each
 * record's row (without the per-version provenance cells in front) is computed when the record is
 * written and stored beside it (rate_record.csv_line), so a bundle of 100 000 records is a copy,
 * not 100 000 JSON parses. Changing the columns means bumping CSV_FORMAT: stored lines of another
 * format are recomputed before a bundle uses them.
 */
import type { RateRecordV1 } from './types'

export const CSV_FORMAT = 2

export const CSV_COLUMNS: [string, string, (r: RateRecordV1) => unknown][] = [
  ['donor_name', '', r => r.system.donor.name],
  ['donor_class', '', r => r.system.donor.class],
  ['donor_smiles', '', r => r.system.donor.smiles],
  ['acceptor_name', '', r => r.system.acceptor.name],
  ['acceptor_class', '', r => r.system.acceptor.class],
  ['acceptor_smiles', '', r => r.system.acceptor.smiles],
  ['bridge_name', '', r => r.system.bridge?.name],
  ['linkage', '', r => r.system.linkage],
  ['process', '', r => r.process],
  ['initial_state', '', r => r.initialState],
  ['solvent', '', r => r.medium.solvent],
  ['matrix', '', r => r.medium.matrix],
  ['permittivity', '', r => r.medium.permittivity],
  ['refractive_index', '', r => r.medium.refractiveIndex],
  ['temperature', 'K', r => r.temperatureK],
  ['distance_cc', 'angstrom', r => r.geometry?.centerToCenterAngstrom],
  ['distance_ee', 'angstrom', r => r.geometry?.edgeToEdgeAngstrom],
  ['rate', 's-1 or M-1 s-1', r => r.rate.value],
  ['rate_uncertainty', 'same as rate', r => r.rate.uncertainty],
  ['rate_kind', '', r => r.rate.kind],
  ['rate_method', '', r => r.rate.method],
  ['lifetime', 's', r => r.rate.lifetimeS],
  ['reference_lifetime', 's', r => r.rate.referenceLifetimeS],
  ['rate_as_reported', '', r => (r.rate.original ? `${r.rate.original.value} ${r.rate.original.unit}` : undefined)],
  ['delta_g', 'eV', r => r.drivingForce?.value],
  ['delta_g_uncertainty', 'eV', r => r.drivingForce?.uncertainty],
  ['delta_g_method', '', r => r.drivingForce?.method],
  [
    'delta_g_as_reported',
    '',
    r => (r.drivingForce?.original ? `${r.drivingForce.original.value} ${r.drivingForce.original.unit}` : undefined)
  ],
  ['donor_oxidation_potential', 'V', r => r.drivingForce?.redox?.donorOxidationPotential],
  ['donor_reference', '', r => r.drivingForce?.redox?.donorReference],
  ['acceptor_reduction_potential', 'V', r => r.drivingForce?.redox?.acceptorReductionPotential],
  ['acceptor_reference', '', r => r.drivingForce?.redox?.acceptorReference],
  ['reference_offset', 'V', r => r.drivingForce?.redox?.referenceOffset],
  ['excitation_energy', 'eV', r => r.drivingForce?.redox?.excitationEnergy],
  ['lambda_solvent', 'eV', r => r.reportedParameters?.lambdaSolvent],
  ['lambda_internal', 'eV', r => r.reportedParameters?.lambdaInternal],
  ['coupling', 'eV', r => r.reportedParameters?.coupling],
  ['vibration_energy', 'eV', r => r.reportedParameters?.vibrationEnergy],
  ['technique', '', r => r.technique.method],
  ['excitation_wavelength', 'nm', r => r.technique.excitationWavelengthNm],
  ['time_resolution', 's', r => r.technique.timeResolutionS],
  ['notes', '', r => r.notes],
  ['location', '', r => r.location]
]
export const PROVENANCE_COLUMNS = ['record_id', 'dataset_id', 'dataset_version', 'dataset_identifier', 'license']
export const CSV_HEADER = [...PROVENANCE_COLUMNS, ...CSV_COLUMNS.map(([k, u]) => (u ? `${k} (${u})` : k))]

/** Spreadsheet formula injection: a text cell starting with = + - @ or a control character is prefixed with '. */
export function neutralizeCell (v: unknown): unknown {
  return typeof v === 'string' && /^[=+\-@\t\r]/.test(v) ? `'${v}` : v
}

/**
 * One CSV line per RFC 4180 (quote a field only when it holds a comma, quote or line break).
 * Hand-written because papaparse's per-cell checks were the largest cost in the 100 000-record
 * bundle profile; the tests read the result back with papaparse.
 */
export function csvLine (cells: unknown[]): string {
  let out = ''
  for (let i = 0; i < cells.length; i++) {
    const v = cells[i]
    const t = v === null || v === undefined ? '' : typeof v === 'string' ? v : String(v)
    out += (i ? ',' : '') + (/[",\r\n]/.test(t) ? `"${t.replace(/"/g, '""')}"` : t)
  }
  return out + '\r\n'
}

/** A whole CSV file (header and rows), every text cell neutralised: the one writer the app's CSV exports use. */
export function csvFile (header: string[], rows: unknown[][]): string {
  return csvLine(header) + rows.map(r => csvLine(r.map(neutralizeCell))).join('')
}

/** The record's cells after the provenance ones, as one CSV line (with its CRLF), formula cells neutralised. */
export function recordCsvLine (r: RateRecordV1): string {
  return csvLine(CSV_COLUMNS.map(([, , f]) => neutralizeCell(f(r) ?? '')))
}
