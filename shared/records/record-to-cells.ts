/**
 * The other way from row-to-record: a stored record as the entry form's cells, each value in its canonical unit
 * (the unit picker set to it), so that a record is edited with the same form it was entered with.
 */
import { CSV_COLUMNS } from './csv'
import { COLUMNS } from './columns'
import type { RateRecordV1 } from './types'

export function recordToCells (r: RateRecordV1): { cells: Record<string, string>, units: Record<string, string> } {
  const getters = new Map(CSV_COLUMNS.map(([k, u, get]) => [k, { unit: u, get }]))
  const cells: Record<string, string> = {}
  const units: Record<string, string> = {}
  for (const c of COLUMNS) {
    const g = getters.get(c.key)
    const v = g?.get(r)
    if (v === undefined || v === null || v === '') continue
    cells[c.key] = String(v)
    const unit = c.key === 'rate' || c.key === 'rate_uncertainty'
      ? (r.rate.kind === 'bimolecular' ? 'M-1 s-1' : 's-1')
      : g!.unit
    if (unit && c.units?.includes(unit)) units[c.key] = unit
  }
  // a rate derived from lifetimes is entered as the lifetimes: the form derives it again
  if (r.rate.method === 'lifetimes') delete cells.rate
  // likewise ΔG° derived from potentials
  if (r.drivingForce?.method === 'redox-potentials') delete cells.delta_g
  return { cells, units }
}

/** A record edited in the form keeps the values as first reported wherever the canonical value did not change. */
export function keepReported (before: RateRecordV1, after: RateRecordV1): RateRecordV1 {
  const out = structuredClone(after)
  if (before.rate.original && !out.rate.original && before.rate.value === out.rate.value) out.rate.original = before.rate.original
  if (before.drivingForce?.original && out.drivingForce && !out.drivingForce.original
    && before.drivingForce.value === out.drivingForce.value)
    out.drivingForce.original = before.drivingForce.original
  return out
}
