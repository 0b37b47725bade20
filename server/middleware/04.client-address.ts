/**
 * The caller's address, kept on the request's context (h3's getRequestIP reads `context.clientAddress` first).
 * A page rendered on the server calls the API through Nitro's local fetch, whose request has no socket; the
 * page request's context travels with it as `req.__unenv__`, so the inner call takes the page's caller.
 * Without this, every server-rendered API call would come from "" (usage sessions, request limits).
 */
import { clientAddress } from '../utils/http/rate-limit'

export default defineEventHandler((event) => {
  const outer = (event.node.req as { __unenv__?: { clientAddress?: unknown } }).__unenv__
  event.context.clientAddress ??= typeof outer?.clientAddress === 'string' ? outer.clientAddress : clientAddress(event)
})
