/**
 * A fitted rate's provenance read back: the rate its fit gives (k = 1/τ or 1/τ − 1/τ_ref, first-order error
 * propagation) and whether the record's stated rate agrees with it within their combined errors.
 */
import { TIME_UNITS } from '../physics/decay'
import type { DecayFitRef, RateRecordV1 } from './types'

/** |k_stated − k_fit| beyond this many combined standard errors is a disagreement (common practice: 2σ). */
export const PROVENANCE_Z = 2

function lifetime (f: DecayFitRef, unit: keyof typeof TIME_UNITS): { tau: number, se: number } | null {
  const p = f.parameters[f.component]
  if (!p || !(p.value > 0)) return null
  return { tau: p.value * TIME_UNITS[unit], se: (p.stderr ?? 0) * TIME_UNITS[unit] }
}

export function rateOfProvenance (r: RateRecordV1): { value: number, stderr: number } | null {
  const p = r.provenance
  if (!p) return null
  const a = lifetime(p.fit, p.trace.timeUnit)
  if (!a) return null
  let value = 1 / a.tau
  let variance = (a.se / a.tau ** 2) ** 2
  if (p.derivation === 'k_ET = 1/τ − 1/τ_ref') {
    const b = p.referenceFit && p.reference ? lifetime(p.referenceFit, p.reference.timeUnit) : null
    if (!b) return null
    value -= 1 / b.tau
    variance += (b.se / b.tau ** 2) ** 2
  }
  return { value, stderr: Math.sqrt(variance) }
}

export interface ProvenanceCheck {
  fitted: { value: number, stderr: number }
  stated: { value: number, uncertainty: number | null }
  /** (stated − fitted) / combined σ; null when neither carries an error. */
  z: number | null
  disagrees: boolean
}

/** The stated rate against the fit it names (null for a record without provenance). */
export function checkProvenance (r: RateRecordV1): ProvenanceCheck | null {
  const fitted = rateOfProvenance(r)
  if (!fitted) return null
  const u = r.rate.uncertainty ?? null
  const sigma = Math.sqrt(fitted.stderr ** 2 + (u ?? 0) ** 2)
  const diff = r.rate.value - fitted.value
  const z = sigma > 0 ? diff / sigma : null
  const disagrees = z === null ? Math.abs(diff) > 1e-9 * fitted.value : Math.abs(z) > PROVENANCE_Z
  return { fitted, stated: { value: r.rate.value, uncertainty: u }, z, disagrees }
}
