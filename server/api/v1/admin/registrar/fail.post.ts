import { requireRole } from '../../../../utils/auth'
import { httpError } from '../../../../utils/errors'
import { failLocalRegistrar, localRegistrarState } from '../../../../utils/registrar'
import { readValidated } from '../../../../utils/validation'

defineRouteMeta({ openAPI: { tags: ['admin'], summary: 'Make the local registrar fail the next n requests (admin; rehearsing outages, local mode only)' } })

export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  const { count } = await readValidated<{ count: number }>(event, { type: 'object', required: ['count'], additionalProperties: false, properties: { count: { type: 'integer', minimum: 0, maximum: 100 } } })
  if (!localRegistrarState()) throw httpError(409, 'A real registrar is configured; outages cannot be rehearsed')
  failLocalRegistrar(count)
  return { failNext: count }
})
