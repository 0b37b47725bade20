import { getViewer } from '../../../../../utils/auth'
import { datasetView } from '../../../../../utils/dataset-view'
import { intParam } from '../../../../../utils/params'

defineRouteMeta({ openAPI: { tags: ['archive'], summary: 'One version of a dataset, with its records' } })

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const n = intParam(event, 'n')
  return datasetView(await getViewer(event), id, n)
})
