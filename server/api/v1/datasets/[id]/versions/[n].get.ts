import { getViewer } from '../../../../../utils/auth'
import { datasetView, recordDetailOf } from '../../../../../utils/dataset-view'
import { intParam } from '../../../../../utils/params'

defineRouteMeta({ openAPI: { tags: ['archive'], parameters: [{ in: 'query', name: 'records', description: 'full (default): each record with its JSON; summary: the table columns only', schema: { type: 'string', enum: ['full', 'summary'] } }], summary: 'One version of a dataset, with its records' } })

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const detail = recordDetailOf(event)
  const n = intParam(event, 'n')
  return datasetView(await getViewer(event), id, n, detail)
})
