defineRouteMeta({ openAPI: { tags: ['service'], summary: 'This OpenAPI 3 document (the /api/v1 routes)' } })

/** Nitro builds the document from every route's defineRouteMeta; this keeps the public /api/v1 part. */
export default defineEventHandler(async (event) => {
  const full = await event.$fetch<{ openapi: string, info: object, paths: Record<string, unknown>, components?: object }>('/_openapi.json')
  const paths = Object.fromEntries(Object.entries(full.paths).filter(([p]) => p.startsWith('/api/v1/')))
  return {
    openapi: full.openapi,
    info: { ...full.info, title: 'Crosspoint API', version: '1' },
    servers: [{ url: useRuntimeConfig().public.baseUrl }],
    paths,
    components: full.components ?? {}
  }
})
