import { getViewer } from '../../../utils/accounts/auth'
import { intParam } from '../../../utils/http/params'
import { readTrace, traceSummary } from '../../../utils/traces/traces'

defineRouteMeta({
  openAPI: {
    tags: ['traces'],
    summary: 'One decay trace with its points: data.times (in its unit), data.signal, data.sigma when given'
  }
})

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const t = await readTrace(await getViewer(event), id)
  return { ...traceSummary(t), data: t.points }
})
