import { and, sql } from 'drizzle-orm'
import { publishedRecordsWhere } from '../../utils/publishing/archive'
import { runSearch } from '../../utils/search/search'
import { MAX_BUNDLE_RECORDS, sendBundle } from '../../utils/bundles'
import { schema } from '../../utils/storage/db'
import { publicUrl } from '../../utils/services/mail'
import { readValidated } from '../../utils/http/validation'
import { countOf } from '../../../shared/vocabulary'

defineRouteMeta({
  openAPI: {
    tags: ['bundles'],
    summary:
      'Download a search selection ({ query }) or chosen records ({ recordIds }) as a BagIt ZIP citing every '
      + 'contributing dataset; published records only',
    responses: {
      200: { description: 'application/zip' },
      413: { description: 'Selection too large' },
      429: { description: 'Too many bundles at once' }
    }
  }
})

const filters = {
  type: 'object',
  additionalProperties: false,
  properties: Object.fromEntries([
    ...['q', 'process', 'solvent', 'technique', 'linkage'].map(k => [k, { type: 'string', maxLength: 200 }]),
    ['lab', { type: 'integer', minimum: 1 }],
    ...[
      'deltaGMin',
      'deltaGMax',
      'temperatureMin',
      'temperatureMax',
      'distanceMin',
      'distanceMax',
      'log10RateMin',
      'log10RateMax'
    ].map(k => [k, { type: 'number' }])
  ])
}
const body = {
  type: 'object',
  additionalProperties: false,
  minProperties: 1,
  maxProperties: 1,
  properties: {
    query: filters,
    recordIds: { type: 'array', minItems: 1, maxItems: MAX_BUNDLE_RECORDS, items: { type: 'integer', minimum: 1 } }
  }
}

/** A search in words for people: "porphyrin"; solvent toluene; deltaGMin -1. */
function queryInWords (q: Record<string, unknown>): string {
  return Object.entries(q).map(([k, v]) => (k === 'q' ? `"${String(v)}"` : `${k} ${String(v)}`)).join('; ') || 'everything published'
}
/** Letters, digits and dashes only, at most 40: safe in a file name on every system. */
function slug (s: string): string {
  return s.toLowerCase().normalize('NFKD').replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '').slice(0, 40)
}

export default defineEventHandler(async (event) => {
  const b = await readValidated<{ query?: Record<string, string | number>, recordIds?: number[] }>(event, body)
  const { lab, ...rest } = (b.query ?? {}) as Record<string, never>
  // Only current, published, out-of-embargo records, whoever asks: a bundle is for citing published data.
  // A query selects exactly what the search finds (same index, visitor's view).
  const ids
    = b.recordIds
      ?? (await runSearch({ ...rest, labId: lab, page: 1, pageSize: MAX_BUNDLE_RECORDS + 1 }, null)).ids.map(h => h.id)
  const where = and(
    publishedRecordsWhere(),
    sql`${schema.rateRecords.id} in (select value from json_each(${JSON.stringify(ids)}))`
  )!
  // said in words in bag-info and named after what it holds (a query's words, or the count of chosen records)
  const description = b.recordIds ? countOf(b.recordIds.length, 'chosen record') : `search: ${queryInWords(b.query ?? {})}`
  const qs = new URLSearchParams(Object.entries(b.query ?? {}).map(([k, v]) => [k, String(v)])).toString()
  const day = new Date().toISOString().slice(0, 10)
  const what = b.recordIds ? `${b.recordIds.length}-records` : (slug(String(b.query?.q ?? '')) || 'search')
  return sendBundle(event, { where, description, source: publicUrl(`/explore${qs ? '?' + qs : ''}`) }, `crosspoint-${what}-${day}.zip`)
})
