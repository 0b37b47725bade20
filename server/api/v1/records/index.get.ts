import { searchRecords, type RecordFilters } from '../../../utils/archive'
import { coerceNumbers, queryValidated } from '../../../utils/validation'
import { pagingProperties } from '../../../utils/params'

const numberKeys = ['deltaGMin', 'deltaGMax', 'temperatureMin', 'temperatureMax', 'distanceMin', 'distanceMax', 'log10RateMin', 'log10RateMax', 'page', 'pageSize', 'lab']
const querySchema = {
  type: 'object', additionalProperties: false,
  properties: {
    q: { type: 'string', maxLength: 200 }, process: { type: 'string', maxLength: 60 }, solvent: { type: 'string', maxLength: 120 },
    technique: { type: 'string', maxLength: 60 }, linkage: { type: 'string', maxLength: 60 }, lab: { type: 'integer', minimum: 1 },
    sort: { enum: ['deltaG', '-deltaG', 'log10Rate', '-log10Rate', 'temperature', '-temperature', 'distance', '-distance', 'donor', 'acceptor'] },
    ...Object.fromEntries(numberKeys.filter(k => !['page', 'pageSize', 'lab'].includes(k)).map(k => [k, { type: 'number' }])),
    ...pagingProperties
  }
}

defineRouteMeta({ openAPI: { tags: ['records'], summary: 'Search published records, with facet counts', parameters: [
  'q', 'process', 'solvent', 'technique', 'linkage', 'lab', 'deltaGMin', 'deltaGMax', 'temperatureMin', 'temperatureMax', 'distanceMin', 'distanceMax', 'log10RateMin', 'log10RateMax', 'sort', 'page', 'pageSize'
].map(name => ({ in: 'query', name, schema: { type: 'string' } })) } })

export default defineEventHandler(async (event) => {
  const q = queryValidated<Omit<RecordFilters, 'page' | 'pageSize' | 'labId'> & { page?: number, pageSize?: number, lab?: number }>(event, querySchema, coerceNumbers(numberKeys))
  const { lab, ...rest } = q
  return searchRecords({ ...rest, labId: lab, page: q.page ?? 1, pageSize: q.pageSize ?? 50 })
})
