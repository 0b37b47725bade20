import { requireLabLead } from '../../../../../utils/accounts/auth'
import { removeMember } from '../../../../../utils/accounts/labs'
import { intParam } from '../../../../../utils/http/params'

defineRouteMeta({ openAPI: { tags: ['labs'], summary: 'Remove a member from the lab (lab lead or admin)' } })

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const userId = getRouterParam(event, 'userId') ?? ''
  const v = await requireLabLead(event, id)
  await removeMember(v, id, userId)
  return { removed: userId }
})
