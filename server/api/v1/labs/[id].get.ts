import { getViewer } from '../../../utils/auth'
import { getLabOr404, labMembers } from '../../../utils/labs'
import { intParam } from '../../../utils/params'

defineRouteMeta({ openAPI: { tags: ['labs'], summary: 'A lab; its members are listed to the lab and to admins' } })

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const lab = await getLabOr404(id)
  const v = await getViewer(event)
  const members = v && (v.role === 'admin' || v.labIds.includes(id)) ? await labMembers(id) : null
  return { ...lab, members }
})
