import type { FitRequest } from '../../../../shared/physics'
import { computeFit, fitBodySchema } from '../../../utils/model/route-schemas'
import { readValidated } from '../../../utils/http/validation'

defineRouteMeta({
  openAPI: {
    tags: ['model'],
    summary: 'Fit classical or semi-classical parameters to log10 k against ΔG°',
    description:
      'Bounded weighted least squares (projected Levenberg–Marquardt from several starts); any parameter can be fixed; '
      + 'the coupling is fitted on a log scale; each point at its own temperature (points[i].temperatureK wins over '
      + 'temperatureK). status is converged, at-bound (atBound names the parameters held at an edge of their range; '
      + 'their standard errors are null and the others come from the reduced problem) or stalled (no minimum '
      + 'confirmed; converged false). 422 for bad or under-determined input, each field named.',
    requestBody: { required: true, content: { 'application/json': { schema: { type: 'object' } } } },
    responses: {
      200: {
        description:
          '{ parameters, chiSquared, chiSquaredReduced, residuals, status, atBound, converged, warnings, bounds, temperatureRangeK }'
      },
      422: { description: 'Invalid input or a fit that cannot be done' }
    }
  }
})

export default defineEventHandler(async (event) => {
  const body = await readValidated<FitRequest>(event, fitBodySchema)
  return computeFit(body)
})
