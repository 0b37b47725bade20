import { normalizeEmail } from '../../../../utils/accounts/auth'
import { emailSchema, sendPasswordReset } from '../../../../utils/accounts/accounts'
import { limitRate } from '../../../../utils/http/rate-limit'
import { readValidated } from '../../../../utils/http/validation'

defineRouteMeta({
  openAPI: {
    tags: ['account'],
    summary: 'E-mail a password-reset link (answers 202 whether or not the address is known)'
  }
})

export default defineEventHandler(async (event) => {
  const { email } = await readValidated<{ email: string }>(event, {
    type: 'object',
    required: ['email'],
    additionalProperties: false,
    properties: { email: emailSchema }
  })
  limitRate(event, `reset|${normalizeEmail(email)}`, 5, 900)
  await sendPasswordReset(email)
  setResponseStatus(event, 202)
  return { message: 'If the address has an account, a reset link is on its way.' }
})
