import { deleteRecords, requireEditableDraft } from '../../../../../utils/deposit/drafts'
import { intParam } from '../../../../../utils/http/params'
import { readValidated } from '../../../../../utils/http/validation'

defineRouteMeta({ openAPI: { tags: ['deposit'], summary: 'Delete several records of a draft at once (all or none)' } })

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const { version } = await requireEditableDraft(event, id)
  const { ids } = await readValidated<{ ids: number[] }>(event, {
    type: 'object',
    required: ['ids'],
    additionalProperties: false,
    properties: {
      ids: { type: 'array', minItems: 1, maxItems: 100000, uniqueItems: true, items: { type: 'integer', minimum: 1 } }
    }
  })
  return { recordCount: await deleteRecords(version.id, ids) }
})
