import { requireRole } from '../../../utils/auth'
import { checkFixity } from '../../../utils/fixity'

defineRouteMeta({
  openAPI: { tags: ['admin'], summary: 'Re-hash every stored upload now and report missing or changed files (admin)' }
})

export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  return checkFixity()
})
