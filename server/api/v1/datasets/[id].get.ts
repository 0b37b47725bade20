import { getViewer } from '../../../utils/auth'
import { datasetView, recordDetailOf } from '../../../utils/dataset-view'
import { intParam } from '../../../utils/params'

defineRouteMeta({ openAPI: { tags: ['archive'], parameters: [{ in: 'query', name: 'records', description: 'full (default): each record with its JSON; summary: the table columns only', schema: { type: 'string', enum: ['full', 'summary'] } }], summary: 'A dataset: its newest published version (or newest the caller may see), version list and records' } })

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const detail = recordDetailOf(event)
  return datasetView(await getViewer(event), id, undefined, detail)
})
