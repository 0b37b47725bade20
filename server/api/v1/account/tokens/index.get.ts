import { listApiTokens } from '../../../../utils/accounts/accounts'
import { requireUser } from '../../../../utils/accounts/auth'

defineRouteMeta({ openAPI: { tags: ['account'], summary: 'The caller\'s API tokens (never the tokens themselves)' } })

export default defineEventHandler(async event => ({ items: await listApiTokens((await requireUser(event)).id) }))
