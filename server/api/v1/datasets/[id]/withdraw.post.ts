import { requireRole } from '../../../../utils/accounts/auth'
import { intParam } from '../../../../utils/http/params'
import { withdrawDataset } from '../../../../utils/review'
import { readValidated } from '../../../../utils/http/validation'

defineRouteMeta({
  openAPI: {
    tags: ['review'],
    summary: 'Withdraw a published dataset (admin): a tombstone page stays and its identifiers keep resolving'
  }
})

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const who = await requireRole(event, 'admin')
  const { reason } = await readValidated<{ reason: string }>(event, {
    type: 'object',
    required: ['reason'],
    additionalProperties: false,
    properties: { reason: { type: 'string', minLength: 10, maxLength: 2000 } }
  })
  return withdrawDataset(who, id, reason)
})
