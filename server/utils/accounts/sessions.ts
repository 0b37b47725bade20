/**
 * Sessions that end when people expect them to. Each session token carries its own id (sid) and the
 * user's session version at sign-in (sv). Signing out records the sid as ended; "sign out everywhere",
 * a password reset and a role change raise the user's version, which ends every older session. Both are
 * checked on every request (getViewer) and whenever the browser asks for its session.
 */
import { randomUUID } from 'node:crypto'
import { eq, lt, sql } from 'drizzle-orm'
import { useDb, schema } from '../storage/db'

export const SESSION_MAX_AGE_S = 7 * 24 * 3600

export interface SessionClaims {
  [claim: string]: unknown
  uid?: unknown
  sid?: unknown
  sv?: unknown
  exp?: unknown
}

export function newSessionId (): string {
  return randomUUID()
}

/** Whether a decoded session token still stands: its sid not ended, its version the user's current one. */
export async function sessionStands (t: SessionClaims | null | undefined): Promise<boolean> {
  if (!t || typeof t.uid !== 'string' || typeof t.sid !== 'string' || typeof t.sv !== 'number') return false
  const db = await useDb()
  const [u] = await db.select({ sv: schema.users.sessionVersion }).from(schema.users).where(eq(schema.users.id, t.uid))
  if (!u || u.sv !== t.sv) return false
  const [r] = await db
    .select({ sid: schema.revokedSessions.sid })
    .from(schema.revokedSessions)
    .where(eq(schema.revokedSessions.sid, t.sid))
  return !r
}

/** Ends one session (sign-out); old entries are dropped once their session would have expired anyway. */
export async function endSession (t: SessionClaims | null | undefined): Promise<void> {
  if (!t || typeof t.sid !== 'string') return
  const db = await useDb()
  const exp = typeof t.exp === 'number' ? t.exp * 1000 : Date.now() + SESSION_MAX_AGE_S * 1000
  await db
    .insert(schema.revokedSessions)
    .values({ sid: t.sid, expiresAt: new Date(exp) })
    .onConflictDoNothing()
  await db.delete(schema.revokedSessions).where(lt(schema.revokedSessions.expiresAt, new Date()))
}

/** Ends every session of a user (sign out everywhere, password reset, role change). */
export async function endAllSessions (userId: string): Promise<void> {
  const db = await useDb()
  await db
    .update(schema.users)
    .set({ sessionVersion: sql`${schema.users.sessionVersion} + 1`, updatedAt: new Date() })
    .where(eq(schema.users.id, userId))
}

export async function sessionVersionOf (userId: string): Promise<number> {
  const db = await useDb()
  const [u] = await db.select({ sv: schema.users.sessionVersion }).from(schema.users).where(eq(schema.users.id, userId))
  return u?.sv ?? 0
}
