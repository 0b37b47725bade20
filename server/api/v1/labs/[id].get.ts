import { getViewer } from '../../../utils/accounts/auth'
import { getLabOr404, labMembers } from '../../../utils/accounts/labs'
import { intParam } from '../../../utils/http/params'

defineRouteMeta({ openAPI: { tags: ['labs'], summary: 'A lab; its members are listed to the lab and to admins' } })

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const lab = await getLabOr404(id)
  const v = await getViewer(event)
  const members = v && (v.role === 'admin' || v.labIds.includes(id)) ? await labMembers(id) : null
  return { ...lab, members }
})
