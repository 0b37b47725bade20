import { revokeApiToken } from '../../../../utils/accounts/accounts'
import { requireUser } from '../../../../utils/accounts/auth'
import { intParam } from '../../../../utils/http/params'

defineRouteMeta({ openAPI: { tags: ['account'], summary: 'Revoke one of the caller\'s API tokens' } })

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  await revokeApiToken((await requireUser(event)).id, id)
  return { revoked: id }
})
