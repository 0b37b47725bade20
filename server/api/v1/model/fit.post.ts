import type { FitRequest } from '../../../../shared/physics'
import { computeFit, fitBodySchema } from '../../../utils/model'
import { readValidated } from '../../../utils/validation'

defineRouteMeta({
  openAPI: {
    tags: ['model'],
    summary: 'Fit classical or semi-classical parameters to log10 k against ΔG°',
    description: 'Weighted Levenberg–Marquardt; any parameter can be fixed; the coupling is fitted on a log scale. Refuses under-determined or non-converging fits with 422.',
    requestBody: { required: true, content: { 'application/json': { schema: { type: 'object' } } } },
    responses: { 200: { description: '{ parameters, chiSquaredReduced, residuals, converged, warnings }' }, 422: { description: 'Invalid input or a fit that cannot be done' } }
  }
})

export default defineEventHandler(async (event) => {
  const body = await readValidated<FitRequest>(event, fitBodySchema)
  return computeFit(body)
})
