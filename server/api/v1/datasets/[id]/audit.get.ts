import { requireUser } from '../../../../utils/accounts/auth'
import { getDataset } from '../../../../utils/publishing/archive'
import { httpError, MESSAGES } from '../../../../utils/http/errors'
import { intParam } from '../../../../utils/http/params'
import { datasetAudit } from '../../../../utils/storage/audit'

defineRouteMeta({
  openAPI: { tags: ['review'], summary: 'The audit trail of one dataset (its lab, curators and admins)' }
})

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const v = await requireUser(event)
  // the trail of a dataset the viewer may not see at all (another lab's draft, for a curator) is 404 like the dataset
  const { dataset } = await getDataset(v, id)
  if (!(v.role !== 'contributor' || v.labIds.includes(dataset.labId))) throw httpError(404, MESSAGES.notFound)
  return { items: await datasetAudit(id) }
})
