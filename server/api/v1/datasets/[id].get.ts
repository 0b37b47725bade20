import { getViewer } from '../../../utils/auth'
import { datasetView } from '../../../utils/dataset-view'
import { intParam } from '../../../utils/params'

defineRouteMeta({ openAPI: { tags: ['archive'], summary: 'A dataset: its newest published version (or newest the caller may see), version list and records' } })

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  return datasetView(await getViewer(event), id)
})
