import { normalizeEmail, requireLabLead } from '../../../../utils/accounts/auth'
import { inviteToLab } from '../../../../utils/accounts/labs'
import { intParam } from '../../../../utils/http/params'
import { limitRate } from '../../../../utils/http/rate-limit'
import { readValidated } from '../../../../utils/http/validation'

defineRouteMeta({ openAPI: { tags: ['labs'], summary: 'Invite someone to the lab by e-mail (lab lead or admin)' } })

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const v = await requireLabLead(event, id)
  const { email } = await readValidated<{ email: string }>(event, {
    type: 'object',
    required: ['email'],
    additionalProperties: false,
    properties: { email: { type: 'string', format: 'email', maxLength: 200 } }
  })
  limitRate(event, `invite|${v.id}`, 30, 3600)
  await inviteToLab(v, id, email)
  setResponseStatus(event, 202)
  return { invited: normalizeEmail(email) }
})
