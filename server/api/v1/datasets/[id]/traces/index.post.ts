import { requireDraftForFile } from '../../../../../utils/deposit/drafts'
import { FileProblem } from '../../../../../utils/deposit/parse'
import { discardBody, readUploadedFile } from '../../../../../utils/http/body'
import { httpError } from '../../../../../utils/http/errors'
import { intParam } from '../../../../../utils/http/params'
import { coerceNumbers, queryValidated } from '../../../../../utils/http/validation'
import { MAX_TRACE_BYTES, parseTrace } from '../../../../../utils/traces/parse'
import { storeTrace, TRACE_META_QUERY, type TraceMeta } from '../../../../../utils/traces/traces'

defineRouteMeta({
  openAPI: {
    tags: ['traces'],
    summary:
      'Attach a decay trace to a draft: a CSV or XLSX file (multipart field "file") of time, signal and optionally σ, '
      + 'with ?timeUnit=&signal=[&wavelengthNm=]; kept with its sha256; every bad row named, nothing kept on a problem',
    responses: { 201: { description: '{ trace, existing }' }, 413: { description: 'Too large' }, 422: { description: 'Rows named' } }
  }
})

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const draft = await requireDraftForFile(event, id, MAX_TRACE_BYTES)
  let meta: TraceMeta
  try {
    meta = queryValidated<TraceMeta>(event, TRACE_META_QUERY, coerceNumbers(['wavelengthNm']))
  }
  catch (e) {
    await discardBody(event, MAX_TRACE_BYTES + 65536)
    throw e
  }
  const file = await readUploadedFile(event, MAX_TRACE_BYTES)
  let points
  try {
    points = await parseTrace(file.filename, file.type, file.data)
  }
  catch (e) {
    if (e instanceof FileProblem) throw httpError(e.status, e.message, e.issues)
    throw e
  }
  const out = await storeTrace(draft.viewer.id, id, draft.version.id, file, meta, points)
  setResponseStatus(event, out.existing ? 200 : 201)
  return out
})
