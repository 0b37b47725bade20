/**
 * Counting usage from HTTP requests (see events.ts for the rules). Events are queued in memory and written in
 * one multi-row INSERT per second (or per 500 events): one cheap write per event, off the request's path.
 * Reading counts flushes first.
 */
import { getHeader, type H3Event } from 'h3'
import { useDb } from '../storage/db'
import { clientAddress } from '../http/rate-limit'
import { getViewer } from '../accounts/auth'
import { usageEvent, writeEvents, type Requester, type UsageEvent, type UsageKind } from './events'

const queue: UsageEvent[] = []
let timer: ReturnType<typeof setTimeout> | undefined
let flushing: Promise<void> = Promise.resolve()

/** Writes what is queued (awaited by readers, and at shutdown). */
export function flushUsage (): Promise<void> {
  if (timer) clearTimeout(timer)
  timer = undefined
  const batch = queue.splice(0)
  flushing = flushing.then(async () => {
    if (batch.length) await writeEvents(await useDb(), batch)
  }).catch(() => {})
  return flushing
}

function enqueue (e: UsageEvent) {
  queue.push(e)
  if (queue.length >= 500) void flushUsage()
  else if (!timer) {
    timer = setTimeout(() => void flushUsage(), 1000)
    timer.unref()
  }
}

/** The requester of an HTTP request (after getViewer, which notes how the caller signed in). */
export function requesterOf (event: H3Event): Requester {
  const via = event.context.signedInVia as { tokenId?: number, sessionId?: string } | undefined
  return {
    userAgent: getHeader(event, 'user-agent') ?? '',
    tokenId: via?.tokenId,
    sessionId: via?.sessionId,
    address: via ? undefined : ((event.context.clientAddress as string | undefined) ?? clientAddress(event))
  }
}

/**
 * Counts one event of a published dataset for this request. Never throws and never delays the answer:
 * the salt look-up and the write happen after the handler returns.
 */
export function countUsage (event: H3Event, datasetId: number, kind: UsageKind, item: string): void {
  const at = new Date()
  getViewer(event)
    .catch(() => null)
    .then(() => Promise.all([useDb(), requesterOf(event)]))
    .then(([db, r]) => usageEvent(db, r, { datasetId, kind, item, at }))
    .then(e => e && enqueue(e))
    .catch(() => {})
}
