import { requireUser } from '../../../../utils/accounts/auth'
import { acceptInvitation } from '../../../../utils/accounts/labs'
import { readValidated } from '../../../../utils/http/validation'

defineRouteMeta({
  openAPI: {
    tags: ['labs'],
    summary: 'Accept a lab invitation with the token from the e-mail (signed in as the invited address)'
  }
})

export default defineEventHandler(async (event) => {
  const v = await requireUser(event)
  const { token } = await readValidated<{ token: string }>(event, {
    type: 'object',
    required: ['token'],
    additionalProperties: false,
    properties: { token: { type: 'string', minLength: 10, maxLength: 200 } }
  })
  const lab = await acceptInvitation(v, token)
  return { joined: { id: lab.id, name: lab.name } }
})
