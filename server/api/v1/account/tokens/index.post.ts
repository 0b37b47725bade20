import { createApiToken } from '../../../../utils/accounts/accounts'
import { requireUser } from '../../../../utils/accounts/auth'
import { limitRate } from '../../../../utils/http/rate-limit'
import { readValidated } from '../../../../utils/http/validation'

defineRouteMeta({
  openAPI: {
    tags: ['account'],
    summary: 'Create a personal API token; the token is in this answer only',
    responses: { 201: { description: '{ id, name, prefix, token }' } }
  }
})

export default defineEventHandler(async (event) => {
  const v = await requireUser(event)
  const { name } = await readValidated<{ name: string }>(event, {
    type: 'object',
    required: ['name'],
    additionalProperties: false,
    properties: { name: { type: 'string', minLength: 1, maxLength: 100 } }
  })
  limitRate(event, `token-create|${v.id}`, 20, 3600)
  setResponseStatus(event, 201)
  return createApiToken(v.id, name)
})
