import { eq } from 'drizzle-orm'
import { requireRole } from '../../../../utils/accounts/auth'
import { audit } from '../../../../utils/storage/audit'
import { useDb, schema } from '../../../../utils/storage/db'
import { httpError } from '../../../../utils/http/errors'
import { readValidated } from '../../../../utils/http/validation'
import { endAllSessions } from '../../../../utils/accounts/sessions'

defineRouteMeta({ openAPI: { tags: ['admin'], summary: 'Change a user\'s role (admin; audited)' } })

export default defineEventHandler(async (event) => {
  const id = getRouterParam(event, 'id') ?? ''
  const admin = await requireRole(event, 'admin')
  const { role } = await readValidated<{ role: 'contributor' | 'curator' | 'admin' }>(event, {
    type: 'object',
    required: ['role'],
    additionalProperties: false,
    properties: { role: { enum: ['contributor', 'curator', 'admin'] } }
  })
  if (id === admin.id && role !== 'admin')
    throw httpError(409, 'You cannot remove your own admin role; ask another admin')
  const db = await useDb()
  const [before] = await db.select({ role: schema.users.role }).from(schema.users).where(eq(schema.users.id, id))
  if (!before) throw httpError(404, 'No such user')
  await db.update(schema.users).set({ role, updatedAt: new Date() }).where(eq(schema.users.id, id))
  // a new role starts new sessions: the person signs in again and gets exactly what the role allows
  if (before.role !== role) await endAllSessions(id)
  await audit(admin.id, 'user.role-changed', 'user', id, { from: before.role, to: role })
  return { id, role }
})
