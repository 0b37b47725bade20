/** Shapes of the model routes' bodies and the calls into shared/physics behind them. */
import {
  boundSchema,
  classicalLog10Rates,
  fitRates,
  semiclassicalLog10Rates,
  semiclassicalTerms,
  activationFreeEnergy,
  IssueCollector,
  LOG10_RATE_RANGE,
  MAX_FIT_POINTS,
  MAX_HUANG_RHYS,
  type FitRequest
} from '../../../shared/physics'
import { rethrowPhysics } from '../http/errors'
import { countOf } from '../../../shared/vocabulary'

export const MAX_CURVE_POINTS = 100_000
/** Per-term curves multiply the answer by the number of terms: fewer points when they are asked for. */
export const MAX_TERM_CURVE_POINTS = 2_000

export const curveBodySchema = {
  type: 'object',
  required: ['model', 'temperatureK', 'coupling', 'drivingForces'],
  additionalProperties: false,
  description: `Bounds (common practice): T 1–2000 K; λ 0.005–5 eV; λ_i 0–5 eV; ħω 0.005–1 eV; V 1e-9–1 `
    + `eV; |ΔG°| ≤ 10 eV; Huang–Rhys factor S = λ_i/ħω ≤ ${MAX_HUANG_RHYS}. The classical model takes lambdaTotal or `
    + `lambdaSolvent + lambdaInternal (added), never both.`,
  properties: {
    model: { enum: ['classical', 'semiclassical'] },
    temperatureK: boundSchema('temperatureK'),
    lambdaTotal: boundSchema('lambdaTotal'),
    lambdaSolvent: boundSchema('lambdaSolvent'),
    lambdaInternal: boundSchema('lambdaInternal'),
    vibrationEnergy: boundSchema('vibrationEnergy'),
    coupling: boundSchema('coupling'),
    drivingForces: {
      type: 'array',
      items: boundSchema('drivingForce'),
      minItems: 1,
      maxItems: MAX_CURVE_POINTS,
      description: 'Driving forces ΔG°, eV (negative = downhill)'
    },
    includeTerms: {
      type: 'boolean',
      description: `Also return the per-term contributions of the semi-classical sum (at most ${MAX_TERM_CURVE_POINTS} driving forces)`
    }
  },
  allOf: [
    {
      if: { properties: { model: { const: 'semiclassical' } } },
      then: { required: ['lambdaSolvent', 'lambdaInternal', 'vibrationEnergy'] }
    },
    {
      if: { properties: { model: { const: 'classical' } } },
      then: { anyOf: [{ required: ['lambdaTotal'] }, { required: ['lambdaSolvent', 'lambdaInternal'] }] }
    }
  ]
} as const

export interface CurveBody {
  model: 'classical' | 'semiclassical'
  temperatureK: number
  lambdaTotal?: number
  lambdaSolvent?: number
  lambdaInternal?: number
  vibrationEnergy?: number
  coupling: number
  drivingForces: number[]
  includeTerms?: boolean
}

/** Parameters that contradict each other or the model, each named. */
function checkCombination (b: CurveBody): void {
  const c = new IssueCollector()
  if (b.model === 'classical') {
    if (b.lambdaTotal !== undefined && (b.lambdaSolvent !== undefined || b.lambdaInternal !== undefined)) {
      c.add(
        b.lambdaSolvent !== undefined ? '/lambdaSolvent' : '/lambdaInternal',
        'Give lambdaTotal or lambdaSolvent + lambdaInternal, not both: they could disagree'
      )
    }
    if (b.vibrationEnergy !== undefined)
      c.add('/vibrationEnergy', 'The classical model has no quantum mode; use model "semiclassical" for ħω')
    if (
      b.lambdaTotal === undefined
      && b.lambdaSolvent !== undefined
      && b.lambdaInternal !== undefined
      && b.lambdaSolvent + b.lambdaInternal > 5
    ) {
      c.add('/lambdaSolvent', 'λ_s + λ_i must be at most 5 eV')
    }
  }
  else if (b.lambdaTotal !== undefined) {
    c.add('/lambdaTotal', 'The semi-classical model takes lambdaSolvent and lambdaInternal, not lambdaTotal')
  }
  if (b.includeTerms && b.drivingForces.length > MAX_TERM_CURVE_POINTS)
    c.add('/drivingForces', `With includeTerms, at most ${MAX_TERM_CURVE_POINTS} driving forces`)
  c.throwIfAny()
}

/** k from log10 k: 0 only below the smallest double, null (log10 only) above the largest; the answer says which. */
function rates (log10: Float64Array): { rate: (number | null)[], notes: string[] } {
  let under = 0
  let over = 0
  const rate = Array.from(log10, (l) => {
    const k = 10 ** l
    if (k === Infinity) {
      over++
      return null
    }
    if (k === 0) under++
    return k
  })
  const notes: string[] = []
  if (under)
    notes.push(
      `${countOf(under, 'rate')} ${under === 1 ? 'is' : 'are'} below the smallest double (about 1e-308 s⁻¹), given as 0; `
      + 'log10Rate is exact.'
    )
  if (over)
    notes.push(`${countOf(over, 'rate')} ${over === 1 ? 'is' : 'are'} above the largest double, given as null; log10Rate is exact.`)
  return { rate, notes }
}

export function computeCurve (b: CurveBody) {
  try {
    checkCombination(b)
    if (b.model === 'classical') {
      const lambdaTotal = b.lambdaTotal ?? b.lambdaSolvent! + b.lambdaInternal!
      const r = classicalLog10Rates(b.drivingForces, {
        lambdaTotal,
        coupling: b.coupling,
        temperatureK: b.temperatureK
      })
      const { rate, notes } = rates(r.log10Rate)
      return {
        model: b.model,
        points: b.drivingForces.map((dg, i) => ({
          deltaG: dg,
          rate: rate[i],
          log10Rate: r.log10Rate[i]!,
          activationEnergy: activationFreeEnergy(dg, lambdaTotal)
        })),
        termsUsed: r.termsUsed,
        ...(notes.length ? { notes } : {})
      }
    }
    const p = {
      lambdaSolvent: b.lambdaSolvent!,
      lambdaInternal: b.lambdaInternal!,
      vibrationEnergy: b.vibrationEnergy!,
      coupling: b.coupling,
      temperatureK: b.temperatureK
    }
    const r = semiclassicalLog10Rates(b.drivingForces, p)
    const { rate, notes } = rates(r.log10Rate)
    return {
      model: b.model,
      points: b.drivingForces.map((dg, i) => ({ deltaG: dg, rate: rate[i], log10Rate: r.log10Rate[i]! })),
      termsUsed: r.termsUsed,
      huangRhys: p.lambdaInternal / p.vibrationEnergy,
      ...(notes.length ? { notes } : {}),
      ...(b.includeTerms
        ? {
            terms: semiclassicalTerms(b.drivingForces, p).map(t => ({
              j: t.j,
              weight: t.weight,
              log10Rate: Array.from(t.log10Rate)
            }))
          }
        : {})
    }
  }
  catch (e) {
    rethrowPhysics(e)
  }
}

const paramSet = {
  type: 'object',
  additionalProperties: false,
  properties: {
    lambdaTotal: boundSchema('lambdaTotal'),
    lambdaSolvent: boundSchema('lambdaSolvent'),
    lambdaInternal: boundSchema('lambdaInternal'),
    vibrationEnergy: boundSchema('vibrationEnergy'),
    coupling: boundSchema('coupling')
  }
}
export const fitBodySchema = {
  type: 'object',
  required: ['model', 'points'],
  additionalProperties: false,
  description:
    'Weighted least squares of log10 k against ΔG° within the parameter bounds; every point at its own temperature '
    + '(points[i].temperatureK, else the top-level temperatureK).',
  properties: {
    model: { enum: ['classical', 'semiclassical'] },
    temperatureK: boundSchema('temperatureK', { description: 'Temperature for points without their own, K, 1–2000' }),
    points: {
      type: 'array',
      minItems: 1,
      maxItems: MAX_FIT_POINTS,
      items: {
        type: 'object',
        required: ['deltaG'],
        additionalProperties: false,
        properties: {
          deltaG: boundSchema('drivingForce'),
          log10Rate: {
            type: 'number',
            minimum: LOG10_RATE_RANGE[0],
            maximum: LOG10_RATE_RANGE[1],
            description: `log10 of the rate in s⁻¹ (or M⁻¹ s⁻¹), ${LOG10_RATE_RANGE[0]}–${LOG10_RATE_RANGE[1]}`
          },
          log10RateUncertainty: {
            type: 'number',
            exclusiveMinimum: 0,
            maximum: 10,
            description: 'Standard uncertainty of log10 k, decades, > 0'
          },
          rate: {
            type: 'number',
            exclusiveMinimum: 0,
            maximum: 10 ** LOG10_RATE_RANGE[1],
            description: 'Rate, s⁻¹ (or M⁻¹ s⁻¹), > 0'
          },
          rateUncertainty: {
            type: 'number',
            exclusiveMinimum: 0,
            description: 'Standard uncertainty of the rate, same unit'
          },
          temperatureK: boundSchema('temperatureK', { description: 'Temperature of this measurement, K, 1–2000' }),
          recordId: { type: ['integer', 'string'], maxLength: 64 }
        }
      }
    },
    fixed: paramSet,
    initial: paramSet
  }
} as const

export function computeFit (b: FitRequest) {
  try {
    return fitRates(b)
  }
  catch (e) {
    rethrowPhysics(e)
  }
}
