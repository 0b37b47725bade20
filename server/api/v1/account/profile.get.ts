import { eq } from 'drizzle-orm'
import { requireUser } from '../../../utils/accounts/auth'
import { useDb, schema } from '../../../utils/storage/db'

defineRouteMeta({ openAPI: { tags: ['account'], summary: 'The signed-in user\'s profile and labs' } })

export default defineEventHandler(async (event) => {
  const v = await requireUser(event)
  const db = await useDb()
  const [u] = await db.select().from(schema.users).where(eq(schema.users.id, v.id))
  const labs = await db
    .select({ id: schema.labs.id, name: schema.labs.name, isLead: schema.labMemberships.isLead })
    .from(schema.labMemberships)
    .innerJoin(schema.labs, eq(schema.labs.id, schema.labMemberships.labId))
    .where(eq(schema.labMemberships.userId, v.id))
  return {
    id: u!.id,
    name: u!.name,
    email: u!.email,
    role: u!.role,
    orcid: u!.orcid,
    affiliation: u!.affiliation,
    labs
  }
})
