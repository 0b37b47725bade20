/** Answering a download: size and concurrency limits, then the bag streamed as the answer. */
import { PassThrough } from 'node:stream'
import { sendStream, setHeaders, type H3Event } from 'h3'
import { httpError } from '../http/errors'
import { clientAddress } from '../http/rate-limit'
import { type Selection, countSelection } from './selection'
import { countUsage } from '../usage/counter'
import { writeBundle } from './bundle'

export const MAX_BUNDLE_RECORDS = 200_000
const running = new Map<string, number>()
export const MAX_CONCURRENT_BUNDLES = 2
/** Bundles at once on this instance, whoever asks (each holds a database connection for its read snapshot). */
export const MAX_BUNDLES_PER_INSTANCE = 8
let runningTotal = 0

/** Streams the bag as the answer; at most two bundles at once per client, and a disconnect stops the work. */
export async function sendBundle (event: H3Event, sel: Selection, filename: string) {
  const { n, publishedDatasets } = await countSelection(sel)
  if (n === 0) throw httpError(404, 'Nothing to bundle: the selection holds no record you may download')
  if (n > MAX_BUNDLE_RECORDS)
    throw httpError(
      413,
      `The selection holds ${n} records; a bundle takes at most ${MAX_BUNDLE_RECORDS}. Narrow the query.`,
      [{ path: '/query', message: 'too many records' }]
    )
  const who = clientAddress(event)
  if ((running.get(who) ?? 0) >= MAX_CONCURRENT_BUNDLES) {
    setHeaders(event, { 'retry-after': 5 })
    throw httpError(429, `At most ${MAX_CONCURRENT_BUNDLES} bundles at once per client; wait for one to finish`)
  }
  if (runningTotal >= MAX_BUNDLES_PER_INSTANCE) {
    setHeaders(event, { 'retry-after': 5 })
    throw httpError(503, `The server is making ${MAX_BUNDLES_PER_INSTANCE} bundles already; try again in a few seconds`)
  }
  running.set(who, (running.get(who) ?? 0) + 1)
  runningTotal++
  const controller = new AbortController()
  const out = new PassThrough()
  let finished = false
  const release = () => {
    if (finished) return
    finished = true
    const left = (running.get(who) ?? 1) - 1
    if (left > 0) running.set(who, left)
    else running.delete(who)
  }
  event.node.req.on('close', () => {
    if (!event.node.res.writableFinished) controller.abort()
    release()
  })
  event.node.res.on('finish', release)
  setHeaders(event, {
    'content-type': 'application/zip',
    'content-disposition': `attachment; filename="${filename}"`,
    'x-crosspoint-records': String(n)
  })
  // COUNTER: a request of every published dataset the bundle draws on
  for (const id of publishedDatasets) countUsage(event, id, 'request', 'bundle')
  // the instance-wide slot is freed when the work has really stopped (its snapshot closed), not at disconnect
  writeBundle(sel, out, controller.signal, filename.replace(/\.zip$/, ''))
    .catch((e) => {
      out.destroy(e as Error)
    })
    .finally(() => {
      release()
      runningTotal--
    })
  return sendStream(event, out)
}
