import { getViewer } from '../../utils/accounts/auth'

defineRouteMeta({ openAPI: { tags: ['account'], summary: 'The caller: user, role and lab ids (null for a visitor)' } })

export default defineEventHandler(async event => ({ user: await getViewer(event) }))
