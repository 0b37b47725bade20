/**
 * Fixed-window request limits per key (client address + what is being tried), per instance.
 * In-process on purpose: limits only need to be approximate, and each instance of a scaled-out
 * deployment limiting on its own still bounds abuse. Answers 429 with Retry-After.
 */
import { getRequestIP, setHeader, type H3Event } from 'h3'
import { LRUCache } from 'lru-cache'
import { httpError } from './errors'

/**
 * Both tables are keyed by what a client sends (an e-mail address, say), so a client that sends a
 * new key with every request must not make them grow without end: lru-cache bounds the entries
 * (least recently used go first) and drops each one when its window is over, without timers.
 */
const MAX_KEYS = 100_000
const windows = new LRUCache<string, { start: number, count: number }>({ max: MAX_KEYS, ttl: 3600e3 })

/**
 * The address limits are counted against. X-Forwarded-For is any client's to write, so it counts
 * only when the instance is told it sits behind a proxy that sets it (runtimeConfig.trustProxy);
 * otherwise rotating that header would undo every limit.
 */
export function clientAddress (event: H3Event): string {
  return getRequestIP(event, { xForwardedFor: Boolean(useRuntimeConfig(event).trustProxy) }) ?? 'unknown'
}

/** Counts one attempt under `key`; throws 429 once more than `limit` fall in `windowSeconds`. */
export function limitRate (event: H3Event, key: string, limit: number, windowSeconds: number): void {
  const now = Date.now()
  const full = `${key}|${clientAddress(event)}`
  let w = windows.get(full)
  if (!w || now - w.start > windowSeconds * 1000) {
    w = { start: now, count: 0 }
    windows.set(full, w, { ttl: windowSeconds * 1000 })
  }
  w.count++
  if (w.count > limit) {
    const retry = Math.max(1, Math.ceil((w.start + windowSeconds * 1000 - now) / 1000))
    setHeader(event, 'Retry-After', retry)
    throw httpError(429, `Too many attempts; try again in ${retry} s`)
  }
}

const FAILURE_MEMORY_MS = 15 * 60e3
const failures = new LRUCache<string, { count: number, last: number }>({ max: MAX_KEYS, ttl: FAILURE_MEMORY_MS })
/** Progressive delay after wrong passwords for one account: 0, 0, 250 ms, 500 ms … up to 4 s. */
export async function slowAfterFailures (email: string): Promise<void> {
  const f = failures.get(email)
  if (!f || Date.now() - f.last > FAILURE_MEMORY_MS) return
  const delay = f.count < 2 ? 0 : Math.min(4000, 250 * 2 ** (f.count - 2))
  if (delay) await new Promise(r => setTimeout(r, delay))
}
export function recordFailure (email: string, ok: boolean): void {
  if (ok) {
    failures.delete(email)
    return
  }
  const f = failures.get(email)
  failures.set(email, { count: (f && Date.now() - f.last < FAILURE_MEMORY_MS ? f.count : 0) + 1, last: Date.now() })
}

/** How many keys each table holds now (for tests and the health of a long-running instance). */
export function rateLimitSizes (): { windows: number, failures: number, max: number } {
  return { windows: windows.size, failures: failures.size, max: MAX_KEYS }
}
