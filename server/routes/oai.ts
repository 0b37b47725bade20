/**
 * The OAI-PMH 2.0 endpoint (GET with a query, or POST with an application/x-www-form-urlencoded body, §3.1.1). Every
 * answer is an OAI-PMH document with HTTP 200, errors included, as the protocol prescribes; a repeated argument is
 * badArgument.
 */
import { OaiError, oaiAnswer, oaiDocument } from '../utils/publishing/oai'

export default defineEventHandler(async (event) => {
  if (!['GET', 'HEAD', 'POST'].includes(event.method)) {
    setResponseHeader(event, 'allow', 'GET, HEAD, POST')
    throw createError({ statusCode: 405, statusMessage: 'Method Not Allowed' })
  }
  const raw = event.method === 'POST'
    ? String((await readRawBody(event, 'utf8')) ?? '')
    : (event.path.split('?')[1] ?? '')
  const params = new URLSearchParams(raw)
  const args: Record<string, string> = {}
  let repeated = ''
  for (const [k, v] of params) {
    if (k in args) repeated = k
    args[k] = v
  }
  let answer
  try {
    if (repeated) throw new OaiError('badArgument', `The argument ${repeated.slice(0, 40)} is given more than once`)
    answer = await oaiAnswer(args, useRuntimeConfig().oaiPageSize)
  }
  catch (e) {
    if (!(e instanceof OaiError)) throw e
    answer = e
  }
  setResponseHeader(event, 'content-type', 'text/xml; charset=utf-8')
  return oaiDocument(args, answer)
})
