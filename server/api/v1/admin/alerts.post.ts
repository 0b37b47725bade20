import { requireRole } from '../../../utils/accounts/auth'
import { runAlerts } from '../../../utils/alerts/digest'

defineRouteMeta({
  openAPI: {
    tags: ['admin'],
    summary: 'Run the saved-search digest job now (as npm run alerts does): every search with new matches gets its digest'
  }
})

export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  return runAlerts()
})
