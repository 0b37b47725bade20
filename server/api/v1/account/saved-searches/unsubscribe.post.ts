import { getQuery } from 'h3'
import { unsubscribe, UNSUBSCRIBE_BODY } from '../../../../utils/alerts/saved-searches'
import { limitRate } from '../../../../utils/http/rate-limit'
import { readValidated } from '../../../../utils/http/validation'
import { httpError } from '../../../../utils/http/errors'

defineRouteMeta({
  openAPI: {
    tags: ['account'],
    summary:
      'Stop the mails of one saved search with the token its digest carries; no sign-in. The token is in the JSON body '
      + '({ token }), or in the query for RFC 8058 one-click unsubscribe (form body "List-Unsubscribe=One-Click")'
  }
})

export default defineEventHandler(async (event) => {
  limitRate(event, 'unsubscribe', 30, 60)
  const fromQuery = getQuery(event).token
  if (fromQuery !== undefined) {
    if (typeof fromQuery !== 'string' || fromQuery.length > 200)
      throw httpError(422, 'The token is not valid', [{ path: '/token', message: 'one token of at most 200 characters' }])
    return unsubscribe(fromQuery)
  }
  const { token } = await readValidated<{ token: string }>(event, UNSUBSCRIBE_BODY)
  return unsubscribe(token)
})
