import type { H3Event } from 'h3'
import { checkFile } from '../../../../../utils/deposit/check'
import { ingestContext, recordValidator, requireDraftForFile } from '../../../../../utils/deposit/drafts'
import { storeOriginal } from '../../../../../utils/storage/originals'
import { FileProblem, MAX_FILE_BYTES } from '../../../../../utils/deposit/parse'
import { httpError } from '../../../../../utils/http/errors'
import { discardBody, readUploadedFile } from '../../../../../utils/http/body'
import { intParam } from '../../../../../utils/http/params'
import { mappingField } from '../../../../../utils/deposit/mappings'

defineRouteMeta({
  openAPI: {
    tags: ['deposit'],
    summary:
      'Step 1 of an upload: check a CSV, XLSX or JSON file (multipart field "file", optionally "mapping": how to read a sheet of '
      + 'your own, see /uploads/inspect) and keep it; nothing is added yet. An unknown header row answers 422 with a proposed mapping',
    responses: {
      200: { description: '{ upload, rowCount, acceptedCount, issues, warnings, preview }' },
      413: { description: 'File or row count too large' },
      422: { description: 'Problems with the file itself' }
    }
  }
})

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const { viewer, version } = await requireDraftForFile(event, id, MAX_FILE_BYTES)
  // at most MAX_CHECKS_AT_ONCE files are read and checked at once on this instance: memory stays bounded
  if (checksRunning >= MAX_CHECKS_AT_ONCE) {
    setHeader(event, 'retry-after', 5)
    await discardBody(event, MAX_FILE_BYTES + 65536)
    throw httpError(429, `The server is checking ${MAX_CHECKS_AT_ONCE} uploads already; try again in a few seconds`)
  }
  checksRunning++
  try {
    return await checkUpload(event, viewer.id, version.id)
  }
  finally {
    checksRunning--
  }
})

const MAX_CHECKS_AT_ONCE = 4
let checksRunning = 0

async function checkUpload (event: H3Event, viewerId: string, versionId: number) {
  const file = await readUploadedFile(event, MAX_FILE_BYTES)
  const buf = file.data
  try {
    const mapping = mappingField(file.fields.mapping)
    const res = await checkFile(file.filename, file.type, buf, recordValidator(), await ingestContext(), mapping)
    // Only a clean file is kept (for the commit step); a file with problems leaves no trace.
    // (with the mapping it was read with, as provenance)
    const stored = res.issueCount ? null : await storeOriginal(versionId, viewerId, file.filename, file.type, buf, mapping)
    return {
      upload: stored && { id: stored.id, name: stored.name, size: stored.size, sha256: stored.sha256 },
      kind: res.kind,
      rowCount: res.rowCount,
      acceptedCount: res.records.length,
      derivedCount: res.derivedCount,
      issueCount: res.issueCount,
      issues: res.issues,
      warningCount: res.warningCount,
      warnings: res.warnings,
      preview: res.records.slice(0, 2000).map(r => ({
        deltaG: r.drivingForce?.value ?? null,
        log10Rate: Math.log10(r.rate.value),
        donor: r.system.donor.name,
        acceptor: r.system.acceptor.name
      }))
    }
  }
  catch (e) {
    if (e instanceof FileProblem) {
      const err = httpError(e.status, e.message, e.issues)
      // an unknown header row: how the file could be read, for the mapping step
      if (e.proposal) (err.data as Record<string, unknown>).proposal = e.proposal
      throw err
    }
    throw e
  }
}
