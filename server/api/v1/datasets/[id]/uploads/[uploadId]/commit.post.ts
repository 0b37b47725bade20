import { and, eq } from 'drizzle-orm'
import { checkFile } from '../../../../../../utils/deposit/check'
import { ingestContext, readOriginal, recordValidator, requireEditableDraft, writeRecords } from '../../../../../../utils/deposit/drafts'
import { useDb, schema } from '../../../../../../utils/db'
import { httpError } from '../../../../../../utils/errors'
import { intParam } from '../../../../../../utils/params'
import { readValidated } from '../../../../../../utils/validation'

defineRouteMeta({ openAPI: { tags: ['deposit'], summary: 'Step 2 of an upload: add every checked row in one transaction (refused while any row has a problem)' } })

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const uploadId = intParam(event, 'uploadId')
  const { mode } = await readValidated<{ mode: 'append' | 'replace' }>(event, { type: 'object', required: ['mode'], additionalProperties: false, properties: { mode: { enum: ['append', 'replace'] } } })
  const { version } = await requireEditableDraft(event, id)
  const db = await useDb()
  const [file] = await db.select().from(schema.uploadedFiles).where(and(eq(schema.uploadedFiles.id, uploadId), eq(schema.uploadedFiles.versionId, version.id)))
  if (!file) throw httpError(404, 'No such upload for this draft')
  // The stored original is checked again, so what is committed is exactly what the file says now.
  const res = await checkFile(file.name, file.mediaType ?? undefined, await readOriginal(file.storageKey), recordValidator(), await ingestContext())
  if (res.issueCount) throw httpError(422, `The file has ${res.issueCount} problem(s); fix them and upload again. Nothing was added.`, res.issues)
  const total = await writeRecords(version.id, res.records, mode)
  return { added: res.records.length, recordCount: total }
})
