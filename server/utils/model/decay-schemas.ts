/** The decay-fit route's body (shapes only: the physics checks name points and values) and the call behind it. */
import { fitDecay, type DecayFitRequest } from '../../../shared/physics/decay-fit'
import { MAX_IRF_POINTS, MAX_TRACE_POINTS } from '../../../shared/physics/decay-check'
import { rethrowPhysics } from '../http/errors'
import { TRACE_FIT_OPTIONS } from '../traces/trace-fit'

/** Decay fits one client may start per minute (all fitting routes together; common practice for CPU-bound routes). */
export const DECAY_FITS_PER_MINUTE = 30

const series = (max: number) => ({ type: 'array', maxItems: max, items: { type: 'number' } })
const opts = TRACE_FIT_OPTIONS.properties
export const decayFitBodySchema = {
  type: 'object',
  additionalProperties: false,
  required: ['model', 'times', 'signal', 'timeUnit'],
  properties: {
    model: opts.model,
    times: series(MAX_TRACE_POINTS),
    signal: series(MAX_TRACE_POINTS),
    sigma: series(MAX_TRACE_POINTS),
    timeUnit: { enum: ['fs', 'ps', 'ns', 'us', 'ms', 's'] },
    weighting: { enum: ['poisson', 'given', 'none'] },
    irf: {
      type: 'object',
      additionalProperties: false,
      required: ['kind'],
      properties: {
        kind: { enum: ['none', 'gaussian', 'measured'] },
        fwhm: { type: 'number', exclusiveMinimum: 0 },
        times: series(MAX_IRF_POINTS),
        signal: series(MAX_IRF_POINTS)
      }
    },
    fixed: opts.fixed,
    initial: opts.initial,
    bounds: opts.bounds
  }
}

export function computeDecayFit (b: DecayFitRequest) {
  try {
    return fitDecay(b)
  }
  catch (e) {
    rethrowPhysics(e)
  }
}
