import { desc, eq } from 'drizzle-orm'
import { requireRole } from '../../../utils/accounts/auth'
import { useDb, schema } from '../../../utils/storage/db'

defineRouteMeta({ openAPI: { tags: ['admin'], summary: 'The audit trail, newest first (admin)' } })

export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  const db = await useDb()
  const items = await db
    .select({
      id: schema.auditEvents.id,
      at: schema.auditEvents.createdAt,
      action: schema.auditEvents.action,
      targetType: schema.auditEvents.targetType,
      targetId: schema.auditEvents.targetId,
      detail: schema.auditEvents.detail,
      actor: schema.users.email
    })
    .from(schema.auditEvents)
    .leftJoin(schema.users, eq(schema.users.id, schema.auditEvents.actorId))
    .orderBy(desc(schema.auditEvents.id))
    .limit(500)
  return { items }
})
