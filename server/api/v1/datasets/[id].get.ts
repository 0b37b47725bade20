import { getViewer } from '../../../utils/auth'
import { datasetView } from '../../../utils/dataset-view'
import { intParam } from '../../../utils/params'
import { queryValidated } from '../../../utils/validation'

const QUERY = { type: 'object', additionalProperties: false, properties: { records: { enum: ['full', 'summary'] } } }

defineRouteMeta({ openAPI: { tags: ['archive'], parameters: [{ in: 'query', name: 'records', description: 'full (default): each record with its JSON; summary: the table columns only', schema: { type: 'string', enum: ['full', 'summary'] } }], summary: 'A dataset: its newest published version (or newest the caller may see), version list and records' } })

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const q = queryValidated<{ records?: 'full' | 'summary' }>(event, QUERY, x => x)
  return datasetView(await getViewer(event), id, undefined, q.records)
})
