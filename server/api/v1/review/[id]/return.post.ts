import { intParam } from '../../../../utils/http/params'
import { requireCurator, returnVersion } from '../../../../utils/review'
import { readValidated } from '../../../../utils/http/validation'

defineRouteMeta({
  openAPI: {
    tags: ['review'],
    summary: 'Return a submission with an overall comment and per-record comments; 409 if another curator acted first'
  }
})

const body = {
  type: 'object',
  required: ['comment', 'expectedUpdatedAt'],
  additionalProperties: false,
  properties: {
    comment: { type: 'string', minLength: 3, maxLength: 10000 },
    expectedUpdatedAt: { type: 'integer', description: 'version.updatedAt from the review view (ms)' },
    recordComments: {
      type: 'array',
      maxItems: 5000,
      items: {
        type: 'object',
        required: ['recordId', 'body'],
        additionalProperties: false,
        properties: {
          recordId: { type: 'integer', minimum: 1 },
          body: { type: 'string', minLength: 1, maxLength: 4000 }
        }
      }
    }
  }
}

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const who = await requireCurator(event)
  const b = await readValidated<{
    comment: string
    expectedUpdatedAt: number
    recordComments?: { recordId: number, body: string }[]
  }>(event, body)
  return returnVersion(who, id, b)
})
