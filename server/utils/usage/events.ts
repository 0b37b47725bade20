/**
 * Usage events (COUNTER Code of Practice for Research Data): who counts as which user-session, robots left out,
 * the daily salt, and the write. Free of the web layer so that tests and scripts can replay events.
 * - robots are excluded by user agent (the maintained `isbot` list; an empty user agent is taken as a script,
 *   common practice); a client with an API token is "machine" access, everything else "regular".
 * - user-session: the session id of a signed-in browser, the API token of a script, otherwise user agent +
 *   address + hour (the Code's fallback); always hashed with the day's salt, so no address is stored and no
 *   hash can be linked across days.
 */
import { createHash, randomBytes } from 'node:crypto'
import { isbot } from 'isbot'
import { eq, lt } from 'drizzle-orm'
import { schema, type Db } from '../storage/db'

export type UsageKind = 'investigation' | 'request'
export interface UsageEvent {
  datasetId: number
  kind: UsageKind
  item: string
  session: string
  machine: boolean
  at: Date
}
/** Who asked, as far as counting needs it (nothing of it is stored as such). */
export interface Requester {
  userAgent: string
  /** API token id, when the request carried one. */
  tokenId?: number
  /** Session id of a signed-in browser. */
  sessionId?: string
  /** Network address: only ever hashed, and only for visitors with neither token nor session. */
  address?: string
}

export function isRobot (userAgent: string): boolean {
  return !userAgent.trim() || isbot(userAgent)
}

/**
 * The user-session key before hashing, or null for a robot. `at` picks the hour for the visitor fallback.
 * A token is machine access whatever its user agent says.
 */
export function sessionOf (r: Requester, at: Date): { key: string, machine: boolean } | null {
  if (r.tokenId !== undefined) return { key: `token:${r.tokenId}`, machine: true }
  if (isRobot(r.userAgent)) return null
  if (r.sessionId) return { key: `session:${r.sessionId}`, machine: false }
  return { key: `visitor:${r.address ?? ''}|${r.userAgent}|${at.toISOString().slice(0, 13)}`, machine: false }
}

const salts = new Map<string, string>()
/** The day's salt, shared by every instance through the database; older salts are deleted. */
export async function saltOf (db: Db, day: string): Promise<string> {
  const known = salts.get(day)
  if (known) return known
  await db.insert(schema.usageSalts).values({ day, salt: randomBytes(32).toString('hex') }).onConflictDoNothing()
  const [row] = await db.select().from(schema.usageSalts).where(eq(schema.usageSalts.day, day))
  await db.delete(schema.usageSalts).where(lt(schema.usageSalts.day, day))
  salts.clear()
  salts.set(day, row!.salt)
  return row!.salt
}

export function hashSession (salt: string, key: string): string {
  return createHash('sha256').update(salt).update('\0').update(key).digest('base64url').slice(0, 22)
}

/** The event as stored, or null when it is not counted (a robot). */
export async function usageEvent (
  db: Db,
  r: Requester,
  e: { datasetId: number, kind: UsageKind, item: string, at?: Date }
): Promise<UsageEvent | null> {
  const at = e.at ?? new Date()
  const s = sessionOf(r, at)
  if (!s) return null
  const salt = await saltOf(db, at.toISOString().slice(0, 10))
  return { datasetId: e.datasetId, kind: e.kind, item: e.item, session: hashSession(salt, s.key), machine: s.machine, at }
}

/** Writes events in one statement (the flush path and tests). */
export async function writeEvents (db: Db, events: UsageEvent[]): Promise<void> {
  for (let i = 0; i < events.length; i += 500) await db.insert(schema.usageEvents).values(events.slice(i, i + 500))
}
