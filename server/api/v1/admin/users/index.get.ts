import { sql } from 'drizzle-orm'
import { requireRole } from '../../../../utils/accounts/auth'
import { useDb, schema } from '../../../../utils/storage/db'

defineRouteMeta({ openAPI: { tags: ['admin'], summary: 'All users with role, verification state and labs (admin)' } })

export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  const db = await useDb()
  const items = await db
    .select({
      id: schema.users.id,
      name: schema.users.name,
      email: schema.users.email,
      role: schema.users.role,
      orcid: schema.users.orcid,
      affiliation: schema.users.affiliation,
      verified: sql<boolean>`"user"."emailVerified" is not null`,
      createdAt: schema.users.createdAt,
      labs: sql<string>`(select group_concat(l.name, '; ') from lab_membership m join lab l on l.id = m.lab_id
        where m.user_id = "user"."id")`
    })
    .from(schema.users)
    .orderBy(schema.users.name)
  return { items }
})
