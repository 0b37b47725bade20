import { desc } from 'drizzle-orm'
import { requireRole } from '../../../utils/accounts/auth'
import { useDb, schema } from '../../../utils/storage/db'

defineRouteMeta({ openAPI: { tags: ['admin'], summary: 'Mail the app has sent, newest first (admin)' } })

export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  const db = await useDb()
  return { items: await db.select().from(schema.mailOutbox).orderBy(desc(schema.mailOutbox.id)).limit(500) }
})
