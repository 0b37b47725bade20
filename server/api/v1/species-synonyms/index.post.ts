import { requireRole } from '../../../utils/accounts/auth'
import { audit } from '../../../utils/storage/audit'
import { schema, useDb } from '../../../utils/storage/db'
import { httpError } from '../../../utils/http/errors'
import { readValidated } from '../../../utils/http/validation'
import { forgetSystems, SYNONYM_BODY } from '../../../utils/systems/systems'
import { bareName, SPECIES_SYNONYMS } from '../../../../shared/records/systems'

defineRouteMeta({
  openAPI: {
    tags: ['systems'],
    summary: 'Declare two species names the same (curators, admins; audited): records naming either then share systems'
  }
})

export default defineEventHandler(async (event) => {
  const v = await requireRole(event, 'curator', 'admin')
  const b = await readValidated<{ alias: string, canonical: string }>(event, SYNONYM_BODY)
  const alias = bareName(b.alias)
  const canonical = bareName(b.canonical)
  if (!alias) throw httpError(422, 'The alias has no letters or digits', [{ path: '/alias', message: 'is empty once normalised' }])
  if (!canonical) throw httpError(422, 'The name has no letters or digits', [{ path: '/canonical', message: 'is empty once normalised' }])
  if (alias === canonical)
    throw httpError(422, 'Both names are already the same once normalised', [{ path: '/alias', message: `is "${canonical}" too` }])
  if (SPECIES_SYNONYMS[alias])
    throw httpError(409, `"${alias}" is a built-in synonym of "${SPECIES_SYNONYMS[alias]}"`, [{ path: '/alias', message: 'is built in' }])
  const db = await useDb()
  const [row] = await db.insert(schema.speciesSynonyms).values({ alias, canonical, createdBy: v.id }).onConflictDoNothing().returning()
  if (!row) throw httpError(409, `"${alias}" already has a synonym`, [{ path: '/alias', message: 'is taken' }])
  await audit(v.id, 'species-synonym.added', 'species_synonym', row.id, { alias, canonical })
  forgetSystems()
  setResponseStatus(event, 201)
  return { id: row.id, alias, canonical }
})
