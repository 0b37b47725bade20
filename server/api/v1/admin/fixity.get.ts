import { requireRole } from '../../../utils/accounts/auth'
import { checkFixity } from '../../../utils/storage/fixity'

defineRouteMeta({
  openAPI: { tags: ['admin'], summary: 'Re-hash every stored upload now and report missing or changed files (admin)' }
})

export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  return checkFixity()
})
