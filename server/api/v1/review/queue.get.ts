import { requireCurator, reviewQueue } from '../../../utils/review'
import { coerceNumbers, queryValidated } from '../../../utils/http/validation'

defineRouteMeta({
  openAPI: {
    tags: ['review'],
    summary: 'Submissions waiting for review, oldest first, with warnings and problems counted (curators, admins)'
  }
})

export default defineEventHandler(async (event) => {
  const q = queryValidated<{ lab?: number, q?: string }>(
    event,
    {
      type: 'object',
      additionalProperties: false,
      properties: { lab: { type: 'integer', minimum: 1 }, q: { type: 'string', maxLength: 200 } }
    },
    coerceNumbers(['lab'])
  )
  const v = await requireCurator(event)
  return { items: await reviewQueue(v, q) }
})
