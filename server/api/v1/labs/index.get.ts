import { sql } from 'drizzle-orm'
import { useDb, schema } from '../../../utils/storage/db'

defineRouteMeta({ openAPI: { tags: ['archive'], summary: 'Labs with their number of members and published datasets' } })

export default defineEventHandler(async () => {
  const db = await useDb()
  const items = await db
    .select({
      id: schema.labs.id,
      slug: schema.labs.slug,
      name: schema.labs.name,
      institution: schema.labs.institution,
      isDemo: schema.labs.isDemo,
      members: sql<number>`(select count(*) from lab_membership m where m.lab_id = lab.id)`,
      publishedDatasets: sql<number>`(select count(distinct d.id) from dataset d join dataset_version v on v.dataset_id = d.id
        where d.lab_id = lab.id and v.state = 'published')`
    })
    .from(schema.labs)
    .orderBy(schema.labs.name)
  return { items }
})
