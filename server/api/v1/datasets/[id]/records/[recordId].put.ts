import { checkRecords } from '../../../../../utils/deposit/check'
import {
  ingestContext,
  recordValidator,
  replaceRecord,
  requireEditableDraft
} from '../../../../../utils/deposit/drafts'
import { httpError } from '../../../../../utils/http/errors'
import { intParam } from '../../../../../utils/http/params'
import { readValidated } from '../../../../../utils/http/validation'

defineRouteMeta({ openAPI: { tags: ['deposit'], summary: 'Replace one record of a draft' } })

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const recordId = intParam(event, 'recordId')
  const { version } = await requireEditableDraft(event, id)
  const { record } = await readValidated<{ record: unknown }>(event, {
    type: 'object',
    required: ['record'],
    additionalProperties: false,
    properties: { record: { type: 'object' } }
  })
  const res = await checkRecords([record], recordValidator(), await ingestContext(), '/record')
  if (res.issueCount)
    throw httpError(
      422,
      'The record has problems; it was not changed',
      res.issues.map(i => ({ ...i, path: i.path.replace(/^\/record\/0/, '/record') }))
    )
  await replaceRecord(version.id, recordId, res.records[0]!)
  return { id: recordId, warnings: res.warnings }
})
