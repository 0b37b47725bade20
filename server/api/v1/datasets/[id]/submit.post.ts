import { requireEditableDraft } from '../../../../utils/deposit/drafts'
import { submitDraft } from '../../../../utils/deposit/metadata'
import { intParam } from '../../../../utils/http/params'

defineRouteMeta({
  openAPI: {
    tags: ['deposit'],
    summary:
      'Submit a draft (or a returned version) for review; refused with every problem listed while anything does not validate'
  }
})

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const { viewer, version } = await requireEditableDraft(event, id)
  return submitDraft(viewer, version)
})
