import { requireRole } from '../../../utils/accounts/auth'
import { audit } from '../../../utils/storage/audit'
import { useDb, schema } from '../../../utils/storage/db'
import { httpError } from '../../../utils/http/errors'
import { readValidated } from '../../../utils/http/validation'
import { solventFields } from '../../../utils/reference/solvents'

defineRouteMeta({ openAPI: { tags: ['reference'], summary: 'Add a solvent (admins; audited)' } })

export default defineEventHandler(async (event) => {
  const v = await requireRole(event, 'admin')
  const b = await readValidated<{ name: string, permittivity: number, refractiveIndex: number, source: string }>(
    event,
    {
      type: 'object',
      additionalProperties: false,
      required: ['name', 'permittivity', 'refractiveIndex', 'source'],
      properties: solventFields
    }
  )
  const db = await useDb()
  const [row] = await db.insert(schema.solvents).values(b).onConflictDoNothing().returning()
  if (!row) throw httpError(409, 'A solvent with this name exists', [{ path: '/name', message: 'is taken' }])
  await audit(v.id, 'solvent.added', 'solvent', row.id, { name: b.name })
  setResponseStatus(event, 201)
  return row
})
