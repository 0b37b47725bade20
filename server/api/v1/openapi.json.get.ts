import { completeOpenApi, type OpenApiDocument } from '../../utils/http/openapi'

defineRouteMeta({ openAPI: { tags: ['service'], summary: 'This OpenAPI 3.1 document (the /api/v1 routes)' } })

/** Nitro builds the document from every route's defineRouteMeta; this keeps the public /api/v1 part, completed. */
export default defineEventHandler(async (event) => {
  const full = await event.$fetch<OpenApiDocument>('/_openapi.json')
  const paths = Object.fromEntries(Object.entries(full.paths).filter(([p]) => p.startsWith('/api/v1/')))
  const doc = completeOpenApi({ ...full, paths })
  return {
    openapi: full.openapi,
    info: {
      ...full.info,
      title: 'Crosspoint API',
      version: '1',
      description: 'Errors share one problem shape (components.schemas.Problem). Harvesters also find OAI-PMH 2.0 at /oai.'
    },
    servers: [{ url: useRuntimeConfig().public.baseUrl }],
    paths: doc.paths,
    components: doc.components
  }
})
