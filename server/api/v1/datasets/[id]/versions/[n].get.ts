import { getViewer } from '../../../../../utils/auth'
import { datasetView } from '../../../../../utils/dataset-view'
import { intParam } from '../../../../../utils/params'
import { queryValidated } from '../../../../../utils/validation'

const QUERY = { type: 'object', additionalProperties: false, properties: { records: { enum: ['full', 'summary'] } } }

defineRouteMeta({ openAPI: { tags: ['archive'], parameters: [{ in: 'query', name: 'records', description: 'full (default): each record with its JSON; summary: the table columns only', schema: { type: 'string', enum: ['full', 'summary'] } }], summary: 'One version of a dataset, with its records' } })

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const q = queryValidated<{ records?: 'full' | 'summary' }>(event, QUERY, x => x)
  const n = intParam(event, 'n')
  return datasetView(await getViewer(event), id, n, q.records)
})
