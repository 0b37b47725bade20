/**
 * The sitemap (sitemaps.org protocol 0.9): the site's public pages and every published dataset's landing page, with
 * the date of its newest publication. Bounded: the protocol's 50 000 URLs a file.
 */
import { eq, max } from 'drizzle-orm'
import { schema, useDb } from '../utils/storage/db'
import { publicUrl } from '../utils/services/mail'

const PAGES = ['/', '/explore', '/datasets', '/compare', '/model', '/format']
const MAX_URLS = 50_000

const xml = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;')

export default defineEventHandler(async (event) => {
  const db = await useDb()
  const rows = await db
    .select({ id: schema.datasetVersions.datasetId, at: max(schema.datasetVersions.publishedAt) })
    .from(schema.datasetVersions)
    .where(eq(schema.datasetVersions.state, 'published'))
    .groupBy(schema.datasetVersions.datasetId)
    .orderBy(schema.datasetVersions.datasetId)
    .limit(MAX_URLS - PAGES.length)
  const urls = [
    ...PAGES.map(p => `<url><loc>${xml(publicUrl(p))}</loc></url>`),
    ...rows.map((r) => {
      const at = r.at ? new Date(r.at) : null
      const lastmod = at ? `<lastmod>${at.toISOString().slice(0, 10)}</lastmod>` : ''
      return `<url><loc>${xml(publicUrl(`/datasets/${r.id}`))}</loc>${lastmod}</url>`
    })
  ]
  setResponseHeader(event, 'content-type', 'application/xml; charset=utf-8')
  const head = '<?xml version="1.0" encoding="UTF-8"?>\n<urlset xmlns="http://www.sitemaps.org/schemas/sitemap/0.9">'
  return `${head}\n${urls.join('\n')}\n</urlset>\n`
})
