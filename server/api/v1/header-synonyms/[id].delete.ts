import { eq } from 'drizzle-orm'
import { requireRole } from '../../../utils/accounts/auth'
import { audit } from '../../../utils/storage/audit'
import { schema, useDb } from '../../../utils/storage/db'
import { httpError } from '../../../utils/http/errors'
import { intParam } from '../../../utils/http/params'

defineRouteMeta({ openAPI: { tags: ['deposit'], summary: 'Remove a spreadsheet header word (curators, admins; audited)' } })

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const v = await requireRole(event, 'curator', 'admin')
  const db = await useDb()
  const [row] = await db.delete(schema.headerSynonyms).where(eq(schema.headerSynonyms.id, id)).returning()
  if (!row) throw httpError(404, 'No such header word')
  await audit(v.id, 'header-synonym.removed', 'header_synonym', id, { alias: row.alias, field: row.field })
  return { deleted: id }
})
