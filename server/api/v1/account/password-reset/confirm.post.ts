import { passwordSchema, setPassword } from '../../../../utils/accounts/accounts'
import { consumeOneTimeToken } from '../../../../utils/accounts/one-time-tokens'
import { httpError } from '../../../../utils/http/errors'
import { limitRate } from '../../../../utils/http/rate-limit'
import { readValidated } from '../../../../utils/http/validation'

defineRouteMeta({ openAPI: { tags: ['account'], summary: 'Set a new password with the token from the reset link' } })

export default defineEventHandler(async (event) => {
  limitRate(event, 'reset-confirm', 20, 900)
  const b = await readValidated<{ token: string, password: string }>(event, {
    type: 'object',
    required: ['token', 'password'],
    additionalProperties: false,
    properties: { token: { type: 'string', minLength: 10, maxLength: 200 }, password: passwordSchema }
  })
  const t = await consumeOneTimeToken(b.token, 'reset')
  if (!t)
    throw httpError(410, 'This reset link is not valid any more; ask for a new one', [
      { path: '/token', message: 'unknown, used or expired' }
    ])
  const ended = await setPassword(t.email, b.password)
  return {
    email: t.email,
    message: `Password changed; sign in with the new one. Every session was signed `
      + `out${ended.tokens ? ` and ${ended.tokens} API token${ended.tokens === 1 ? ' was' : 's were'} revoked` : ''}.`
  }
})
