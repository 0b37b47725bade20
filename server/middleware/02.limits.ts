/**
 * Hostile input: bodies are capped (uploads have their own, larger limit in their route) and JSON
 * nesting is limited before any handler parses it.
 */
import { httpError } from '../utils/errors'

export const MAX_JSON_BYTES = 16 * 1024 * 1024
export const MAX_JSON_DEPTH = 32

function depthOf (text: string): number {
  let depth = 0; let max = 0; let inString = false
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i)
    if (inString) { if (c === 92) i++; else if (c === 34) inString = false; continue }
    if (c === 34) inString = true
    else if (c === 123 || c === 91) { if (++depth > max) max = depth }
    else if (c === 125 || c === 93) depth--
  }
  return max
}

export default defineEventHandler(async (event) => {
  if (!['POST', 'PUT', 'PATCH'].includes(event.method) || !event.path.startsWith('/api/v1/')) return
  const type = getHeader(event, 'content-type') ?? ''
  if (type.startsWith('multipart/')) return
  const declared = Number(getHeader(event, 'content-length') ?? 0)
  if (declared > MAX_JSON_BYTES) throw httpError(413, `Request bodies are limited to ${MAX_JSON_BYTES / 1048576} MB`, [{ path: '/', message: 'too large' }])
  const raw = await readRawBody(event, 'utf8').catch(() => undefined)
  if (raw && raw.length > MAX_JSON_BYTES) throw httpError(413, `Request bodies are limited to ${MAX_JSON_BYTES / 1048576} MB`, [{ path: '/', message: 'too large' }])
  if (raw && depthOf(raw) > MAX_JSON_DEPTH) throw httpError(413, `JSON nested deeper than ${MAX_JSON_DEPTH} levels is refused`, [{ path: '/', message: 'nested too deeply' }])
})
