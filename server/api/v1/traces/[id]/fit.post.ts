import { getViewer } from '../../../../utils/accounts/auth'
import { limitRate } from '../../../../utils/http/rate-limit'
import { DECAY_FITS_PER_MINUTE } from '../../../../utils/model/decay-schemas'
import { intParam } from '../../../../utils/http/params'
import { readValidated } from '../../../../utils/http/validation'
import { readTrace, traceSummary } from '../../../../utils/traces/traces'
import { fitTrace, TRACE_FIT_OPTIONS, type TraceFitOptions } from '../../../../utils/traces/trace-fit'

defineRouteMeta({
  openAPI: {
    tags: ['traces'],
    summary: 'Fit a stored decay trace (mono or bi-exponential; no, Gaussian or measured instrument response); nothing is written'
  }
})

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const options = await readValidated<TraceFitOptions>(event, TRACE_FIT_OPTIONS)
  limitRate(event, 'decay-fit', DECAY_FITS_PER_MINUTE, 60)
  const viewer = await getViewer(event)
  const t = await readTrace(viewer, id)
  const { result } = await fitTrace(viewer, t, options)
  return { trace: traceSummary(t), ...result }
})
