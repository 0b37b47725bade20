/** Column mappings: the request shape (validated like any body), and each lab's saved mappings found by header row. */
import { and, asc, desc, eq } from 'drizzle-orm'
import { schema, useDb } from '../storage/db'
import { httpError } from '../http/errors'
import { compile } from '../http/validation'
import type { Mapping } from '../../../shared/records/mapping'

const row = { type: 'integer', minimum: 1, maximum: 1_000_000 }
export const MAPPING_SCHEMA = {
  type: 'object',
  additionalProperties: false,
  required: ['headerRow', 'firstDataRow', 'decimal', 'thousands', 'columns'],
  properties: {
    sheet: { type: 'string', maxLength: 100 },
    headerRow: row,
    unitsRow: row,
    firstDataRow: row,
    decimal: { enum: ['.', ','] },
    thousands: { enum: ['', ',', '.', ' '] },
    columns: {
      type: 'array',
      maxItems: 500,
      items: {
        type: 'object',
        additionalProperties: false,
        required: ['field'],
        properties: { field: { type: ['string', 'null'], maxLength: 60 }, unit: { type: 'string', maxLength: 30 } }
      }
    },
    constants: {
      type: 'object',
      maxProperties: 60,
      additionalProperties: {
        type: 'object',
        additionalProperties: false,
        required: ['value'],
        properties: { value: { type: ['string', 'number'], maxLength: 200 }, unit: { type: 'string', maxLength: 30 } }
      }
    }
  }
}
export const SAVE_MAPPING_BODY = {
  type: 'object',
  additionalProperties: false,
  required: ['name', 'headers', 'mapping'],
  properties: {
    name: { type: 'string', minLength: 1, maxLength: 80 },
    headers: { type: 'array', maxItems: 500, items: { type: ['string', 'number', 'null'] } },
    mapping: MAPPING_SCHEMA
  }
}

/** The mapping sent beside a file (multipart field "mapping", JSON), or undefined; 422 by field when it is malformed. */
export function mappingField (text: string | undefined): Mapping | undefined {
  if (text === undefined) return undefined
  let m: unknown
  try {
    m = JSON.parse(text)
  }
  catch {
    throw httpError(422, 'The mapping is not valid JSON', [{ path: '/mapping', message: 'not JSON' }])
  }
  const validate = compile<Mapping>(MAPPING_SCHEMA)
  if (!validate(m))
    throw httpError(
      422,
      'The mapping has problems',
      (validate.errors ?? []).map(e => ({ path: `/mapping${e.instancePath}`, message: e.message ?? 'invalid' }))
    )
  return m
}

const M = schema.columnMappings
export async function savedMappingFor (labId: number, signature: string) {
  const db = await useDb()
  const [m] = await db
    .select()
    .from(M)
    .where(and(eq(M.labId, labId), eq(M.signature, signature)))
    .orderBy(desc(M.updatedAt))
    .limit(1)
  return m ? { id: m.id, name: m.name, mapping: m.mapping as unknown as Mapping } : null
}
export async function listMappings (labId: number) {
  const db = await useDb()
  return (await db.select().from(M).where(eq(M.labId, labId)).orderBy(asc(M.name))).map(m => ({
    id: m.id,
    name: m.name,
    mapping: m.mapping,
    updatedAt: m.updatedAt
  }))
}
/** Saves (or replaces, by name) a lab's mapping for a header row. */
export async function saveMapping (labId: number, userId: string, name: string, signature: string, mapping: Mapping) {
  const db = await useDb()
  const [row] = await db
    .insert(M)
    .values({ labId, name, signature, mapping: mapping as unknown as Record<string, unknown>, createdBy: userId })
    .onConflictDoUpdate({
      target: [M.labId, M.name],
      set: { signature, mapping: mapping as unknown as Record<string, unknown>, updatedAt: new Date() }
    })
    .returning()
  return { id: row!.id, name: row!.name }
}
