import { and, sql } from 'drizzle-orm'
import { publishedRecordsWhere } from '../../utils/publishing/archive'
import { runSearch } from '../../utils/search/search'
import { MAX_BUNDLE_RECORDS, sendBundle } from '../../utils/bundles'
import { schema } from '../../utils/storage/db'
import { publicUrl } from '../../utils/services/mail'
import { readValidated } from '../../utils/http/validation'

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
  const description = b.recordIds ? `${b.recordIds.length} chosen records` : `search ${JSON.stringify(b.query)}`
  const qs = new URLSearchParams(Object.entries(b.query ?? {}).map(([k, v]) => [k, String(v)])).toString()
  return sendBundle(
    event,
    { where, description, source: publicUrl(`/explore${qs ? '?' + qs : ''}`) },
    'crosspoint-selection.zip'
  )
})
