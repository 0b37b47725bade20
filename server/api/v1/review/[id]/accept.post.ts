import { intParam } from '../../../../utils/http/params'
import { acceptVersion, requireCurator } from '../../../../utils/review'
import { readValidated } from '../../../../utils/http/validation'

defineRouteMeta({
  openAPI: {
    tags: ['review'],
    summary:
      'Accept and publish: mints the concept and version identifiers at the registrar, then publishes; 503 and nothing '
      + 'published if the registrar fails; 409 if another curator acted first'
  }
})

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const who = await requireCurator(event)
  const b = await readValidated<{ comment?: string, expectedUpdatedAt: number }>(event, {
    type: 'object',
    required: ['expectedUpdatedAt'],
    additionalProperties: false,
    properties: { comment: { type: 'string', maxLength: 10000 }, expectedUpdatedAt: { type: 'integer' } }
  })
  return acceptVersion(who, id, b)
})
