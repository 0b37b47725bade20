import { requireUser } from '../../../../utils/accounts/auth'
import { deleteSavedSearch } from '../../../../utils/alerts/saved-searches'
import { intParam } from '../../../../utils/http/params'

defineRouteMeta({ openAPI: { tags: ['account'], summary: 'Delete one of the caller\'s saved searches' } })

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  return deleteSavedSearch((await requireUser(event)).id, id)
})
