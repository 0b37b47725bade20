import { emailSchema, passwordSchema, signUp } from '../../../utils/accounts/accounts'
import { limitRate } from '../../../utils/http/rate-limit'
import { readValidated } from '../../../utils/http/validation'

defineRouteMeta({
  openAPI: {
    tags: ['account'],
    summary: 'Create an account; a confirmation link is e-mailed',
    description:
      'Answers 202 alike for a new and an already registered address (the owner of a registered one is told by mail), '
      + 'in the same time, so that the answer does not reveal who has an account.',
    responses: {
      202: { description: 'Check your e-mail' },
      422: { description: 'Invalid fields' },
      429: { description: 'Too many attempts' }
    }
  }
})

const body = {
  type: 'object',
  required: ['name', 'email', 'password'],
  additionalProperties: false,
  properties: { name: { type: 'string', minLength: 1, maxLength: 200 }, email: emailSchema, password: passwordSchema }
}

export default defineEventHandler(async (event) => {
  limitRate(event, 'signup', 10, 3600)
  const b = await readValidated<{ name: string, email: string, password: string }>(event, body)
  await signUp(b.name, b.email, b.password)
  setResponseStatus(event, 202)
  return { message: 'Check your e-mail: open the link we sent to confirm the address, then sign in.' }
})
