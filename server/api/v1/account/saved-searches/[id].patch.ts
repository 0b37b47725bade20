import { requireUser } from '../../../../utils/accounts/auth'
import { SAVED_SEARCH_PATCH, updateSavedSearch } from '../../../../utils/alerts/saved-searches'
import { intParam } from '../../../../utils/http/params'
import { readValidated } from '../../../../utils/http/validation'

defineRouteMeta({ openAPI: { tags: ['account'], summary: 'Rename one of the caller\'s saved searches, or turn its mails on or off' } })

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const v = await requireUser(event)
  return updateSavedSearch(v.id, id, await readValidated<{ alerts?: boolean, name?: string }>(event, SAVED_SEARCH_PATCH))
})
