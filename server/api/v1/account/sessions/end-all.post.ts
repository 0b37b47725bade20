import { requireUser } from '../../../../utils/accounts/auth'
import { audit } from '../../../../utils/storage/audit'
import { endAllSessions } from '../../../../utils/accounts/sessions'

defineRouteMeta({
  openAPI: {
    tags: ['account'],
    summary:
      'Sign out everywhere: every session of this account ends, this one included (API tokens are revoked separately)',
    responses: { 200: { description: 'Done' }, 401: { description: 'Not signed in' } }
  }
})

export default defineEventHandler(async (event) => {
  const v = await requireUser(event)
  await endAllSessions(v.id)
  await audit(v.id, 'user.signed-out-everywhere', 'user', v.id, {})
  return { message: 'Every session of your account has ended; sign in again to continue.' }
})
