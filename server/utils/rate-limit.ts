/**
 * Fixed-window request limits per key (client address + what is being tried), per instance.
 * In-process on purpose: limits only need to be approximate, and each instance of a scaled-out
 * deployment limiting on its own still bounds abuse. Answers 429 with Retry-After.
 */
import { getRequestIP, setHeader, type H3Event } from 'h3'
import { httpError } from './errors'

const windows = new Map<string, { start: number, count: number }>()

export function clientAddress (event: H3Event): string {
  return getRequestIP(event, { xForwardedFor: true }) ?? 'unknown'
}

/** Counts one attempt under `key`; throws 429 once more than `limit` fall in `windowSeconds`. */
export function limitRate (event: H3Event, key: string, limit: number, windowSeconds: number): void {
  const now = Date.now()
  const full = `${key}|${clientAddress(event)}`
  let w = windows.get(full)
  if (!w || now - w.start > windowSeconds * 1000) { w = { start: now, count: 0 }; windows.set(full, w) }
  w.count++
  if (windows.size > 50_000) for (const [k, v] of windows) if (now - v.start > 3600e3) windows.delete(k)
  if (w.count > limit) {
    const retry = Math.max(1, Math.ceil((w.start + windowSeconds * 1000 - now) / 1000))
    setHeader(event, 'Retry-After', String(retry))
    throw httpError(429, `Too many attempts; try again in ${retry} s`)
  }
}

const failures = new Map<string, { count: number, last: number }>()
/** Progressive delay after wrong passwords for one account: 0, 0, 250 ms, 500 ms … up to 4 s. */
export async function slowAfterFailures (email: string): Promise<void> {
  const f = failures.get(email)
  if (!f || Date.now() - f.last > 15 * 60e3) return
  const delay = f.count < 2 ? 0 : Math.min(4000, 250 * 2 ** (f.count - 2))
  if (delay) await new Promise(r => setTimeout(r, delay))
}
export function recordFailure (email: string, ok: boolean): void {
  if (ok) { failures.delete(email); return }
  const f = failures.get(email)
  failures.set(email, { count: (f && Date.now() - f.last < 15 * 60e3 ? f.count : 0) + 1, last: Date.now() })
  if (failures.size > 50_000) for (const [k, v] of failures) if (Date.now() - v.last > 15 * 60e3) failures.delete(k)
}
