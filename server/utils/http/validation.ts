/**
 * JSON Schema (draft 2020-12) validation through ajv, shared by every route: the record and
 * dataset schemas from schemas/, and small request schemas declared beside their routes.
 */
import Ajv2020Module from 'ajv/dist/2020.js'
import addFormatsModule from 'ajv-formats'
import type { ErrorObject, ValidateFunction } from 'ajv'
import { readBody, getQuery, type H3Event } from 'h3'
import rateRecordSchema from '../../../schemas/rate-record.v1.json'
import datasetSchema from '../../../schemas/dataset.v1.json'
import { httpError, MESSAGES, type Issue } from './errors'
import { parseDecimal } from '../../../shared/records/ingest'

// ajv and ajv-formats ship CommonJS; under ESM the constructor sits on `.default`.
const Ajv2020 = ((Ajv2020Module as unknown as { default?: typeof Ajv2020Module }).default
  ?? Ajv2020Module) as typeof Ajv2020Module
const addFormats = ((addFormatsModule as unknown as { default?: typeof addFormatsModule }).default
  ?? addFormatsModule) as typeof addFormatsModule

let ajvInstance: InstanceType<typeof Ajv2020> | undefined
export function useAjv () {
  if (!ajvInstance) {
    ajvInstance = new Ajv2020({
      allErrors: true,
      verbose: true,
      strict: true,
      strictRequired: false,
      allowUnionTypes: true,
      coerceTypes: false
    })
    addFormats(ajvInstance)
    ajvInstance.addSchema(rateRecordSchema as object)
    ajvInstance.addSchema(datasetSchema as object)
  }
  return ajvInstance
}

/**
 * Compiled validators, once per distinct schema. Routes often declare their small schemas inline,
 * i.e. a new object on every request, and ajv keeps every schema object it has compiled in its own
 * cache: keyed by object alone, each request would compile afresh and stay in memory for good.
 * So the schema's text is the key (routes' schemas are constants of the code, a bounded set), and
 * the WeakMap spares re-serialising a schema object already seen.
 */
const compiled = new WeakMap<object, ValidateFunction>()
const bySource = new Map<string, ValidateFunction>()
export function compile<T = unknown> (schema: object): ValidateFunction<T> {
  let v = compiled.get(schema)
  if (!v) {
    const key = JSON.stringify(schema)
    v = bySource.get(key)
    if (!v) {
      v = useAjv().compile(schema)
      bySource.set(key, v)
    }
    compiled.set(schema, v)
  }
  return v as ValidateFunction<T>
}

/** How many validators have been compiled (for tests: it must not grow with the number of requests). */
export function compiledValidatorCount (): number {
  return bySource.size
}

/** ajv errors as issues with a JSON pointer and a plain sentence. */
export function ajvIssues (errors: ErrorObject[] | null | undefined, prefix = ''): Issue[] {
  return (errors ?? []).map((e) => {
    let path = prefix + e.instancePath
    let message = e.message ?? 'is not valid'
    if (e.keyword === 'required') {
      path += `/${(e.params as { missingProperty: string }).missingProperty}`
      message = 'is required'
    }
    if (e.keyword === 'additionalProperties') {
      path += `/${(e.params as { additionalProperty: string }).additionalProperty}`
      message = 'is not a known field'
    }
    if (e.keyword === 'enum')
      message = `must be one of: ${(e.params as { allowedValues: unknown[] }).allowedValues.join(', ')}`
    if (['minimum', 'maximum', 'exclusiveMinimum', 'exclusiveMaximum'].includes(e.keyword)) {
      // a sentence with the field's own description (which states its unit and range), not ajv's "must be >= 1"
      const limit = (e.params as { limit: number }).limit
      const words = {
        minimum: 'at least',
        maximum: 'at most',
        exclusiveMinimum: 'greater than',
        exclusiveMaximum: 'less than'
      }[e.keyword as 'minimum']
      const desc = (e.parentSchema as { description?: string } | undefined)?.description
      message = `must be ${words} ${limit}${desc ? ` (${desc})` : ''}; got ${JSON.stringify(e.data)}`
    }
    return { path: path || '/', message }
  })
}

/** Reads and validates a JSON body; 422 with every problem, or the typed body. */
export async function readValidated<T> (event: H3Event, schema: object): Promise<T> {
  let body: unknown
  try {
    body = await readBody(event)
  }
  catch {
    throw httpError(400, 'The request body is not valid JSON')
  }
  const validate = compile<T>(schema)
  if (!validate(body)) throw httpError(422, MESSAGES.invalidBody, ajvIssues(validate.errors))
  return body as T
}

/** Validates the query string (after the caller's coercion). */
export function queryValidated<T> (
  event: H3Event,
  schema: object,
  coerce: (q: Record<string, unknown>) => Record<string, unknown>
): T {
  const raw = coerce(getQuery(event) as Record<string, unknown>)
  const validate = compile<T>(schema)
  if (!validate(raw)) throw httpError(422, MESSAGES.invalidQuery, ajvIssues(validate.errors))
  return raw as T
}

export const finiteNumber = { type: 'number' } as const

/** Turns numeric query strings into numbers (a string that is not a number stays, so ajv names it). */
export function coerceNumbers (keys: string[]) {
  return (q: Record<string, unknown>) => {
    const out: Record<string, unknown> = {}
    for (const [k, v] of Object.entries(q)) {
      const val = Array.isArray(v) ? v[v.length - 1] : v
      if (val === '' || val === undefined) continue
      if (keys.includes(k)) {
        const n = typeof val === 'string' ? parseDecimal(val) : undefined
        out[k] = n !== undefined && Number.isFinite(n) ? n : val
      }
      else out[k] = val
    }
    return out
  }
}
