import { requireUser } from '../../../../utils/accounts/auth'
import { listSavedSearches } from '../../../../utils/alerts/saved-searches'

defineRouteMeta({
  openAPI: { tags: ['account'], summary: 'The caller\'s saved searches, with whether each mails a digest of new matches' }
})

export default defineEventHandler(async event => ({ items: await listSavedSearches((await requireUser(event)).id) }))
