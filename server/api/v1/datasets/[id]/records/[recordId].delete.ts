import { deleteRecords, requireEditableDraft } from '../../../../../utils/deposit/drafts'
import { intParam } from '../../../../../utils/http/params'

defineRouteMeta({ openAPI: { tags: ['deposit'], summary: 'Delete one record of a draft' } })

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const recordId = intParam(event, 'recordId')
  const { version } = await requireEditableDraft(event, id)
  return { recordCount: await deleteRecords(version.id, [recordId]) }
})
