import { requireRole } from '../../../../utils/accounts/auth'
import { reconcileIdentifiers } from '../../../../utils/review'

defineRouteMeta({
  openAPI: {
    tags: ['admin'],
    summary:
      'Make findable now the identifiers of published versions that are still reserved drafts (the job does it every five minutes)',
    responses: { 200: { description: '{ checked, madeFindable }' } }
  }
})

export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  return reconcileIdentifiers()
})
