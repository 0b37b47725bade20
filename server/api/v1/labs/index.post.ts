import { requireRole } from '../../../utils/accounts/auth'
import { createLab } from '../../../utils/accounts/labs'
import { readValidated } from '../../../utils/http/validation'

defineRouteMeta({ openAPI: { tags: ['labs'], summary: 'Create a lab (admin)' } })

const body = {
  type: 'object',
  required: ['slug', 'name'],
  additionalProperties: false,
  properties: {
    slug: { type: 'string', pattern: '^[a-z0-9][a-z0-9-]{1,60}$' },
    name: { type: 'string', minLength: 2, maxLength: 200 },
    institution: { type: 'string', maxLength: 300 }
  }
}

export default defineEventHandler(async (event) => {
  const v = await requireRole(event, 'admin')
  const b = await readValidated<{ slug: string, name: string, institution?: string }>(event, body)
  setResponseStatus(event, 201)
  return createLab(v, b)
})
