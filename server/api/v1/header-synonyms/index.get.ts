import { requireUser } from '../../../utils/accounts/auth'
import { headerSynonyms } from '../../../utils/deposit/header-synonyms'

defineRouteMeta({ openAPI: { tags: ['deposit'], summary: 'Spreadsheet header words curators have declared to mean a field (signed in)' } })

export default defineEventHandler(async (event) => {
  await requireUser(event)
  return { items: (await headerSynonyms()).map(s => ({ id: s.id, alias: s.alias, field: s.field })) }
})
