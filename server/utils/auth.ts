/**
 * Who is asking: a signed-in session (JWT cookie) or a personal API token (Authorization: Bearer).
 * Guards return the viewer or throw 401/403; rows of other labs are hidden as 404 by the callers.
 */
import { createHash } from 'node:crypto'
import { and, eq, isNull } from 'drizzle-orm'
import { verify } from '@node-rs/argon2'
import { getHeader, type H3Event } from 'h3'
import { getServerSession } from '#auth'
import { useDb, schema } from './db'
import { httpError, MESSAGES } from './errors'
import type { Role } from '../database/schema'

export interface Viewer {
  id: string
  name: string | null
  email: string
  role: Role
  labIds: number[]
}

export function hashToken (token: string): string {
  return createHash('sha256').update(token).digest('hex')
}

/** Checks a password against the stored argon2id hash; null when either is wrong. */
export async function verifyPassword (email: string, password: string) {
  const db = await useDb()
  const [u] = await db.select().from(schema.users).where(eq(schema.users.email, email.trim().toLowerCase()))
  if (!u?.passwordHash) return null
  const ok = await verify(u.passwordHash, password).catch(() => false)
  return ok ? u : null
}

async function loadViewer (userId: string): Promise<Viewer | null> {
  const db = await useDb()
  const [u] = await db.select().from(schema.users).where(eq(schema.users.id, userId))
  if (!u) return null
  const labs = await db.select({ labId: schema.labMemberships.labId }).from(schema.labMemberships).where(eq(schema.labMemberships.userId, u.id))
  return { id: u.id, name: u.name, email: u.email, role: u.role, labIds: labs.map(l => l.labId) }
}

/** The viewer, or null for a visitor. Cached on the event. */
export async function getViewer (event: H3Event): Promise<Viewer | null> {
  if (event.context.viewer !== undefined) return event.context.viewer as Viewer | null
  let viewer: Viewer | null = null
  const authz = getHeader(event, 'authorization')
  if (authz?.startsWith('Bearer ')) {
    const db = await useDb()
    const [t] = await db.select().from(schema.apiTokens)
      .where(and(eq(schema.apiTokens.tokenHash, hashToken(authz.slice(7).trim())), isNull(schema.apiTokens.revokedAt)))
    if (!t) throw httpError(401, 'The API token is not valid or has been revoked')
    await db.update(schema.apiTokens).set({ lastUsedAt: new Date() }).where(eq(schema.apiTokens.id, t.id))
    viewer = await loadViewer(t.userId)
  } else {
    const session = await getServerSession(event).catch(() => null) as { user?: { id?: string } } | null
    if (session?.user?.id) viewer = await loadViewer(session.user.id)
  }
  event.context.viewer = viewer
  return viewer
}

export async function requireUser (event: H3Event): Promise<Viewer> {
  const v = await getViewer(event)
  if (!v) throw httpError(401, MESSAGES.signInRequired)
  return v
}

export async function requireRole (event: H3Event, ...roles: Role[]): Promise<Viewer> {
  const v = await requireUser(event)
  if (!roles.includes(v.role)) throw httpError(403, MESSAGES.forbidden)
  return v
}
