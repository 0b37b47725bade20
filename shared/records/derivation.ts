/**
 * Re-deriving a record's ΔG° from its stored potentials with the process-aware rule (one function
 * for the upload, the form, the API check, the data migration of drafts and the curator's report).
 */
import { drivingForceByProcess, PhysicsInputError } from '../physics'
import type { RateRecordV1 } from './types'

/** Same tolerance as the deposit check (checkRecord): a stored value within 5 meV of the derivation stands. */
export const DERIVATION_TOLERANCE_EV = 0.005

export interface Rederived {
  /** The record with ΔG° replaced by the derivation (rounded to 0.1 meV). */
  record: RateRecordV1
  stored: number
  derived: number
  formula: string
}

/** The corrected record when its stored ΔG° (method redox-potentials) differs from the derivation for its process; else null. */
export function rederive (r: RateRecordV1): Rederived | null {
  const df = r.drivingForce
  if (df?.method !== 'redox-potentials' || !df.redox || r.medium?.permittivity === undefined) return null
  let d
  try {
    d = drivingForceByProcess(r.process, {
      ...df.redox,
      distance: r.geometry?.centerToCenterAngstrom,
      solventPermittivity: r.medium.permittivity
    })
  }
  catch (e) {
    if (e instanceof PhysicsInputError) return null // cannot be derived (e.g. process "other"): the deposit check names it
    throw e
  }
  if (Math.abs(d.deltaG - df.value) <= DERIVATION_TOLERANCE_EV) return null
  const derived = Math.round(d.deltaG * 1e4) / 1e4
  return { record: { ...r, drivingForce: { ...df, value: derived } }, stored: df.value, derived, formula: d.formula }
}
