import { requireEditableDraft } from '../../../utils/deposit/drafts'
import { datasetMetaSchema, updateMetadata, type DatasetMetaInput } from '../../../utils/deposit/metadata'
import { intParam } from '../../../utils/http/params'
import { readValidated } from '../../../utils/http/validation'

defineRouteMeta({
  openAPI: {
    tags: ['deposit'],
    summary: 'Change a draft\'s citation metadata (DataCite-compatible; ORCID check digits and DOI syntax verified)'
  }
})

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const { version, viewer } = await requireEditableDraft(event, id)
  const b = await readValidated<DatasetMetaInput>(event, { ...datasetMetaSchema, required: [], minProperties: 1 })
  return updateMetadata(viewer, version, b)
})
