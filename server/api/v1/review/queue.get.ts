import { requireCurator, reviewQueue } from '../../../utils/review'
import { coerceNumbers, queryValidated } from '../../../utils/http/validation'
import { REVIEW_QUEUE_QUERY } from '../../../utils/http/query-schemas'

defineRouteMeta({
  openAPI: {
    tags: ['review'],
    summary: 'Submissions waiting for review, oldest first, with warnings and problems counted (curators, admins)'
  }
})

export default defineEventHandler(async (event) => {
  const q = queryValidated<{ lab?: number, q?: string }>(
    event,
    REVIEW_QUEUE_QUERY,
    coerceNumbers(['lab'])
  )
  const v = await requireCurator(event)
  return { items: await reviewQueue(v, q) }
})
