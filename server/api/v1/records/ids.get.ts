import { getViewer } from '../../../utils/accounts/auth'
import { runSearch } from '../../../utils/search/search'
import { MAX_ID_ANSWER, recordSearchQuery } from '../../../utils/search/record-query'

defineRouteMeta({
  openAPI: {
    tags: ['records'],
    summary:
      'The ids of every record the same search finds (up to 5 000, in the order of its pages), to add them all to a '
      + 'comparison; takes the search\'s parameters (page and pageSize are ignored)'
  }
})

export default defineEventHandler(async (event) => {
  const query = recordSearchQuery(event)
  const viewer = await getViewer(event)
  const res = await runSearch({ ...query, page: 1, pageSize: MAX_ID_ANSWER }, viewer)
  return { total: res.total, ids: res.ids.map(h => h.id), truncated: res.total > MAX_ID_ANSWER }
})
