/** The origins a state-changing request may come from: the public base URL's, and the one the request was addressed to. */
import { getRequestURL, type H3Event } from 'h3'

let publicOrigin: string | undefined
export function allowedOrigins (event: H3Event): Set<string> {
  if (publicOrigin === undefined) {
    try {
      publicOrigin = new URL(useRuntimeConfig().public.baseUrl).origin
    }
    catch {
      publicOrigin = ''
    }
  }
  const own = getRequestURL(event, { xForwardedHost: false, xForwardedProto: false }).origin
  return new Set([publicOrigin, own].filter(Boolean))
}
