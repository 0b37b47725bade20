import { getViewer } from '../../../../utils/accounts/auth'
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
  const viewer = await getViewer(event)
  const t = await readTrace(viewer, id)
  const { result } = await fitTrace(viewer, t, options)
  return { trace: traceSummary(t), ...result }
})
