import { eq } from 'drizzle-orm'
import { requireRole } from '../../../utils/accounts/auth'
import { audit } from '../../../utils/storage/audit'
import { useDb, schema } from '../../../utils/storage/db'
import { httpError } from '../../../utils/http/errors'
import { intParam } from '../../../utils/http/params'
import { readValidated } from '../../../utils/http/validation'
import { solventFields } from '../../../utils/reference/solvents'

defineRouteMeta({
  openAPI: {
    tags: ['reference'],
    summary: 'Edit a solvent row (admins; audited). Records keep the values they were computed with.'
  }
})

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const v = await requireRole(event, 'admin')
  const b = await readValidated<Record<string, unknown>>(event, {
    type: 'object',
    additionalProperties: false,
    minProperties: 1,
    properties: solventFields
  })
  const db = await useDb()
  const rows = await db
    .update(schema.solvents)
    .set({ ...b, updatedAt: new Date() })
    .where(eq(schema.solvents.id, id))
    .returning()
  if (!rows.length) throw httpError(404, 'No such solvent')
  await audit(v.id, 'solvent.edited', 'solvent', id, b)
  return rows[0]
})
