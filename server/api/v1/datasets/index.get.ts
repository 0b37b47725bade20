import { getViewer } from '../../../utils/accounts/auth'
import { listDatasets } from '../../../utils/publishing/archive'
import { coerceNumbers, queryValidated } from '../../../utils/http/validation'
import { DATASET_LIST_QUERY } from '../../../utils/http/query-schemas'

defineRouteMeta({
  openAPI: {
    tags: ['archive'],
    summary: 'Datasets the caller may see (published ones for visitors), newest version of each'
  }
})

export default defineEventHandler(async (event) => {
  const q = queryValidated<{ q?: string, state?: string, lab?: number, page?: number, pageSize?: number }>(
    event,
    DATASET_LIST_QUERY,
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
