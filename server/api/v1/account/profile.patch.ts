import { eq } from 'drizzle-orm'
import { isValidOrcid, normalizeOrcid } from '../../../../shared/identifiers'
import { requireUser } from '../../../utils/accounts/auth'
import { useDb, schema } from '../../../utils/storage/db'
import { httpError } from '../../../utils/http/errors'
import { readValidated } from '../../../utils/http/validation'

defineRouteMeta({
  openAPI: { tags: ['account'], summary: 'Change name, ORCID iD (check digit verified) or affiliation' }
})

const body = {
  type: 'object',
  additionalProperties: false,
  minProperties: 1,
  properties: {
    name: { type: 'string', minLength: 1, maxLength: 200 },
    orcid: { type: ['string', 'null'], maxLength: 60 },
    affiliation: { type: ['string', 'null'], maxLength: 300 }
  }
}

export default defineEventHandler(async (event) => {
  const v = await requireUser(event)
  const b = await readValidated<{ name?: string, orcid?: string | null, affiliation?: string | null }>(event, body)
  if (b.orcid && !isValidOrcid(b.orcid))
    throw httpError(422, 'The ORCID iD is not valid', [
      { path: '/orcid', message: 'must be 0000-0000-0000-000X with a correct ISO 7064 MOD 11-2 check character' }
    ])
  const db = await useDb()
  await db
    .update(schema.users)
    .set({ ...b, orcid: b.orcid ? normalizeOrcid(b.orcid) : b.orcid, updatedAt: new Date() })
    .where(eq(schema.users.id, v.id))
  return { ok: true }
})
