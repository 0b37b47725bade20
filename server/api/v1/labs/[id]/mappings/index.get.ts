import { requireUser } from '../../../../../utils/accounts/auth'
import { listMappings } from '../../../../../utils/deposit/mappings'
import { httpError, MESSAGES } from '../../../../../utils/http/errors'
import { intParam } from '../../../../../utils/http/params'

defineRouteMeta({ openAPI: { tags: ['deposit'], summary: 'The column mappings a lab has saved for its spreadsheets (its members)' } })

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const v = await requireUser(event)
  if (!v.labIds.includes(id)) throw httpError(404, MESSAGES.notFound)
  return { items: await listMappings(id) }
})
