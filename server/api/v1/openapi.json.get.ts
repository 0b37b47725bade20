import { curveBodySchema, fitBodySchema } from '../../utils/model/route-schemas'
import { RECORD_QUERY_PARAMETERS } from '../../utils/publishing/dataset-view'
import { recordQuerySchema } from '../../utils/search/record-query'

defineRouteMeta({ openAPI: { tags: ['service'], summary: 'This OpenAPI 3 document (the /api/v1 routes)' } })

/** Nitro builds the document from every route's defineRouteMeta; this keeps the public /api/v1 part. */
export default defineEventHandler(async (event) => {
  const full = await event.$fetch<{
    openapi: string
    info: object
    paths: Record<string, unknown>
    components?: object
  }>('/_openapi.json')
  const paths = Object.fromEntries(Object.entries(full.paths).filter(([p]) => p.startsWith('/api/v1/'))) as Record<
    string,
    Record<string, { requestBody?: unknown, parameters?: unknown[] }>
  >
  // Request schemas that live in code (built from the physics bounds) replace the placeholders of the
  // build-time route meta, so the document states the same limits, with units, as the server enforces.
  for (const [path, schema] of [
    ['/api/v1/model/curve', curveBodySchema],
    ['/api/v1/model/fit', fitBodySchema]
  ] as const) {
    const op = paths[path]?.post
    if (op) op.requestBody = { required: true, content: { 'application/json': { schema } } }
  }
  for (const path of ['/api/v1/datasets/{id}', '/api/v1/datasets/{id}/versions/{n}']) {
    const op = paths[path]?.get
    if (op) op.parameters = [...(op.parameters ?? []), ...RECORD_QUERY_PARAMETERS]
  }
  // the record search's parameters, from the schema its routes validate with
  const searchParams = Object.entries(recordQuerySchema.properties).map(([name, schema]) => ({
    in: 'query',
    name,
    schema,
    ...('description' in schema ? { description: schema.description } : {})
  }))
  for (const path of ['/api/v1/records', '/api/v1/records/ids']) {
    const op = paths[path]?.get
    if (op) op.parameters = searchParams.filter(p => path === '/api/v1/records' || !['page', 'pageSize'].includes(p.name))
  }
  return {
    openapi: full.openapi,
    info: { ...full.info, title: 'Crosspoint API', version: '1' },
    servers: [{ url: useRuntimeConfig().public.baseUrl }],
    paths,
    components: full.components ?? {}
  }
})
