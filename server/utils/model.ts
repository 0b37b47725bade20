/** Shapes of the model routes' bodies and the calls into shared/physics behind them. */
import {
  classicalLog10Rates, fitRates, semiclassicalLog10Rates, semiclassicalTerms, activationFreeEnergy, MAX_FIT_POINTS,
  type FitRequest
} from '../../shared/physics'
import { rethrowPhysics } from './errors'

export const MAX_CURVE_POINTS = 100_000

const energy = { type: 'number', exclusiveMinimum: 0, description: 'eV, > 0' }
export const curveBodySchema = {
  type: 'object',
  required: ['model', 'temperatureK', 'coupling', 'drivingForces'],
  additionalProperties: false,
  properties: {
    model: { enum: ['classical', 'semiclassical'] },
    temperatureK: { type: 'number', exclusiveMinimum: 0, description: 'K' },
    lambdaTotal: energy,
    lambdaSolvent: energy,
    lambdaInternal: { type: 'number', minimum: 0, description: 'eV, ≥ 0' },
    vibrationEnergy: energy,
    coupling: energy,
    drivingForces: { type: 'array', items: { type: 'number' }, minItems: 1, maxItems: MAX_CURVE_POINTS },
    includeTerms: { type: 'boolean', description: 'Also return the per-term contributions of the semi-classical sum' }
  },
  allOf: [
    { if: { properties: { model: { const: 'semiclassical' } } }, then: { required: ['lambdaSolvent', 'lambdaInternal', 'vibrationEnergy'] } },
    { if: { properties: { model: { const: 'classical' } } }, then: { anyOf: [{ required: ['lambdaTotal'] }, { required: ['lambdaSolvent', 'lambdaInternal'] }] } }
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

export function computeCurve (b: CurveBody) {
  try {
    if (b.model === 'classical') {
      const lambdaTotal = b.lambdaTotal ?? (b.lambdaSolvent! + b.lambdaInternal!)
      const r = classicalLog10Rates(b.drivingForces, { lambdaTotal, coupling: b.coupling, temperatureK: b.temperatureK })
      return {
        model: b.model,
        points: b.drivingForces.map((dg, i) => ({ deltaG: dg, rate: 10 ** r.log10Rate[i]!, log10Rate: r.log10Rate[i]!, activationEnergy: activationFreeEnergy(dg, lambdaTotal) })),
        termsUsed: r.termsUsed
      }
    }
    const p = { lambdaSolvent: b.lambdaSolvent!, lambdaInternal: b.lambdaInternal!, vibrationEnergy: b.vibrationEnergy!, coupling: b.coupling, temperatureK: b.temperatureK }
    const r = semiclassicalLog10Rates(b.drivingForces, p)
    return {
      model: b.model,
      points: b.drivingForces.map((dg, i) => ({ deltaG: dg, rate: 10 ** r.log10Rate[i]!, log10Rate: r.log10Rate[i]! })),
      termsUsed: r.termsUsed,
      huangRhys: p.lambdaInternal / p.vibrationEnergy,
      ...(b.includeTerms ? { terms: semiclassicalTerms(b.drivingForces, p).map(t => ({ j: t.j, weight: t.weight, log10Rate: Array.from(t.log10Rate) })) } : {})
    }
  } catch (e) { rethrowPhysics(e) }
}

const paramSet = {
  type: 'object',
  additionalProperties: { type: 'number' },
  propertyNames: { enum: ['lambdaTotal', 'lambdaSolvent', 'lambdaInternal', 'vibrationEnergy', 'coupling'] }
}
export const fitBodySchema = {
  type: 'object',
  required: ['model', 'temperatureK', 'points'],
  additionalProperties: false,
  properties: {
    model: { enum: ['classical', 'semiclassical'] },
    temperatureK: { type: 'number', exclusiveMinimum: 0 },
    points: {
      type: 'array', minItems: 1, maxItems: MAX_FIT_POINTS,
      items: {
        type: 'object', required: ['deltaG'], additionalProperties: false,
        properties: {
          deltaG: { type: 'number' }, log10Rate: { type: 'number' }, log10RateUncertainty: { type: 'number' },
          rate: { type: 'number' }, rateUncertainty: { type: 'number' }, recordId: { type: ['integer', 'string'] }
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
  } catch (e) { rethrowPhysics(e) }
}
