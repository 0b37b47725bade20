import { getViewer } from '../../../../utils/accounts/auth'
import { CITATION_FORMATS, type CitationFormat } from '../../../../utils/publishing/citation'
import { renderCitation } from '../../../../utils/publishing/citation-formats'
import { citableVersion } from '../../../../utils/publishing/dataset-view'
import { intParam } from '../../../../utils/http/params'
import { coerceNumbers, queryValidated } from '../../../../utils/http/validation'

defineRouteMeta({
  openAPI: {
    tags: ['archive'],
    summary: 'Citation of a published version as BibTeX, RIS, CSL-JSON, DataCite JSON or CITATION.cff',
    parameters: [
      { in: 'query', name: 'format', schema: { type: 'string', enum: [...CITATION_FORMATS] } },
      { in: 'query', name: 'version', schema: { type: 'integer' } }
    ]
  }
})

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const q = queryValidated<{ format: CitationFormat, version?: number }>(
    event,
    {
      type: 'object',
      required: ['format'],
      additionalProperties: false,
      properties: { format: { enum: [...CITATION_FORMATS] }, version: { type: 'integer', minimum: 1 } }
    },
    coerceNumbers(['version'])
  )
  const v = await citableVersion(await getViewer(event), id, q.version)
  const out = renderCitation(v, q.format)
  setHeader(event, 'content-type', out.type)
  setHeader(event, 'content-disposition', `inline; filename="crosspoint-${id}-v${v.versionNumber}.${out.ext}"`)
  return out.body
})
