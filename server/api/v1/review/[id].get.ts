import { intParam } from '../../../utils/http/params'
import { requireCurator, reviewView } from '../../../utils/review'

defineRouteMeta({
  openAPI: {
    tags: ['review'],
    summary:
      'A submission as the curator sees it: records, validation report, diff against the previous published version, '
      + 'changes since a return, review history'
  }
})

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  return reviewView(await requireCurator(event), id)
})
