import { requireEditableDraft } from '../../../../../../utils/deposit/drafts'
import { intParam } from '../../../../../../utils/http/params'
import { limitRate } from '../../../../../../utils/http/rate-limit'
import { DECAY_FITS_PER_MINUTE } from '../../../../../../utils/model/decay-schemas'
import { readValidated } from '../../../../../../utils/http/validation'
import { RATE_FROM_TRACE_BODY, rateFromTrace } from '../../../../../../utils/traces/trace-fit'

defineRouteMeta({
  openAPI: {
    tags: ['traces'],
    summary:
      'Take a draft record\'s rate from an attached trace: fit it, set k = 1/τ (or k_ET = 1/τ − 1/τ_ref with a reference trace) '
      + 'with its propagated standard error, and keep the trace hash, model, parameters and errors as the record\'s provenance'
  }
})

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const recordId = intParam(event, 'recordId')
  const { viewer, version } = await requireEditableDraft(event, id)
  limitRate(event, 'decay-fit', DECAY_FITS_PER_MINUTE, 60)
  const body = await readValidated<Parameters<typeof rateFromTrace>[4]>(event, RATE_FROM_TRACE_BODY)
  return rateFromTrace(viewer, id, version.id, recordId, body)
})
