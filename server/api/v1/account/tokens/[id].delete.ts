import { revokeApiToken } from '../../../../utils/accounts'
import { requireUser } from '../../../../utils/auth'
import { intParam } from '../../../../utils/params'

defineRouteMeta({ openAPI: { tags: ['account'], summary: 'Revoke one of the caller\'s API tokens' } })

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  await revokeApiToken((await requireUser(event)).id, id)
  return { revoked: id }
})
