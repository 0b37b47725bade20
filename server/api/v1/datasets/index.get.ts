import { getViewer } from '../../../utils/accounts/auth'
import { listDatasets } from '../../../utils/publishing/archive'
import { coerceNumbers, queryValidated } from '../../../utils/http/validation'
import { pagingProperties } from '../../../utils/http/params'

defineRouteMeta({
  openAPI: {
    tags: ['archive'],
    summary: 'Datasets the caller may see (published ones for visitors), newest version of each',
    parameters: [
      { in: 'query', name: 'q', schema: { type: 'string' } },
      { in: 'query', name: 'state', schema: { type: 'string' } },
      { in: 'query', name: 'lab', schema: { type: 'integer' } },
      { in: 'query', name: 'page', schema: { type: 'integer' } },
      { in: 'query', name: 'pageSize', schema: { type: 'integer' } }
    ]
  }
})

const querySchema = {
  type: 'object',
  additionalProperties: false,
  properties: {
    q: { type: 'string', maxLength: 200 },
    state: { enum: ['draft', 'submitted', 'returned', 'published', 'withdrawn'] },
    lab: { type: 'integer', minimum: 1 },
    ...pagingProperties
  }
}

export default defineEventHandler(async (event) => {
  const q = queryValidated<{ q?: string, state?: string, lab?: number, page?: number, pageSize?: number }>(
    event,
    querySchema,
    coerceNumbers(['lab', 'page', 'pageSize'])
  )
  const viewer = await getViewer(event)
  const page = q.page ?? 1
  const pageSize = q.pageSize ?? 50
  const res = await listDatasets(viewer, {
    state: q.state,
    labId: q.lab,
    q: q.q,
    limit: pageSize,
    offset: (page - 1) * pageSize
  })
  return { ...res, page, pageSize }
})
