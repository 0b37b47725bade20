/**
 * Physical bounds of every model input: one table read by the physics checks, the fitter and the
 * route request schemas (so the OpenAPI document states the same limits, with units).
 *
 * The ranges are common practice (no single source): wide enough for any
 * electron-transfer system a lab measures, narrow enough that no input can make the vibronic sum
 * or the fitter run away. Outside them a request gets a 422 naming the field.
 */
import type { IssueCollector } from './errors'

export interface Bound {
  min: number
  max: number
  /** Whether min itself is allowed (λ_i = 0 is the classical limit; everything else is strictly positive). */
  minInclusive: boolean
  unit: string
  label: string
}

export const MODEL_BOUNDS = {
  temperatureK: { min: 1, max: 2000, minInclusive: true, unit: 'K', label: 'Temperature' },
  lambdaTotal: { min: 0.005, max: 5, minInclusive: true, unit: 'eV', label: 'Reorganization energy λ' },
  lambdaSolvent: { min: 0.005, max: 5, minInclusive: true, unit: 'eV', label: 'Solvent reorganization energy λ_s' },
  lambdaInternal: { min: 0, max: 5, minInclusive: true, unit: 'eV', label: 'Internal reorganization energy λ_i' },
  vibrationEnergy: { min: 0.005, max: 1, minInclusive: true, unit: 'eV', label: 'Mode energy ħω' },
  coupling: { min: 1e-9, max: 1, minInclusive: true, unit: 'eV', label: 'Electronic coupling V' },
  drivingForce: { min: -10, max: 10, minInclusive: true, unit: 'eV', label: 'Driving force ΔG°' }
} as const satisfies Record<string, Bound>
export type BoundedName = keyof typeof MODEL_BOUNDS

/** Largest Huang–Rhys factor S = λ_i/ħω the semi-classical sum accepts. */
export const MAX_HUANG_RHYS = 200

/**
 * Hard budget of vibronic terms for one driving force. Within the bounds above the sum needs at most
 * a few hundred terms (S ≤ 200, a peak at most (|ΔG°|+λ_s)/ħω ≤ 3 000 quanta out); the budget is what
 * no input, in or out of bounds, can exceed.
 */
export const MAX_VIBRONIC_TERMS = 20_000
/** Largest index of the dominant term the search may reach (|ΔG°| + λ_s over ħω at the bounds is 3 000). */
export const MAX_VIBRONIC_INDEX = 10_000

/** JSON Schema of one bounded number, for route request schemas. */
export function boundSchema (name: BoundedName, extra: Record<string, unknown> = {}): Record<string, unknown> {
  const b: Bound = MODEL_BOUNDS[name]
  return {
    type: 'number',
    minimum: b.min,
    maximum: b.max,
    description: `${b.label}, ${b.unit}, ${b.min}–${b.max}`,
    ...extra
  }
}

function fmt (x: number): string {
  return Math.abs(x) < 1e-3 && x !== 0 ? x.toExponential(0) : String(x)
}

/** Adds an issue unless `value` is a finite number within the named bound. */
export function checkBound (
  c: IssueCollector,
  value: unknown,
  name: BoundedName,
  path: string,
  label?: string
): value is number {
  const b: Bound = MODEL_BOUNDS[name]
  const what = label ?? b.label
  if (!c.finite(value, path, what)) return false
  const v = value as number
  if (v < b.min || v > b.max || (!b.minInclusive && v === b.min)) {
    c.add(path, `${what} must be between ${fmt(b.min)} and ${fmt(b.max)} ${b.unit} (got ${fmt(v)} ${b.unit})`)
    return false
  }
  return true
}

/** Checks S = λ_i/ħω against {@link MAX_HUANG_RHYS}. */
export function checkHuangRhys (c: IssueCollector, lambdaInternal: number, vibrationEnergy: number, path: string): void {
  const S = lambdaInternal / vibrationEnergy
  if (S > MAX_HUANG_RHYS) {
    c.add(
      path,
      `Huang–Rhys factor S = λ_i/ħω = ${S.toPrecision(4)} is above ${MAX_HUANG_RHYS}: raise ħω or lower λ_i (a mode `
      + `that soft is not a quantum mode)`
    )
  }
}
