import { requireUser } from '../../../../utils/accounts/auth'
import { createSavedSearch, SAVED_SEARCH_BODY, type SavedQuery } from '../../../../utils/alerts/saved-searches'
import { limitRate } from '../../../../utils/http/rate-limit'
import { readValidated } from '../../../../utils/http/validation'

defineRouteMeta({
  openAPI: {
    tags: ['account'],
    summary:
      'Save a search by name; with alerts on (the default) a digest of newly published records it finds is mailed '
      + 'after each scheduled run, with a link that stops the mails without signing in',
    responses: { 201: { description: 'the saved search' }, 409: { description: 'A saved search of yours has this name' } }
  }
})

export default defineEventHandler(async (event) => {
  const v = await requireUser(event)
  const b = await readValidated<{ name: string, query: SavedQuery, alerts?: boolean }>(event, SAVED_SEARCH_BODY)
  limitRate(event, `saved-search|${v.id}`, 60, 3600)
  setResponseStatus(event, 201)
  return createSavedSearch(v.id, b)
})
