import { getViewer } from '../../../utils/accounts/auth'
import { pagedRecords } from '../../../utils/publishing/archive'
import { cachedSearch } from '../../../utils/search/search'
import { recordSearchQuery } from '../../../utils/search/record-query'

defineRouteMeta({
  openAPI: {
    tags: ['records'],
    summary:
      'Search records (published ones; signed-in members also find their lab\'s drafts): full text with prefix and '
      + 'typo tolerance, facet counts and value ranges, and a "did you mean" for unknown words'
  }
})

export default defineEventHandler(async (event) => {
  const query = recordSearchQuery(event)
  const viewer = await getViewer(event)
  return cachedSearch(query, viewer, async res => ({
    total: res.total,
    page: query.page,
    pageSize: query.pageSize,
    items: await pagedRecords(res.ids),
    ...(res.suggestion ? { didYouMean: res.suggestion } : {}),
    facets: res.facets,
    ranges: res.ranges
  }))
})
