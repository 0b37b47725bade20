import type { DecayFitRequest } from '../../../../shared/physics/decay-fit'
import { readValidated } from '../../../utils/http/validation'
import { computeDecayFit, decayFitBodySchema, DECAY_FITS_PER_MINUTE } from '../../../utils/model/decay-schemas'
import { limitRate } from '../../../utils/http/rate-limit'

defineRouteMeta({
  openAPI: {
    tags: ['model'],
    summary: 'Fit a decay trace: mono- or bi-exponential with offset, optionally convolved with a Gaussian or measured instrument response',
    description:
      'Times in any unit (timeUnit), with time zero fitted when there is a response. Gaussian response: closed form (erfc, '
      + 'erfcx) of given or fitted FWHM; measured: a histogram convolved exactly. Weighting: poisson (σ² = max(y, 1)), given '
      + '(sigma per point) or none (errors scaled by χ²_red). Bounded Levenberg–Marquardt as the rate fits; status converged, '
      + 'at-bound or stalled. 422 names every bad field and point (unsorted time, NaN, constant signal, too many points).'
  }
})

export default defineEventHandler(async (event) => {
  // a fit of the largest trace takes about a second of CPU: a client gets a bounded share
  limitRate(event, 'decay-fit', DECAY_FITS_PER_MINUTE, 60)
  return computeDecayFit(await readValidated<DecayFitRequest>(event, decayFitBodySchema))
})
