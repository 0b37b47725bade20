import { requireRole } from '../../../utils/accounts/auth'
import { audit } from '../../../utils/storage/audit'
import { schema, useDb } from '../../../utils/storage/db'
import { httpError } from '../../../utils/http/errors'
import { readValidated } from '../../../utils/http/validation'
import { HEADER_SYNONYM_BODY } from '../../../utils/deposit/header-synonyms'
import { HEADER_SYNONYMS, normaliseHeader } from '../../../../shared/records/mapping'
import { COLUMN_BY_KEY } from '../../../../shared/records/columns'

defineRouteMeta({
  openAPI: {
    tags: ['deposit'],
    summary: 'Declare a spreadsheet header word to mean a field (curators, admins; audited): the mapping step proposes it',
    responses: { 201: { description: '{ id, alias, field }' }, 409: { description: 'The word is taken' } }
  }
})

export default defineEventHandler(async (event) => {
  const v = await requireRole(event, 'curator', 'admin')
  const b = await readValidated<{ alias: string, field: string }>(event, HEADER_SYNONYM_BODY)
  const alias = normaliseHeader(b.alias)
  if (!alias) throw httpError(422, 'The word has no letters or digits', [{ path: '/alias', message: 'is empty once normalised' }])
  if (!COLUMN_BY_KEY.has(b.field))
    throw httpError(422, `"${b.field}" is not a field of the open format`, [{ path: '/field', message: 'unknown field' }])
  if (COLUMN_BY_KEY.has(alias.replace(/ /g, '_')) || HEADER_SYNONYMS[alias])
    throw httpError(409, `"${alias}" is already understood`, [{ path: '/alias', message: 'is built in' }])
  const db = await useDb()
  const [row] = await db.insert(schema.headerSynonyms).values({ alias, field: b.field, createdBy: v.id }).onConflictDoNothing().returning()
  if (!row) throw httpError(409, `"${alias}" already means a field`, [{ path: '/alias', message: 'is taken' }])
  await audit(v.id, 'header-synonym.added', 'header_synonym', row.id, { alias, field: b.field })
  setResponseStatus(event, 201)
  return { id: row.id, alias, field: b.field }
})
