import { getViewer } from '../../../utils/accounts/auth'
import { datasetView, recordDetailOf } from '../../../utils/publishing/dataset-view'
import { intParam } from '../../../utils/http/params'

defineRouteMeta({
  openAPI: {
    tags: ['archive'],
    parameters: [
      { in: 'path', name: 'id', required: true, schema: { type: 'integer', minimum: 1 } },
      {
        in: 'query',
        name: 'records',
        description: 'full (default): each record with its JSON; summary: the table columns only; '
          + 'points: id, ΔG°, log10 k and medium only (for plots)',
        schema: { type: 'string', enum: ['full', 'summary', 'points'] }
      },
      {
        in: 'query',
        name: 'sort',
        description: 'Order of the records: a column (position, donorName, acceptorName, bridgeName, process, solvent, '
          + 'deltaG, log10Rate, temperatureK, distanceAngstrom), with a leading - for descending; ties keep the deposit order',
        schema: { type: 'string' }
      },
      {
        in: 'query',
        name: 'page',
        description: 'Page of records (1-based); recordPage.total says how many there are',
        schema: { type: 'integer', minimum: 1 }
      },
      {
        in: 'query',
        name: 'pageSize',
        description: 'Records per page, at most 10 000 (the default)',
        schema: { type: 'integer', minimum: 1, maximum: 10000 }
      }
    ],
    summary: 'A dataset: its newest published version (or newest the caller may see), version list and records'
  }
})

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const rq = recordDetailOf(event)
  return datasetView(await getViewer(event), id, undefined, rq)
})
