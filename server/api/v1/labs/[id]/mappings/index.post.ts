import { requireUser } from '../../../../../utils/accounts/auth'
import { SAVE_MAPPING_BODY, saveMapping } from '../../../../../utils/deposit/mappings'
import { httpError, MESSAGES } from '../../../../../utils/http/errors'
import { intParam } from '../../../../../utils/http/params'
import { readValidated } from '../../../../../utils/http/validation'
import { headerSignature, type Mapping } from '../../../../../../shared/records/mapping'

defineRouteMeta({
  openAPI: {
    tags: ['deposit'],
    summary: 'Save a column mapping under a name for the lab; the next file with the same header row is read with it',
    responses: { 201: { description: '{ id, name }' } }
  }
})

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const v = await requireUser(event)
  if (!v.labIds.includes(id)) throw httpError(404, MESSAGES.notFound)
  const b = await readValidated<{ name: string, headers: (string | number | null)[], mapping: Mapping }>(event, SAVE_MAPPING_BODY)
  setResponseStatus(event, 201)
  return saveMapping(id, v.id, b.name.trim(), headerSignature(b.headers), b.mapping)
})
