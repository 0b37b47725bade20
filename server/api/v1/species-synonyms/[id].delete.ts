import { eq } from 'drizzle-orm'
import { requireRole } from '../../../utils/accounts/auth'
import { audit } from '../../../utils/storage/audit'
import { schema, useDb } from '../../../utils/storage/db'
import { httpError } from '../../../utils/http/errors'
import { intParam } from '../../../utils/http/params'
import { forgetSystems } from '../../../utils/systems/systems'

defineRouteMeta({ openAPI: { tags: ['systems'], summary: 'Remove a curator-added species synonym (curators, admins; audited)' } })

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const v = await requireRole(event, 'curator', 'admin')
  const db = await useDb()
  const [row] = await db.delete(schema.speciesSynonyms).where(eq(schema.speciesSynonyms.id, id)).returning()
  if (!row) throw httpError(404, 'No such synonym')
  await audit(v.id, 'species-synonym.removed', 'species_synonym', id, { alias: row.alias, canonical: row.canonical })
  forgetSystems()
  return { removed: id }
})
