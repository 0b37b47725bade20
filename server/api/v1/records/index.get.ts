import { getViewer } from '../../../utils/accounts/auth'
import { pagedRecords } from '../../../utils/publishing/archive'
import { cachedSearch } from '../../../utils/search/search'
import type { SearchQuery } from '../../../utils/search/index-schema'
import { coerceNumbers, queryValidated } from '../../../utils/http/validation'
import { pagingProperties } from '../../../utils/http/params'

const RANGE_KEYS = [
  'deltaGMin',
  'deltaGMax',
  'temperatureMin',
  'temperatureMax',
  'distanceMin',
  'distanceMax',
  'log10RateMin',
  'log10RateMax',
  'yearMin',
  'yearMax'
]
const querySchema = {
  type: 'object',
  additionalProperties: false,
  properties: {
    q: { type: 'string', maxLength: 200 },
    ids: {
      type: 'string',
      pattern: '^\\d+(,\\d+){0,4999}$',
      description: 'comma-separated record ids (the compare selection)'
    },
    process: { type: 'string', maxLength: 60 },
    solvent: { type: 'string', maxLength: 120 },
    technique: { type: 'string', maxLength: 60 },
    linkage: { type: 'string', maxLength: 60 },
    lab: { type: 'integer', minimum: 1 },
    sort: {
      enum: [
        'deltaG',
        '-deltaG',
        'log10Rate',
        '-log10Rate',
        'temperature',
        '-temperature',
        'distance',
        '-distance',
        'donor',
        'acceptor'
      ]
    },
    ...Object.fromEntries(RANGE_KEYS.map(k => [k, { type: 'number' }])),
    ...pagingProperties
  }
}

defineRouteMeta({
  openAPI: {
    tags: ['records'],
    summary:
      'Search records (published ones; signed-in members also find their lab\'s drafts): full text with prefix and '
      + 'typo tolerance, facet counts and value ranges',
    parameters: [
      'q',
      'ids',
      'process',
      'solvent',
      'technique',
      'linkage',
      'lab',
      ...RANGE_KEYS,
      'sort',
      'page',
      'pageSize'
    ].map(name => ({ in: 'query', name, schema: { type: 'string' } }))
  }
})

export default defineEventHandler(async (event) => {
  const q = queryValidated<
    Omit<SearchQuery, 'page' | 'pageSize' | 'labId'> & { page?: number, pageSize?: number, lab?: number }
  >(event, querySchema, coerceNumbers([...RANGE_KEYS, 'page', 'pageSize', 'lab']))
  const viewer = await getViewer(event)
  const { lab, ids, ...rest } = q as typeof q & { ids?: string }
  const page = q.page ?? 1
  const pageSize = q.pageSize ?? 50
  return cachedSearch(
    { ...rest, labId: lab, ids: ids ? ids.split(',').map(Number) : undefined, page, pageSize },
    viewer,
    async res => ({
      total: res.total,
      page,
      pageSize,
      items: await pagedRecords(res.ids),
      facets: res.facets,
      ranges: res.ranges
    })
  )
})
