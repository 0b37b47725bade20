import { sql } from 'drizzle-orm'
import { useDb } from '../../utils/storage/db'

defineRouteMeta({
  openAPI: {
    tags: ['service'],
    summary: 'Service health',
    responses: { 200: { description: '{ status, database, records, version }' } }
  }
})

export default defineEventHandler(async () => {
  const db = await useDb()
  const [row] = await db.all<{ n: number }>(sql`select count(*) as n from rate_record`)
  return { status: 'ok', database: 'ok', records: row?.n ?? 0, version: useRuntimeConfig().public.version }
})
