import { and, eq, isNull } from 'drizzle-orm'
import { checkFile } from '../../../../../../utils/deposit/check'
import type { Mapping } from '../../../../../../../shared/records/mapping'
import { ingestContext, recordValidator, requireEditableDraft, writeRecords } from '../../../../../../utils/deposit/drafts'
import { readOriginal } from '../../../../../../utils/storage/originals'
import { useDb, schema } from '../../../../../../utils/storage/db'
import { httpError } from '../../../../../../utils/http/errors'
import { intParam } from '../../../../../../utils/http/params'
import { readValidated } from '../../../../../../utils/http/validation'
import { countOf } from '../../../../../../../shared/vocabulary'

defineRouteMeta({
  openAPI: {
    tags: ['deposit'],
    summary:
      'Step 2 of an upload: add every checked row in one transaction (refused while any row has a problem); once per '
      + 'upload, a second commit is 409',
    responses: {
      200: { description: '{ added, recordCount }' },
      404: { description: 'No such upload for this draft' },
      409: { description: 'Already committed' },
      422: { description: 'The file has problems' }
    }
  }
})

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const uploadId = intParam(event, 'uploadId')
  const { version } = await requireEditableDraft(event, id)
  const { mode } = await readValidated<{ mode: 'append' | 'replace' }>(event, {
    type: 'object',
    required: ['mode'],
    additionalProperties: false,
    properties: { mode: { enum: ['append', 'replace'] } }
  })
  const db = await useDb()
  const [file] = await db
    .select()
    .from(schema.uploadedFiles)
    .where(and(eq(schema.uploadedFiles.id, uploadId), eq(schema.uploadedFiles.versionId, version.id)))
  if (!file) throw httpError(404, 'No such upload for this draft')
  if (file.committedAt) throw alreadyCommitted(file.committedAt)
  // The stored original is checked again, so what is committed is exactly what the file says now.
  const res = await checkFile(
    file.name,
    file.mediaType ?? undefined,
    await readOriginal(file.storageKey),
    recordValidator(),
    await ingestContext(),
    // read as it was checked: with the mapping kept beside the original
    (file.mapping ?? undefined) as Mapping | undefined
  )
  if (res.issueCount)
    throw httpError(
      422,
      `The file has ${countOf(res.issueCount, 'problem')}; fix them and upload again. Nothing was added.`,
      res.issues
    )
  // claimed in the rows' own transaction: of two commits at once, one adds the rows and the other is refused
  const total = await writeRecords(version.id, res.records, mode, async (tx) => {
    const claimed = await tx
      .update(schema.uploadedFiles)
      .set({ committedAt: new Date() })
      .where(and(eq(schema.uploadedFiles.id, file.id), isNull(schema.uploadedFiles.committedAt)))
      .returning({ id: schema.uploadedFiles.id })
    if (!claimed.length) throw alreadyCommitted(new Date())
  })
  return { added: res.records.length, recordCount: total }
})

function alreadyCommitted (at: Date) {
  return httpError(
    409,
    `This upload was already added to the draft (${at.toISOString()}); nothing was added again. Reload the draft to see its records.`,
    [{ path: '/uploadId', message: 'already committed' }]
  )
}
