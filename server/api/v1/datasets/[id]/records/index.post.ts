import { checkRecords } from '../../../../../utils/deposit/check'
import { ingestContext, recordValidator, requireEditableDraft, writeRecords } from '../../../../../utils/deposit/drafts'
import { httpError } from '../../../../../utils/http/errors'
import { intParam } from '../../../../../utils/http/params'
import { readValidated } from '../../../../../utils/http/validation'
import { countOf } from '../../../../../../shared/vocabulary'

defineRouteMeta({
  openAPI: {
    tags: ['deposit'],
    summary: 'Add records in the open format (rate-record.v1) to a draft: all or none',
    requestBody: {
      content: { 'application/json': { schema: { type: 'object', properties: { records: { type: 'array' } } } } }
    }
  }
})

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const { version } = await requireEditableDraft(event, id)
  const { records } = await readValidated<{ records: unknown[] }>(event, {
    type: 'object',
    required: ['records'],
    additionalProperties: false,
    properties: { records: { type: 'array', minItems: 1, maxItems: 10000 } }
  })
  const res = await checkRecords(records, recordValidator(), await ingestContext(), '/records')
  if (res.issueCount) throw httpError(422, `${countOf(res.issueCount, 'problem')} in the records; nothing was added`, res.issues)
  const total = await writeRecords(version.id, res.records, 'append')
  setResponseStatus(event, 201)
  return { added: res.records.length, recordCount: total, warnings: res.warnings }
})
