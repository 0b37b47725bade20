import { getViewer } from '../../../../../utils/accounts/auth'
import { datasetView, recordDetailOf } from '../../../../../utils/publishing/dataset-view'
import { intParam } from '../../../../../utils/http/params'

defineRouteMeta({
  openAPI: {
    tags: ['archive'],
    // the record query parameters are added by the OpenAPI handler (RECORD_QUERY_PARAMETERS)
    parameters: [
      { in: 'path', name: 'id', required: true, schema: { type: 'integer', minimum: 1 } },
      { in: 'path', name: 'n', required: true, schema: { type: 'integer', minimum: 1 } }
    ],
    summary: 'One version of a dataset, with its records'
  }
})

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const rq = recordDetailOf(event)
  const n = intParam(event, 'n')
  return datasetView(await getViewer(event), id, n, rq)
})
