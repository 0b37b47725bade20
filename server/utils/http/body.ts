/**
 * Request bodies read under a byte cap while the bytes arrive (never buffered whole first), and the
 * upload route's multipart body parsed as a stream by busboy with caps on bytes, files and parts.
 */
import type { IncomingMessage } from 'node:http'
import Busboy from 'busboy'
import type { H3Event } from 'h3'
import { httpError } from './errors'

export const MAX_JSON_BYTES = 16 * 1024 * 1024
export const MAX_JSON_DEPTH = 32
/** Sign-in, sign-out and the other auth forms are small. */
export const MAX_AUTH_BYTES = 64 * 1024
/** h3 looks here first for a body already read (h3 1.x, Symbol.for so it is the same symbol). */
const RAW_BODY = Symbol.for('h3RawBody')

/**
 * Ends the connection after the error answer: Node discards (never keeps) what the client still sends,
 * and a client still sending two seconds after the answer went out is cut off.
 */
function closeAfterAnswer (event: H3Event): void {
  const req = event.node.req
  req.resume()
  event.node.res.once('finish', () => {
    setTimeout(() => {
      if (!req.complete) req.destroy()
    }, 2000).unref()
  })
}

export function tooLarge (event: H3Event, limit: number, what = 'Request bodies'): never {
  closeAfterAnswer(event)
  throw httpError(413, `${what} are limited to ${limit >= 1048576 ? `${limit / 1048576} MB` : `${limit / 1024} kB`}`, [
    { path: '/', message: 'too large' }
  ])
}

/**
 * Reads the body, counting bytes as they come: past `limit` the read stops at once (413) and nothing more
 * is kept, whether or not the client declared a length (chunked bodies included). The buffer is handed to
 * h3 so that readBody/readRawBody in handlers use it.
 */
export async function readCappedBody (event: H3Event, limit: number): Promise<Buffer> {
  const req = event.node.req as IncomingMessage & { [RAW_BODY]?: Promise<Buffer> }
  const declared = Number(req.headers['content-length'] ?? 0)
  if (declared > limit) tooLarge(event, limit)
  const buf = await new Promise<Buffer>((resolve, reject) => {
    const chunks: Buffer[] = []
    let size = 0
    const onData = (c: Buffer) => {
      size += c.length
      if (size > limit) {
        req.off('data', onData)
        chunks.length = 0
        reject(Object.assign(new Error('too large'), { tooLarge: true }))
        return
      }
      chunks.push(c)
    }
    req.on('data', onData)
    req.once('end', () => resolve(Buffer.concat(chunks, size)))
    req.once('error', reject)
    req.once('aborted', () => reject(new Error('aborted')))
  }).catch((e: Error & { tooLarge?: boolean }) => {
    if (e.tooLarge) tooLarge(event, limit)
    throw httpError(400, 'The request body could not be read')
  })
  req[RAW_BODY] = Promise.resolve(buf)
  return buf
}

/** Deepest nesting of a JSON text (strings skipped), in one pass. */
export function jsonDepth (text: string): number {
  let depth = 0
  let max = 0
  let inString = false
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i)
    if (inString) {
      if (c === 92) i++
      else if (c === 34) inString = false
      continue
    }
    if (c === 34) inString = true
    else if (c === 123 || c === 91) {
      if (++depth > max) max = depth
    }
    else if (c === 125 || c === 93) depth--
  }
  return max
}

export interface UploadedFile {
  filename: string
  type: string
  data: Uint8Array
  /** Small text fields sent beside the file (e.g. "mapping"), at most 64 kB each. */
  fields: Record<string, string>
}

/**
 * The one file of a multipart upload (field "file"), streamed through busboy: at most one file of
 * `maxBytes`, a few small fields, a bounded number of parts; past any cap the read stops with 413.
 */
export async function readUploadedFile (event: H3Event, maxBytes: number): Promise<UploadedFile> {
  const req = event.node.req
  const type = req.headers['content-type'] ?? ''
  if (!type.toLowerCase().startsWith('multipart/form-data'))
    throw httpError(415, 'Send the file as multipart/form-data with the field "file"', [
      { path: '/file', message: 'not multipart/form-data' }
    ])
  let bb: Busboy.Busboy
  try {
    bb = Busboy({
      headers: req.headers,
      preservePath: true,
      limits: { fileSize: maxBytes, files: 1, fields: 8, parts: 10, fieldSize: 64 * 1024, headerPairs: 20 }
    })
  }
  catch {
    throw httpError(400, 'The multipart body is malformed', [{ path: '/file', message: 'bad multipart header' }])
  }
  const result = await new Promise<UploadedFile | 'too-large' | 'too-many' | null>((resolve, reject) => {
    let file: UploadedFile | null = null
    let settled = false
    const done = (v: UploadedFile | 'too-large' | 'too-many' | null) => {
      if (!settled) {
        settled = true
        resolve(v)
      }
    }
    const fields: Record<string, string> = {}
    bb.on('field', (name, value, info) => {
      if (info.valueTruncated) {
        req.unpipe(bb)
        done('too-large')
      }
      else fields[name] = value
    })
    bb.on('file', (name, stream, info) => {
      if (name !== 'file') {
        stream.resume()
        return
      }
      const chunks: Buffer[] = []
      let size = 0
      stream.on('data', (c: Buffer) => {
        size += c.length
        chunks.push(c)
      })
      stream.on('limit', () => {
        chunks.length = 0
        req.unpipe(bb)
        done('too-large')
      })
      stream.on('end', () => {
        if (!settled)
          file = {
            filename: info.filename ?? 'upload',
            type: info.mimeType ?? '',
            data: new Uint8Array(Buffer.concat(chunks, size)),
            fields
          }
      })
    })
    bb.on('filesLimit', () => {
      req.unpipe(bb)
      done('too-many')
    })
    bb.on('partsLimit', () => {
      req.unpipe(bb)
      done('too-many')
    })
    bb.on('fieldsLimit', () => {
      req.unpipe(bb)
      done('too-many')
    })
    bb.on('close', () => done(file))
    bb.on('error', (e: Error) => {
      if (!settled) {
        settled = true
        reject(e)
      }
    })
    req.on('aborted', () => done(null))
    req.pipe(bb)
  }).catch(() => {
    throw httpError(400, 'The multipart body is malformed', [{ path: '/file', message: 'malformed multipart body' }])
  })
  if (result === 'too-large') tooLarge(event, maxBytes, 'Uploaded files')
  if (result === 'too-many') {
    closeAfterAnswer(event)
    throw httpError(413, 'Send one file (field "file") and nothing else', [
      { path: '/file', message: 'too many parts' }
    ])
  }
  if (!result || !result.filename)
    throw httpError(422, 'Send the file as multipart form field "file"', [{ path: '/file', message: 'is required' }])
  return result
}

/**
 * Reads and throws away what is left of a request body (bounded by `limit` bytes and a few seconds) so that
 * an early answer (401, 404, 429) reaches a client that is still sending instead of a reset connection.
 */
export async function discardBody (event: H3Event, limit: number): Promise<void> {
  const req = event.node.req
  if (req.complete) return
  await new Promise<void>((resolve) => {
    let size = 0
    const timer = setTimeout(() => resolve(), 5000)
    const stop = () => {
      clearTimeout(timer)
      resolve()
    }
    req.on('data', (c: Buffer) => {
      size += c.length
      if (size > limit) {
        req.destroy()
        stop()
      }
    })
    req.once('end', stop)
    req.once('error', stop)
    req.once('close', stop)
    req.resume()
  })
}
