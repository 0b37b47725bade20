import { eq } from 'drizzle-orm'
import { requireUser } from '../../../../utils/auth'
import { useDb, schema } from '../../../../utils/db'
import { httpError, MESSAGES } from '../../../../utils/errors'
import { intParam } from '../../../../utils/params'
import { datasetAudit } from '../../../../utils/review'

defineRouteMeta({ openAPI: { tags: ['review'], summary: 'The audit trail of one dataset (its lab, curators and admins)' } })

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const v = await requireUser(event)
  const db = await useDb()
  const [d] = await db.select().from(schema.datasets).where(eq(schema.datasets.id, id))
  if (!d || !(v.role !== 'contributor' || v.labIds.includes(d.labId))) throw httpError(404, MESSAGES.notFound)
  return { items: await datasetAudit(id) }
})
