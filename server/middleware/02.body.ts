/**
 * Every request body is bounded while it arrives: JSON for the API (16 MB, nested at most 32 deep),
 * small forms for sign-in, and the upload route's multipart body, which its handler streams through
 * busboy. The API takes JSON only (form-encoded and multipart bodies elsewhere are 415): a page on
 * another site can post a form, but not JSON, without a CORS preflight.
 */
import { httpError } from '../utils/http/errors'
import { MAX_AUTH_BYTES, MAX_JSON_BYTES, MAX_JSON_DEPTH, readCappedBody, jsonDepth, tooLarge } from '../utils/http/body'
import { MAX_FILE_BYTES } from '../utils/deposit/parse'

const UPLOAD_ROUTE = /^\/api\/v1\/datasets\/\d+\/(uploads\/check|uploads\/inspect|traces)\/?(\?|$)/
/** RFC 8058 one-click unsubscribe: the mail provider POSTs "List-Unsubscribe=One-Click" form-encoded. */
const UNSUBSCRIBE_ROUTE = /^\/api\/v1\/account\/saved-searches\/unsubscribe\/?(\?|$)/

export default defineEventHandler(async (event) => {
  if (!['POST', 'PUT', 'PATCH', 'DELETE'].includes(event.method)) return
  const path = event.path
  const type = (getHeader(event, 'content-type') ?? '').toLowerCase()
  if (UPLOAD_ROUTE.test(path)) {
    // the handler streams it; a declared length over the cap is refused before a byte is read
    if (Number(getHeader(event, 'content-length') ?? 0) > MAX_FILE_BYTES + 64 * 1024)
      tooLarge(event, MAX_FILE_BYTES, 'Uploaded files')
    return
  }
  if (path.startsWith('/api/auth/') || (UNSUBSCRIBE_ROUTE.test(path) && type.startsWith('application/x-www-form-urlencoded'))) {
    await readCappedBody(event, MAX_AUTH_BYTES)
    return
  }
  if (!path.startsWith('/api/')) {
    await readCappedBody(event, MAX_AUTH_BYTES)
    return
  }
  const hasBody
    = Number(getHeader(event, 'content-length') ?? 0) > 0
      || /\bchunked\b/i.test(getHeader(event, 'transfer-encoding') ?? '')
  if (hasBody && !type.startsWith('application/json') && !type.endsWith('+json')) {
    throw httpError(
      415,
      'The API takes JSON bodies (Content-Type: application/json); files go to the upload route as multipart/form-data',
      [{ path: '/', message: `unsupported content type "${type.slice(0, 80) || 'none'}"` }]
    )
  }
  const raw = await readCappedBody(event, MAX_JSON_BYTES)
  if (raw.length && jsonDepth(raw.toString('utf8')) > MAX_JSON_DEPTH)
    throw httpError(413, `JSON nested deeper than ${MAX_JSON_DEPTH} levels is refused`, [
      { path: '/', message: 'nested too deeply' }
    ])
})
