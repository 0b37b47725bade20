import { requireRole } from '../../../utils/accounts/auth'
import { localRegistrarState } from '../../../utils/services/registrar'

defineRouteMeta({
  openAPI: {
    tags: ['admin'],
    summary: 'The local identifier registrar: its URL and the identifiers it holds (admin; null with a real registrar)'
  }
})

export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  return { local: localRegistrarState() }
})
