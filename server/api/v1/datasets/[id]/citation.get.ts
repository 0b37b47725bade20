import { getViewer } from '../../../../utils/accounts/auth'
import type { CitationFormat } from '../../../../utils/publishing/citation'
import { renderCitation } from '../../../../utils/publishing/citation-formats'
import { citableVersion } from '../../../../utils/publishing/dataset-view'
import { intParam } from '../../../../utils/http/params'
import { coerceNumbers, queryValidated } from '../../../../utils/http/validation'
import { CITATION_QUERY } from '../../../../utils/http/query-schemas'
import { countUsage } from '../../../../utils/usage/counter'

defineRouteMeta({
  openAPI: {
    tags: ['archive'],
    summary: 'Citation of a published version as BibTeX, RIS, CSL-JSON, DataCite JSON or CITATION.cff'
  }
})

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const q = queryValidated<{ format: CitationFormat, version?: number }>(
    event,
    CITATION_QUERY,
    coerceNumbers(['version'])
  )
  const v = await citableVersion(await getViewer(event), id, q.version)
  const out = renderCitation(v, q.format)
  if (!v.withdrawnAt) countUsage(event, id, 'investigation', `citation:${q.format}`)
  setHeader(event, 'content-type', out.type)
  setHeader(event, 'content-disposition', `inline; filename="crosspoint-${id}-v${v.versionNumber}.${out.ext}"`)
  return out.body
})
