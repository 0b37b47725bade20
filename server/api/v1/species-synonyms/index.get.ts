import { asc } from 'drizzle-orm'
import { schema, useDb } from '../../../utils/storage/db'
import { SPECIES_SYNONYMS } from '../../../../shared/records/systems'

defineRouteMeta({
  openAPI: {
    tags: ['systems'],
    summary: 'Species synonyms used to decide which records measure the same system: the built-in ones and those curators added'
  }
})

export default defineEventHandler(async () => {
  const db = await useDb()
  const rows = await db.select().from(schema.speciesSynonyms).orderBy(asc(schema.speciesSynonyms.alias))
  return {
    builtIn: Object.entries(SPECIES_SYNONYMS).map(([alias, canonical]) => ({ alias, canonical })),
    items: rows.map(r => ({ id: r.id, alias: r.alias, canonical: r.canonical, createdAt: r.createdAt }))
  }
})
