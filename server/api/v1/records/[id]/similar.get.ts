import { getViewer } from '../../../../utils/accounts/auth'
import { getRecord, pagedRecords } from '../../../../utils/publishing/archive'
import { httpError } from '../../../../utils/http/errors'
import { intParam } from '../../../../utils/http/params'
import { similarTo } from '../../../../utils/search/search'
import { coerceNumbers, queryValidated } from '../../../../utils/http/validation'
import { SIMILAR_QUERY } from '../../../../utils/http/query-schemas'

defineRouteMeta({
  openAPI: {
    tags: ['records'],
    summary:
      'Records of similar systems, with the score and why (closeness in ΔG°, solvent polarity, distance, temperature, '
      + 'process, linkage, and donor/acceptor structures by Morgan-fingerprint Tanimoto, or names where structures '
      + 'are missing)'
  }
})

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const { limit } = queryValidated<{ limit?: number }>(
    event,
    SIMILAR_QUERY,
    coerceNumbers(['limit'])
  )
  const viewer = await getViewer(event)
  await getRecord(viewer, id) // 404 unless the viewer may see it
  const hits = await similarTo(id, viewer, limit ?? 10)
  if (!hits) throw httpError(404, 'This record is not in the search index (it belongs to an older version)')
  const rows = await pagedRecords(hits.map(h => ({ id: h.id, score: h.score })))
  return { items: rows.map((record, i) => ({ record, score: Number(hits[i]!.score.toFixed(4)), why: hits[i]!.why })) }
})
