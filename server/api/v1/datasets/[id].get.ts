import { getViewer } from '../../../utils/accounts/auth'
import { datasetView, recordDetailOf } from '../../../utils/publishing/dataset-view'
import { intParam } from '../../../utils/http/params'
import { countUsage } from '../../../utils/usage/counter'

defineRouteMeta({
  openAPI: {
    tags: ['archive'],
    // the record query parameters are added by the OpenAPI handler (RECORD_QUERY_PARAMETERS)
    parameters: [
      { in: 'path', name: 'id', required: true, schema: { type: 'integer', minimum: 1 } }
    ],
    summary: 'A dataset: its newest published version (or newest the caller may see), version list and records'
  }
})

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const rq = recordDetailOf(event)
  const view = await datasetView(await getViewer(event), id, undefined, rq)
  if (view.version.state === 'published') countUsage(event, id, 'investigation', 'landing')
  return view
})
