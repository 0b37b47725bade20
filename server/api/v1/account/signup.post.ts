import { emailSchema, passwordSchema, signUp } from '../../../utils/accounts'
import { limitRate } from '../../../utils/rate-limit'
import { readValidated } from '../../../utils/validation'

defineRouteMeta({ openAPI: { tags: ['account'], summary: 'Create an account; a confirmation link is e-mailed', responses: { 201: { description: 'Created; confirm the e-mail address to sign in' }, 409: { description: 'Address already registered' }, 422: { description: 'Invalid fields' }, 429: { description: 'Too many attempts' } } } })

const body = { type: 'object', required: ['name', 'email', 'password'], additionalProperties: false, properties: { name: { type: 'string', minLength: 1, maxLength: 200 }, email: emailSchema, password: passwordSchema } }

export default defineEventHandler(async (event) => {
  limitRate(event, 'signup', 10, 3600)
  const b = await readValidated<{ name: string, email: string, password: string }>(event, body)
  const u = await signUp(b.name, b.email, b.password)
  setResponseStatus(event, 201)
  return { id: u.id, email: u.email, message: 'Account created. Open the link we sent to your e-mail address to confirm it, then sign in.' }
})
