/**
 * Who is asking: a signed-in session (JWT cookie) or a personal API token (Authorization: Bearer).
 * Guards return the viewer or throw 401/403; rows of other labs are hidden as 404 by the callers.
 */
import { and, eq, isNull } from 'drizzle-orm'
import { hash, verify } from '@node-rs/argon2'
import { recordFailure, slowAfterFailures } from '../http/rate-limit'
import { hashToken } from './secret-hash'
import { consumeOneTimeToken } from './one-time-tokens'
import { getHeader, type H3Event } from 'h3'
import { getToken } from '#auth'
import { sessionStands, type SessionClaims } from './sessions'
import { useDb, schema } from '../storage/db'
import { httpError, MESSAGES } from '../http/errors'
import type { Role } from '../../database/schema'

export interface Viewer {
  id: string
  name: string | null
  email: string
  role: Role
  labIds: number[]
}

/** E-mail addresses are compared in one form everywhere: trimmed, Unicode NFC, lower case. */
export function normalizeEmail (email: unknown): string {
  return String(email ?? '')
    .normalize('NFC')
    .trim()
    .toLowerCase()
}

/**
 * Checks a password against the stored argon2id hash; null when either is wrong or the address is
 * not verified yet. Repeated failures for one account are answered more and more slowly.
 */
export async function verifyPassword (email: string, password: string) {
  const key = normalizeEmail(email)
  await slowAfterFailures(key)
  const db = await useDb()
  const [u] = await db.select().from(schema.users).where(eq(schema.users.email, key))
  const ok = !!u?.passwordHash && !!u.emailVerified && (await verify(u.passwordHash, password).catch(() => false))
  recordFailure(key, ok)
  return ok ? u! : null
}

/** Signs in with the token of an e-mailed link (one use, short-lived). */
export async function signInWithLink (token: string) {
  const t = await consumeOneTimeToken(token, 'login')
  if (!t) return null
  const db = await useDb()
  const [u] = await db.select().from(schema.users).where(eq(schema.users.email, t.email))
  if (u && !u.emailVerified)
    await db.update(schema.users).set({ emailVerified: new Date() }).where(eq(schema.users.id, u.id))
  return u ?? null
}

/** argon2id with the library's defaults (m = 19 MiB, t = 2, p = 1). */
export function hashPassword (password: string): Promise<string> {
  return hash(password)
}

async function loadViewer (userId: string): Promise<Viewer | null> {
  const db = await useDb()
  const [u] = await db.select().from(schema.users).where(eq(schema.users.id, userId))
  if (!u) return null
  const labs = await db
    .select({ labId: schema.labMemberships.labId })
    .from(schema.labMemberships)
    .where(eq(schema.labMemberships.userId, u.id))
  return { id: u.id, name: u.name, email: u.email, role: u.role, labIds: labs.map(l => l.labId) }
}

/** The viewer, or null for a visitor. Cached on the event. */
export async function getViewer (event: H3Event): Promise<Viewer | null> {
  if (event.context.viewer !== undefined) return event.context.viewer as Viewer | null
  let viewer: Viewer | null = null
  const authz = getHeader(event, 'authorization')
  if (authz?.startsWith('Bearer ')) {
    const db = await useDb()
    const [t] = await db
      .select()
      .from(schema.apiTokens)
      .where(and(eq(schema.apiTokens.tokenHash, hashToken(authz.slice(7).trim())), isNull(schema.apiTokens.revokedAt)))
    if (!t) throw httpError(401, 'The API token is not valid or has been revoked')
    await db.update(schema.apiTokens).set({ lastUsedAt: new Date() }).where(eq(schema.apiTokens.id, t.id))
    viewer = await loadViewer(t.userId)
    event.context.signedInVia = { tokenId: t.id }
  }
  else {
    // the token itself (no session round trip), and only while the session stands
    const token = (await getToken({ event }).catch(() => null)) as SessionClaims | null
    if (token && typeof token.uid === 'string' && (await sessionStands(token))) {
      viewer = await loadViewer(token.uid)
      event.context.signedInVia = { sessionId: String(token.sid) }
    }
  }
  event.context.viewer = viewer
  return viewer
}

export async function requireUser (event: H3Event): Promise<Viewer> {
  const v = await getViewer(event)
  if (!v) throw httpError(401, MESSAGES.signInRequired)
  return v
}

/** The viewer must lead the lab (or be an admin). Another lab's id answers 404. */
export async function requireLabLead (event: H3Event, labId: number): Promise<Viewer> {
  const v = await requireUser(event)
  if (v.role === 'admin') return v
  const db = await useDb()
  const [m] = await db
    .select()
    .from(schema.labMemberships)
    .where(and(eq(schema.labMemberships.labId, labId), eq(schema.labMemberships.userId, v.id)))
  if (!m) throw httpError(404, MESSAGES.notFound)
  if (!m.isLead) throw httpError(403, 'Only the lab\'s lead (or an admin) can do this')
  return v
}

export async function requireRole (event: H3Event, ...roles: Role[]): Promise<Viewer> {
  const v = await requireUser(event)
  if (!roles.includes(v.role)) throw httpError(403, MESSAGES.forbidden)
  return v
}
