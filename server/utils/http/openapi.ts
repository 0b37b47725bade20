/**
 * Completes the OpenAPI document Nitro builds from the routes' meta (which is read at build time and keeps literals
 * only) with what lives in code: query parameters from the schemas the routes validate with, path parameters for
 * every template segment, request bodies of the model routes, response schemas of the public answers, one problem
 * shape for every error, security schemes with each operation's requirement, and operation ids.
 */
import { curveBodySchema, fitBodySchema } from '../model/route-schemas'
import { RECORD_QUERY_PARAMETERS } from '../publishing/dataset-view'
import { recordQuerySchema } from '../search/record-query'
import {
  BUNDLE_QUERY, CITATION_QUERY, DATASET_LIST_QUERY, REVIEW_QUEUE_QUERY, SIMILAR_QUERY, SYSTEM_LIST_QUERY,
  USAGE_QUERY,
  USAGE_REPORT_QUERY
} from './query-schemas'
import { PROBLEM_SCHEMA, RESPONSE_SCHEMAS } from './response-schemas'
import { SYNONYM_BODY } from '../systems/systems'
import { SAVED_SEARCH_BODY, SAVED_SEARCH_PATCH, UNSUBSCRIBE_BODY } from '../alerts/saved-searches'
import { decayFitBodySchema } from '../model/decay-schemas'
import { SAVE_MAPPING_BODY } from '../deposit/mappings'
import { HEADER_SYNONYM_BODY } from '../deposit/header-synonyms'
import { RATE_FROM_TRACE_BODY, TRACE_FIT_OPTIONS } from '../traces/trace-fit'
import { TRACE_META_QUERY } from '../traces/traces'

type Schema = { type?: string, required?: string[], properties?: Record<string, Record<string, unknown>> }
interface Parameter { in: string, name: string, required?: boolean, schema?: unknown, description?: string }
interface Operation {
  operationId?: string
  parameters?: Parameter[]
  requestBody?: unknown
  responses?: Record<string, { description?: string, content?: unknown, $ref?: string }>
  security?: Record<string, string[]>[]
}
export interface OpenApiDocument {
  openapi: string
  info: object
  paths: Record<string, Record<string, Operation>>
  components?: Record<string, unknown>
}

const { page: _page, pageSize: _size, ...searchWithoutPaging } = recordQuerySchema.properties
const QUERIES: Record<string, Schema> = {
  'GET /api/v1/records': recordQuerySchema,
  'GET /api/v1/records/ids': { ...recordQuerySchema, properties: searchWithoutPaging },
  'GET /api/v1/datasets': DATASET_LIST_QUERY,
  'GET /api/v1/datasets/{id}/citation': CITATION_QUERY,
  'GET /api/v1/datasets/{id}/bundle': BUNDLE_QUERY,
  'GET /api/v1/records/{id}/similar': SIMILAR_QUERY,
  'GET /api/v1/review/queue': REVIEW_QUEUE_QUERY,
  'GET /api/v1/systems': SYSTEM_LIST_QUERY,
  'GET /api/v1/datasets/{id}/usage': USAGE_QUERY,
  'GET /api/v1/reports/datasets': USAGE_REPORT_QUERY,
  'POST /api/v1/datasets/{id}/traces': TRACE_META_QUERY
}
const BODIES: Record<string, unknown> = {
  'POST /api/v1/model/curve': curveBodySchema,
  'POST /api/v1/model/fit': fitBodySchema,
  'POST /api/v1/species-synonyms': SYNONYM_BODY,
  'POST /api/v1/account/saved-searches': SAVED_SEARCH_BODY,
  'PATCH /api/v1/account/saved-searches/{id}': SAVED_SEARCH_PATCH,
  'POST /api/v1/account/saved-searches/unsubscribe': UNSUBSCRIBE_BODY,
  'POST /api/v1/model/decay-fit': decayFitBodySchema,
  'POST /api/v1/labs/{id}/mappings': SAVE_MAPPING_BODY,
  'POST /api/v1/header-synonyms': HEADER_SYNONYM_BODY,
  'POST /api/v1/traces/{id}/fit': TRACE_FIT_OPTIONS,
  'POST /api/v1/datasets/{id}/records/{recordId}/rate-from-trace': RATE_FROM_TRACE_BODY
}
/** Operations anyone may call; every other one needs a session cookie or an API token (else 401). */
export const PUBLIC_OPERATIONS = new Set([
  'GET /api/v1/records', 'GET /api/v1/records/ids', 'GET /api/v1/records/{id}', 'GET /api/v1/records/{id}/similar',
  'GET /api/v1/datasets', 'GET /api/v1/datasets/{id}', 'GET /api/v1/datasets/{id}/versions/{n}',
  'GET /api/v1/datasets/{id}/bundle', 'GET /api/v1/datasets/{id}/citation', 'GET /api/v1/labs', 'GET /api/v1/labs/{id}',
  'GET /api/v1/health', 'GET /api/v1/overview', 'GET /api/v1/openapi.json', 'GET /api/v1/templates/{file}',
  'GET /api/v1/solvents', 'GET /api/v1/me', 'GET /api/v1/systems', 'GET /api/v1/systems/{key}', 'GET /api/v1/species-synonyms',
  'POST /api/v1/bundles', 'POST /api/v1/model/curve', 'POST /api/v1/model/fit',
  'POST /api/v1/account/signup', 'POST /api/v1/account/login-link', 'POST /api/v1/account/password-reset',
  'POST /api/v1/account/password-reset/confirm', 'POST /api/v1/account/verify',
  'GET /api/v1/datasets/{id}/usage', 'POST /api/v1/account/saved-searches/unsubscribe',
  'POST /api/v1/model/decay-fit', 'GET /api/v1/datasets/{id}/traces', 'GET /api/v1/traces/{id}', 'POST /api/v1/traces/{id}/fit'
])
const ERRORS: Record<string, string> = {
  401: 'Not signed in, or the API token is not valid',
  403: 'Signed in, but the role or lab does not allow this',
  404: 'No such item, or not visible to the caller',
  413: 'The body or file is larger than the route takes',
  422: 'The query or body is not valid; data.issues names each field'
}

/** Path parameters that are not positive integers. */
const PATH_PARAMETER_SCHEMAS: Record<string, object> = {
  file: { type: 'string' },
  key: { type: 'string', pattern: '^[0-9a-f]{16}$' }
}
const PROBLEM_CONTENT = { 'application/json': { schema: { $ref: '#/components/schemas/Problem' } } }

/** getDatasetsByIdCitation for GET /api/v1/datasets/{id}/citation. */
function operationId (method: string, path: string): string {
  const words = path.replace(/^\/api\/v1\//, '').split(/[/.-]/).filter(Boolean)
    .map(w => (w.startsWith('{') ? `By${w.slice(1, -1)}` : w))
    .map(w => w[0]!.toUpperCase() + w.slice(1))
  return method + words.join('')
}

function parametersOf (key: string, path: string, given: Parameter[]): Parameter[] {
  const query = QUERIES[key]
  const fromSchema: Parameter[] = Object.entries(query?.properties ?? {}).map(([name, schema]) => ({
    in: 'query',
    name,
    ...(query?.required?.includes(name) ? { required: true } : {}),
    schema,
    ...(typeof schema.description === 'string' ? { description: schema.description } : {})
  }))
  const templ = [...path.matchAll(/\{(\w+)\}/g)].map(m => m[1]!)
  const pathParams: Parameter[] = templ.map(name => ({
    in: 'path',
    name,
    required: true,
    schema: PATH_PARAMETER_SCHEMAS[name] ?? { type: 'integer', minimum: 1 }
  }))
  const keep = given.filter(p => !(p.in === 'path') && !fromSchema.some(q => q.name === p.name && p.in === 'query'))
  return [...pathParams, ...keep, ...fromSchema]
}

export function completeOpenApi (doc: OpenApiDocument): OpenApiDocument {
  for (const [path, ops] of Object.entries(doc.paths)) {
    for (const [method, op] of Object.entries(ops)) {
      const key = `${method.toUpperCase()} ${path}`
      op.operationId = operationId(method, path)
      op.parameters = parametersOf(key, path, op.parameters ?? [])
      if (key === 'GET /api/v1/datasets/{id}' || key === 'GET /api/v1/datasets/{id}/versions/{n}')
        op.parameters.push(...(RECORD_QUERY_PARAMETERS as Parameter[]).filter(p => !op.parameters!.some(q => q.name === p.name)))
      if (BODIES[key]) op.requestBody = { required: true, content: { 'application/json': { schema: BODIES[key] } } }
      const isPublic = PUBLIC_OPERATIONS.has(key)
      op.security = isPublic
        ? [{}, { bearerToken: [] }, { sessionCookie: [] }]
        : [{ bearerToken: [] }, { sessionCookie: [] }]
      const responses = (op.responses ??= {})
      const ok = Object.keys(responses).find(c => c.startsWith('2')) ?? '200'
      const answer = RESPONSE_SCHEMAS[key]
      responses[ok] = {
        description: responses[ok]?.description ?? 'OK',
        ...(answer ? { content: { 'application/json': { schema: answer } } } : {})
      }
      const codes = [
        ...(isPublic ? [] : ['401', '403']),
        ...(path.includes('{') ? ['404'] : []),
        ...(op.parameters.some(p => p.in === 'query') || method !== 'get' ? ['422'] : []),
        ...(method !== 'get' && method !== 'delete' ? ['413'] : [])
      ]
      for (const c of codes) responses[c] = { $ref: `#/components/responses/Problem${c}` }
      // codes a route declared itself keep their words but take the problem shape
      for (const [c, r] of Object.entries(responses)) {
        if (/^[45]/.test(c) && !r.$ref)
          responses[c] = { description: r.description ?? 'Error', content: PROBLEM_CONTENT }
      }
    }
  }
  doc.components = {
    ...(doc.components ?? {}),
    schemas: { ...((doc.components?.schemas as object) ?? {}), Problem: PROBLEM_SCHEMA },
    responses: Object.fromEntries(Object.entries(ERRORS).map(([c, d]) => [
      `Problem${c}`,
      { description: d, content: PROBLEM_CONTENT }
    ])),
    securitySchemes: {
      bearerToken: { type: 'http', scheme: 'bearer', description: 'A personal API token (Account → API tokens)' },
      sessionCookie: {
        type: 'apiKey', in: 'cookie', name: 'next-auth.session-token',
        description: 'The browser session (named __Secure-next-auth.session-token over HTTPS)'
      }
    }
  }
  return doc
}
