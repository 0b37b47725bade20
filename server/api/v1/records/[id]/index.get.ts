import { getViewer } from '../../../../utils/auth'
import { getRecord } from '../../../../utils/archive'
import { intParam } from '../../../../utils/params'

defineRouteMeta({ openAPI: { tags: ['records'], summary: 'One record in the open format, with its dataset and provenance' } })

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const { record, version, dataset, labName } = await getRecord(await getViewer(event), id)
  return {
    id: record.id, position: record.position, data: record.data,
    deltaG: record.deltaG, log10Rate: record.log10Rate, rate: record.rate, rateKind: record.rateKind,
    dataset: { id: dataset.id, title: version.title, versionNumber: version.versionNumber, state: version.state, doi: version.doi, license: version.license, labName, isDemo: dataset.isDemo }
  }
})
