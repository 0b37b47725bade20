import { markVerified } from '../../../utils/accounts/accounts'
import { consumeOneTimeToken } from '../../../utils/accounts/one-time-tokens'
import { httpError } from '../../../utils/http/errors'
import { readValidated } from '../../../utils/http/validation'

defineRouteMeta({
  openAPI: { tags: ['account'], summary: 'Confirm an e-mail address with the token from the mailed link' }
})

export default defineEventHandler(async (event) => {
  const { token } = await readValidated<{ token: string }>(event, {
    type: 'object',
    required: ['token'],
    additionalProperties: false,
    properties: { token: { type: 'string', minLength: 10, maxLength: 200 } }
  })
  const t = await consumeOneTimeToken(token, 'verify')
  if (!t)
    throw httpError(410, 'This confirmation link is not valid any more; sign in by e-mailed link to get a new one', [
      { path: '/token', message: 'unknown, used or expired' }
    ])
  await markVerified(t.email)
  return { email: t.email, verified: true }
})
