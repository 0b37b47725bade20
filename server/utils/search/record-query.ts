/** The record search's query parameters, shared by the search route and its id-list twin. */
import { pagingProperties } from '../http/params'
import { coerceNumbers, queryValidated } from '../http/validation'
import type { H3Event } from 'h3'
import type { SearchQuery } from './index-schema'

export const RANGE_KEYS = [
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
/** The most ids one `only=ids` answer carries (the comparison's own limit). */
export const MAX_ID_ANSWER = 5000
export const recordQuerySchema = {
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

export const RECORD_QUERY_NAMES = ['q', 'ids', 'process', 'solvent', 'technique', 'linkage', 'lab', ...RANGE_KEYS, 'sort']

/** The validated query as the index takes it (page and size as given or the defaults). */
export function recordSearchQuery (event: H3Event, defaults = { page: 1, pageSize: 50 }): SearchQuery {
  const q = queryValidated<
    Omit<SearchQuery, 'page' | 'pageSize' | 'labId' | 'ids'> & { page?: number, pageSize?: number, lab?: number, ids?: string }
  >(event, recordQuerySchema, coerceNumbers([...RANGE_KEYS, 'page', 'pageSize', 'lab']))
  const { lab, ids, page, pageSize, ...rest } = q
  return {
    ...rest,
    labId: lab,
    ids: ids ? ids.split(',').map(Number) : undefined,
    page: page ?? defaults.page,
    pageSize: pageSize ?? defaults.pageSize
  }
}
