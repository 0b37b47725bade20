import rateRecord from '../../../schemas/rate-record.v1.json'
import dataset from '../../../schemas/dataset.v1.json'
import { httpError } from '../../utils/http/errors'

const SCHEMAS: Record<string, object> = { 'rate-record.v1.json': rateRecord, 'dataset.v1.json': dataset }

/** The public JSON Schemas; `$id` is rewritten to this deployment's public URL of the schema. */
export default defineEventHandler((event) => {
  const name = getRouterParam(event, 'name') ?? ''
  // own keys only: "__proto__" and "constructor" are not schemas
  if (!Object.hasOwn(SCHEMAS, name))
    throw httpError(
      404,
      `No schema named ${JSON.stringify(name.slice(0, 60))}; known: ${Object.keys(SCHEMAS).join(', ')}`
    )
  const schema = SCHEMAS[name]!
  setHeader(event, 'content-type', 'application/schema+json; charset=utf-8')
  setHeader(event, 'cache-control', 'public, max-age=3600')
  return { ...schema, $id: `${useRuntimeConfig().public.baseUrl.replace(/\/$/, '')}/schemas/${name}` }
})
