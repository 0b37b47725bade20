import { requireRole } from '../../../../utils/accounts/auth'
import { httpError } from '../../../../utils/http/errors'
import { failLocalRegistrar, localRegistrarState } from '../../../../utils/services/registrar'
import { readValidated } from '../../../../utils/http/validation'

defineRouteMeta({
  openAPI: {
    tags: ['admin'],
    summary: 'Make the local registrar fail the next n requests (admin; rehearsing outages, local mode only)'
  }
})

export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  const { count, only } = await readValidated<{ count: number, only?: 'publish' }>(event, {
    type: 'object',
    required: ['count'],
    additionalProperties: false,
    properties: {
      count: { type: 'integer', minimum: 0, maximum: 100 },
      only: { enum: ['publish'], description: 'fail only the step that makes identifiers findable' }
    }
  })
  if (!localRegistrarState()) throw httpError(409, 'A real registrar is configured; outages cannot be rehearsed')
  failLocalRegistrar(count, only)
  return only ? { failPublishNext: count } : { failNext: count }
})
