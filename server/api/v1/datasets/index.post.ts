import { requireUser } from '../../../utils/accounts/auth'
import { createDraft, datasetMetaSchema, metadataIssues } from '../../../utils/deposit/metadata'
import { httpError } from '../../../utils/http/errors'
import { readValidated } from '../../../utils/http/validation'

defineRouteMeta({
  openAPI: {
    tags: ['deposit'],
    summary: 'Create a draft dataset for one of your labs',
    responses: { 201: { description: '{ id, versionNumber }' } }
  }
})

const body = {
  type: 'object',
  required: ['labId', 'title'],
  additionalProperties: false,
  properties: {
    labId: { type: 'integer', minimum: 1 },
    title: datasetMetaSchema.properties.title,
    description: datasetMetaSchema.properties.description
  }
}

export default defineEventHandler(async (event) => {
  const v = await requireUser(event)
  const b = await readValidated<{ labId: number, title: string, description?: string }>(event, body)
  const issues = metadataIssues({ title: b.title, description: b.description })
  if (issues.length) throw httpError(422, 'The metadata has problems; nothing was created', issues)
  if (!v.labIds.includes(b.labId))
    throw httpError(403, 'You can only create datasets for a lab you belong to', [
      { path: '/labId', message: 'not one of your labs' }
    ])
  setResponseStatus(event, 201)
  return createDraft(v, b.labId, b.title, b.description ?? '')
})
