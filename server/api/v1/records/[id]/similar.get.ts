import { getViewer } from '../../../../utils/accounts/auth'
import { getRecord, pagedRecords } from '../../../../utils/publishing/archive'
import { httpError } from '../../../../utils/http/errors'
import { intParam } from '../../../../utils/http/params'
import { similarTo } from '../../../../utils/search/search'
import { coerceNumbers, queryValidated } from '../../../../utils/http/validation'

defineRouteMeta({
  openAPI: {
    tags: ['records'],
    summary:
      'Records of similar systems, with the score and why (closeness in ΔG°, solvent polarity, distance, temperature, '
      + 'process, linkage, and donor/acceptor structures by Morgan-fingerprint Tanimoto, or names where structures '
      + 'are missing)',
    parameters: [{ in: 'query', name: 'limit', schema: { type: 'integer', maximum: 100 } }]
  }
})

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const { limit } = queryValidated<{ limit?: number }>(
    event,
    {
      type: 'object',
      additionalProperties: false,
      properties: { limit: { type: 'integer', minimum: 1, maximum: 100 } }
    },
    coerceNumbers(['limit'])
  )
  const viewer = await getViewer(event)
  await getRecord(viewer, id) // 404 unless the viewer may see it
  const hits = await similarTo(id, viewer, limit ?? 10)
  if (!hits) throw httpError(404, 'This record is not in the search index (it belongs to an older version)')
  const rows = await pagedRecords(hits.map(h => ({ id: h.id, score: h.score })))
  return { items: rows.map((record, i) => ({ record, score: Number(hits[i]!.score.toFixed(4)), why: hits[i]!.why })) }
})
