/** At most 10 password sign-in attempts per address (normalised as everywhere) in 15 minutes, per instance. */
import { limitRate } from '../utils/http/rate-limit'
import { normalizeEmail } from '../utils/accounts/auth'

export default defineEventHandler(async (event) => {
  if (event.method !== 'POST' || !event.path.startsWith('/api/auth/callback/credentials')) return
  const body = (await readBody(event).catch(() => ({}))) as { email?: unknown }
  limitRate(event, `signin|${normalizeEmail(body?.email)}`, 10, 900)
})
