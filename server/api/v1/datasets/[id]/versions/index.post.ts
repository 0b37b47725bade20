import { requireUser } from '../../../../../utils/accounts/auth'
import { intParam } from '../../../../../utils/http/params'
import { newVersion } from '../../../../../utils/review'

defineRouteMeta({
  openAPI: {
    tags: ['deposit'],
    summary: 'Start a new version (a correction) from the newest published one; it goes through review again'
  }
})

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const v = await requireUser(event)
  setResponseStatus(event, 201)
  return newVersion(v, id)
})
