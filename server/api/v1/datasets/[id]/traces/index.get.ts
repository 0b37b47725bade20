import { getViewer } from '../../../../../utils/accounts/auth'
import { intParam } from '../../../../../utils/http/params'
import { listTraces } from '../../../../../utils/traces/traces'

defineRouteMeta({ openAPI: { tags: ['traces'], summary: 'The decay traces attached to a dataset (without their points)' } })

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  return { items: await listTraces(await getViewer(event), id) }
})
