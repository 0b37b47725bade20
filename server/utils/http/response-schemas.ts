/**
 * JSON Schemas (2020-12, as OpenAPI 3.1 takes them) of the public GET answers, used by the OpenAPI document; the API
 * tests check live answers against them, so a change of shape that is not documented here fails a test.
 */
type Schema = Record<string, unknown>

const num = { type: 'number' }
const int = { type: 'integer' }
const str = { type: 'string' }
const nullable = (s: Schema): Schema => ({ anyOf: [s, { type: 'null' }] })
const obj = (properties: Record<string, Schema>, required = Object.keys(properties)): Schema =>
  ({ type: 'object', properties, required })
const date = { type: 'string', format: 'date-time' }

/** One problem shape for every error answer (h3's error JSON; issues name each field by JSON pointer). */
export const PROBLEM_SCHEMA = {
  type: 'object',
  required: ['statusCode', 'message'],
  properties: {
    error: { type: 'boolean' },
    statusCode: { type: 'integer', minimum: 400, maximum: 599 },
    statusMessage: str,
    message: { type: 'string', description: 'what went wrong, in words' },
    data: {
      type: 'object',
      properties: {
        issues: {
          type: 'array',
          items: obj({ path: { type: 'string', description: 'JSON pointer of the field (or row/column)' }, message: str })
        }
      }
    }
  }
}

const RECORD_SUMMARY = obj(
  {
    id: int, datasetId: int, datasetTitle: str, doi: nullable(str), labName: str, donorName: str, acceptorName: str,
    bridgeName: nullable(str), process: str, solvent: nullable(str), technique: nullable(str), temperatureK: num,
    rate: num, rateKind: { enum: ['unimolecular', 'bimolecular'] }, log10Rate: num, deltaG: nullable(num), license: str
  }
)
const RANGE = nullable(obj({ min: num, max: num }))
const COUNTS = { type: 'object', additionalProperties: int }

const DATASET_SUMMARY = obj(
  {
    id: int, labId: int, labName: str, conceptDoi: nullable(str), isDemo: { type: 'boolean' }, versionNumber: int,
    state: { enum: ['draft', 'submitted', 'returned', 'published', 'withdrawn'] }, title: str, doi: nullable(str),
    recordCount: int, license: str, publishedAt: nullable(date)
  }
)

const CONSENSUS = nullable(obj({
  log10Rate: num, stderr: { type: 'number', minimum: 0 }, tau: { type: 'number', minimum: 0 }, q: { type: 'number', minimum: 0 },
  i2: { type: 'number', minimum: 0, maximum: 1 }
}))
const SYSTEM = {
  key: { type: 'string', pattern: '^[0-9a-f]{16}$' }, donor: str, acceptor: str, bridge: nullable(str), linkage: str, process: str,
  medium: nullable(str), temperatureK: num, labCount: int, recordCount: int, consensus: CONSENSUS, discrepant: { type: 'boolean' }
}

export const RESPONSE_SCHEMAS: Record<string, Schema> = {
  'GET /api/v1/records': obj({
    total: int, page: int, pageSize: int, items: { type: 'array', items: RECORD_SUMMARY },
    didYouMean: { type: 'string', description: 'the query with misspelt words replaced by indexed ones' },
    facets: obj(Object.fromEntries(['process', 'solvent', 'technique', 'linkage', 'lab', 'year'].map(k => [k, COUNTS]))),
    ranges: obj(Object.fromEntries(['deltaG', 'temperature', 'distance', 'log10Rate'].map(k => [k, RANGE])))
  }, ['total', 'page', 'pageSize', 'items', 'facets', 'ranges']),
  'GET /api/v1/records/ids': obj({ total: int, ids: { type: 'array', items: int, maxItems: 5000 }, truncated: { type: 'boolean' } }),
  'GET /api/v1/records/{id}': obj({
    id: int, position: int,
    data: { type: 'object', description: 'the record in the open format (/schemas/rate-record.v1.json)' },
    deltaG: nullable(num), log10Rate: num, rate: num, rateKind: str, structures: { type: 'object' },
    dataset: obj({ id: int, title: str, versionNumber: int, state: str, doi: nullable(str), license: str, labName: str })
  }),
  'GET /api/v1/records/{id}/similar': obj({
    items: {
      type: 'array',
      items: obj({
        score: { type: 'number', minimum: 0, maximum: 1 },
        record: RECORD_SUMMARY,
        why: { type: 'array', items: obj({ contribution: num, detail: str }, ['contribution', 'detail']) }
      })
    }
  }),
  'GET /api/v1/datasets': obj({ total: int, page: int, pageSize: int, items: { type: 'array', items: DATASET_SUMMARY } }),
  'GET /api/v1/datasets/{id}': obj({
    id: int, conceptDoi: nullable(str), isDemo: { type: 'boolean' }, lab: obj({ id: int, name: str, institution: nullable(str) }),
    version: obj({
      versionNumber: int, state: str, title: str, description: str, metadata: { type: 'object' }, license: str,
      doi: nullable(str), recordCount: int, publishedAt: nullable(date), withdrawnAt: nullable(date)
    }, ['versionNumber', 'state', 'title', 'metadata', 'license', 'doi', 'recordCount']),
    versions: { type: 'array', items: obj({ versionNumber: int, state: str, doi: nullable(str), recordCount: int }) },
    records: { type: 'array', items: { type: 'object' } },
    recordPage: obj({ page: int, pageSize: int, total: int }),
    jsonLd: nullable({ type: 'object', description: 'schema.org Dataset' })
  }),
  'GET /api/v1/labs': obj({
    items: {
      type: 'array',
      items: obj({ id: int, slug: str, name: str, institution: nullable(str), members: int, publishedDatasets: int })
    }
  }),
  'GET /api/v1/health': obj({ status: { enum: ['ok'] }, database: str, records: int, version: str }),
  'GET /api/v1/overview': obj({
    counts: obj({ labs: int, datasets: int, records: int }),
    latest: { type: 'array', items: obj({ datasetId: int, versionNumber: int, title: str, doi: nullable(str), recordCount: int }) }
  }),
  'GET /api/v1/solvents': obj({
    items: { type: 'array', items: obj({ id: int, name: str, permittivity: num, refractiveIndex: num, source: str }) }
  }),
  'GET /api/v1/me': obj({ user: nullable({ type: 'object' }) }),
  'GET /api/v1/systems': obj({ total: int, page: int, pageSize: int, items: { type: 'array', items: obj(SYSTEM) } }),
  'GET /api/v1/systems/{key}': obj({
    ...SYSTEM,
    records: {
      type: 'array',
      items: obj({
        id: int, labName: str, datasetId: int, doi: nullable(str), temperatureK: num, log10Rate: num,
        log10RateSigma: nullable(num), sigmaImputed: { type: 'boolean' }, z: nullable(num), discrepant: { type: 'boolean' }
      })
    }
  })
}
const PAIR = obj({ total: int, unique: int })
const COUNTER_PAIRS = { investigations: PAIR, requests: PAIR }
RESPONSE_SCHEMAS['GET /api/v1/datasets/{id}/usage'] = obj({
  datasetId: int,
  from: str,
  until: str,
  ...COUNTER_PAIRS,
  machine: obj(COUNTER_PAIRS),
  months: { type: 'array', items: obj({ month: { type: 'string', pattern: '^\\d{4}-\\d{2}$' }, ...COUNTER_PAIRS }) }
})
RESPONSE_SCHEMAS['GET /api/v1/datasets/{id}/versions/{n}'] = RESPONSE_SCHEMAS['GET /api/v1/datasets/{id}']!
