/**
 * Cross-site request forgery: a request that changes anything must come from a page of this site.
 * Browsers send Origin on every cross-origin POST (and Sec-Fetch-Site on all modern ones); a value that
 * is not this site's public origin, nor the origin the request was addressed to, is refused with 403
 * before the body is read. Requests without either header come from scripts and tools (curl, API
 * tokens), which a forged page cannot be. The session cookie's SameSite=Lax alone does not stop a page
 * on another port of the same host: that is the same site.
 */
import { httpError } from '../utils/http/errors'
import { allowedOrigins } from '../utils/http/origin'

const SAFE = new Set(['GET', 'HEAD', 'OPTIONS'])

export default defineEventHandler((event) => {
  if (SAFE.has(event.method)) return
  const origin = getHeader(event, 'origin')
  const site = getHeader(event, 'sec-fetch-site')
  if (origin !== undefined) {
    if (!allowedOrigins(event).has(origin))
      throw httpError(403, 'Cross-site request refused: this action must come from a Crosspoint page', [
        { path: '/', message: `origin ${origin.slice(0, 100)} is not this site` }
      ])
  }
  else if (site !== undefined && site !== 'same-origin' && site !== 'none') {
    throw httpError(403, 'Cross-site request refused: this action must come from a Crosspoint page', [
      { path: '/', message: `sec-fetch-site ${site.slice(0, 40)}` }
    ])
  }
})
