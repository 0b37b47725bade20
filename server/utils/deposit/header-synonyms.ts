/** Header words curators maintain (normalised alias → field), added to the built-in ones when a sheet is read. */
import { asc } from 'drizzle-orm'
import { schema, useDb } from '../storage/db'

export const HEADER_SYNONYM_BODY = {
  type: 'object',
  additionalProperties: false,
  required: ['alias', 'field'],
  properties: {
    alias: { type: 'string', minLength: 1, maxLength: 80, description: 'a header word as labs write it, without its unit' },
    field: { type: 'string', minLength: 1, maxLength: 60, description: 'the field of the open format it means' }
  }
}

export async function headerSynonyms () {
  const db = await useDb()
  return db.select().from(schema.headerSynonyms).orderBy(asc(schema.headerSynonyms.alias))
}

/** The solvent table's names (lower case), for proposing a column of solvent names. */
export async function solventNames (): Promise<Set<string>> {
  const db = await useDb()
  return new Set((await db.select({ name: schema.solvents.name }).from(schema.solvents)).map(s => s.name.toLowerCase()))
}

/** The curators' words as the mapping step takes them. */
export async function extraHeaderWords (): Promise<Record<string, string>> {
  return Object.fromEntries((await headerSynonyms()).map(s => [s.alias, s.field]))
}
