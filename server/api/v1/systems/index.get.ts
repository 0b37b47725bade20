import { coerceNumbers, queryValidated } from '../../../utils/http/validation'
import { SYSTEM_LIST_QUERY } from '../../../utils/http/query-schemas'
import { allSystems } from '../../../utils/systems/systems'
import { bareName } from '../../../../shared/records/systems'

defineRouteMeta({
  openAPI: {
    tags: ['systems'],
    summary: 'Systems measured by several labs, with a random-effects consensus of log10 k and discrepancy flags',
    description:
      'A system is the same donor, acceptor, bridge, linkage, process and medium (solvent or matrix) at the same '
      + 'temperature within ±2 K. Species are the same when they give the same InChIKey, otherwise when their names '
      + 'agree after Unicode normalisation, lower case, removing spaces and punctuation (charge signs kept) and '
      + 'synonyms. Consensus: DerSimonian–Laird over the records (weights 1/(σ² + τ²), σ of log10 k from each record\'s '
      + 'uncertainty or, where it gives none, its dataset\'s median σ); a record is discrepant when its z against the '
      + 'consensus of the other labs (its own lab left out) exceeds 3 in size. Published records only.'
  }
})

export default defineEventHandler(async (event) => {
  const q = queryValidated<{
    minLabs?: number, q?: string, discrepant?: 'true' | 'false', ids?: string, page?: number, pageSize?: number
  }>(
    event,
    SYSTEM_LIST_QUERY,
    coerceNumbers(['minLabs', 'page', 'pageSize'])
  )
  const minLabs = q.minLabs ?? 2
  const words = (q.q ?? '').split(/\s+/).map(w => bareName(w)).filter(Boolean)
  const page = q.page ?? 1
  const pageSize = q.pageSize ?? 50
  const ids = q.ids ? new Set(q.ids.split(',').map(Number)) : null
  const hits = (await allSystems()).filter((s) => {
    if (s.labCount < minLabs) return false
    if (ids && !s.records.some(r => ids.has(r.id))) return false
    if (q.discrepant && String(s.discrepant) !== q.discrepant) return false
    const text = bareName([s.donor, s.acceptor, s.bridge, s.medium].join(' '))
    return words.every(w => text.includes(w))
  })
  return {
    total: hits.length,
    page,
    pageSize,
    items: hits.slice((page - 1) * pageSize, page * pageSize).map(({ records: _r, identity: _i, ...s }) => s)
  }
})
