import { checkFile } from '../../../../../utils/deposit/check'
import { ingestContext, recordValidator, requireEditableDraft, storeOriginal } from '../../../../../utils/deposit/drafts'
import { FileProblem, MAX_FILE_BYTES } from '../../../../../utils/deposit/parse'
import { httpError } from '../../../../../utils/errors'
import { intParam } from '../../../../../utils/params'

defineRouteMeta({ openAPI: { tags: ['deposit'], summary: 'Step 1 of an upload: check a CSV, XLSX or JSON file (multipart field "file") and keep it; nothing is added yet', responses: { 200: { description: '{ upload, rowCount, acceptedCount, issues, warnings, preview }' }, 413: { description: 'File or row count too large' }, 422: { description: 'Problems with the file itself' } } } })

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const declared = Number(getHeader(event, 'content-length') ?? 0)
  if (declared > MAX_FILE_BYTES + 64 * 1024) throw httpError(413, `The file is larger than ${MAX_FILE_BYTES / 1024 / 1024} MB`, [{ path: '/file', message: 'too large' }])
  const { viewer, version } = await requireEditableDraft(event, id)
  const parts = await readMultipartFormData(event)
  const file = parts?.find(p => p.name === 'file' && p.filename)
  if (!file) throw httpError(422, 'Send the file as multipart form field "file"', [{ path: '/file', message: 'is required' }])
  if (file.data.byteLength > MAX_FILE_BYTES) throw httpError(413, `The file is larger than ${MAX_FILE_BYTES / 1024 / 1024} MB`, [{ path: '/file', message: 'too large' }])
  const buf = new Uint8Array(file.data)
  try {
    const res = await checkFile(file.filename!, file.type, buf, recordValidator(), await ingestContext())
    // Only a clean file is kept (for the commit step); a file with problems leaves no trace.
    const stored = res.issueCount ? null : await storeOriginal(version.id, viewer.id, file.filename!, file.type, buf)
    return {
      upload: stored && { id: stored.id, name: stored.name, size: stored.size, sha256: stored.sha256 },
      kind: res.kind, rowCount: res.rowCount, acceptedCount: res.records.length, derivedCount: res.derivedCount,
      issueCount: res.issueCount, issues: res.issues, warningCount: res.warningCount, warnings: res.warnings,
      preview: res.records.slice(0, 2000).map(r => ({ deltaG: r.drivingForce?.value ?? null, log10Rate: Math.log10(r.rate.value), donor: r.system.donor.name, acceptor: r.system.acceptor.name }))
    }
  } catch (e) {
    if (e instanceof FileProblem) throw httpError(e.status, e.message, e.issues)
    throw e
  }
})
