/** Sign-up, verification, links, resets and profile changes: the logic behind the account routes. */
import { randomBytes } from 'node:crypto'
import { consola } from 'consola'
import { and, eq, isNull } from 'drizzle-orm'
import { useDb, schema } from '../storage/db'
import { hashPassword, normalizeEmail } from './auth'
import { hashToken } from './secret-hash'
import { createOneTimeToken } from './one-time-tokens'
import { publicUrl, sendMail } from '../services/mail'
import { httpError } from '../http/errors'
import { endAllSessions } from './sessions'

export const emailSchema = { type: 'string', format: 'email', maxLength: 200 } as const
export const passwordSchema = { type: 'string', minLength: 10, maxLength: 200 } as const

export async function findUserByEmail (email: string) {
  const db = await useDb()
  const [u] = await db
    .select()
    .from(schema.users)
    .where(eq(schema.users.email, normalizeEmail(email)))
  return u
}

/**
 * Answers that must not tell whether an address has an account take the same time either way: the work
 * (hashing, mail) starts at once, and the answer goes out when the work is done or at this floor,
 * whichever is later, so a known and an unknown address look alike (the local mail path takes ~100 ms;
 * only a mail server slower than the floor would show).
 */
export const NEUTRAL_ANSWER_MS = 400
export async function neutralTiming (work: () => Promise<unknown>): Promise<void> {
  const floor = new Promise(resolve => setTimeout(resolve, NEUTRAL_ANSWER_MS))
  const done = work().catch((e) => {
    consola.error('[crosspoint] account mail:', (e as Error).message)
  })
  await Promise.all([floor, Promise.race([done, new Promise(resolve => setTimeout(resolve, NEUTRAL_ANSWER_MS))])])
}

/**
 * Sign-up answers alike for a new and a known address (no 409 that would tell accounts apart): a new one
 * gets its account and a confirmation link; the owner of a known one gets a note that someone tried.
 */
export async function signUp (name: string, email: string, password: string): Promise<void> {
  const key = normalizeEmail(email)
  await neutralTiming(async () => {
    const hashed = await hashPassword(password) // on both paths, so that they cost the same
    const existing = await findUserByEmail(key)
    if (existing) {
      await sendMail(
        key,
        'Someone tried to create a Crosspoint account with your address',
        `Someone (perhaps you) tried to create a Crosspoint account with this address, which already has one.\nIf it `
        + `was you, sign in or reset your password: ${publicUrl('/signin')}\nIf not, you can ignore this message; `
        + `nothing was changed.\n`
      )
      return
    }
    const db = await useDb()
    const [u] = await db
      .insert(schema.users)
      .values({ name: name.trim(), email: key, passwordHash: hashed, role: 'contributor' })
      .onConflictDoNothing()
      .returning()
    if (!u) return // created at the same moment by a parallel request
    const token = await createOneTimeToken('verify', key, 48 * 60)
    await sendMail(
      key,
      'Confirm your e-mail address for Crosspoint',
      `Hello ${name.trim()},\n\nConfirm your address to finish creating your Crosspoint `
      + `account:\n${publicUrl(`/verify?token=${token}`)}\n\nThe link works once, for 48 hours. If you did not sign `
      + `up, ignore this message.\n`
    )
  })
}

export async function markVerified (email: string) {
  const db = await useDb()
  await db
    .update(schema.users)
    .set({ emailVerified: new Date(), updatedAt: new Date() })
    .where(eq(schema.users.email, email))
}

export async function sendSignInLink (email: string): Promise<void> {
  await neutralTiming(async () => {
    const u = await findUserByEmail(email)
    if (!u) return
    const token = await createOneTimeToken('login', u.email, 15)
    await sendMail(
      u.email,
      'Your Crosspoint sign-in link',
      `Sign in to Crosspoint with this link (one use, 15 minutes):\n${publicUrl(`/signin/link?token=${token}`)}\n`
    )
  })
}

export async function sendPasswordReset (email: string): Promise<void> {
  await neutralTiming(async () => {
    const u = await findUserByEmail(email)
    if (!u) return
    const token = await createOneTimeToken('reset', u.email, 60)
    await sendMail(
      u.email,
      'Reset your Crosspoint password',
      `Choose a new password with this link (one use, 60 minutes; it replaces any earlier `
      + `link):\n${publicUrl(`/reset?token=${token}`)}\n\nIf you did not ask for this, ignore this message; your `
      + `password is unchanged.\n`
    )
  })
}

/**
 * A new password ends everything the old one opened: every session (the session version rises) and
 * every personal API token (revoked), since whoever knew the old password may have made either.
 */
export async function setPassword (email: string, password: string): Promise<{ tokens: number }> {
  const db = await useDb()
  const [u] = await db
    .update(schema.users)
    .set({ passwordHash: await hashPassword(password), emailVerified: new Date(), updatedAt: new Date() })
    .where(eq(schema.users.email, email))
    .returning({ id: schema.users.id })
  if (!u) return { tokens: 0 }
  await endAllSessions(u.id)
  const revoked = await db
    .update(schema.apiTokens)
    .set({ revokedAt: new Date() })
    .where(and(eq(schema.apiTokens.userId, u.id), isNull(schema.apiTokens.revokedAt)))
    .returning({ id: schema.apiTokens.id })
  return { tokens: revoked.length }
}

/** A new personal API token: the clear token is returned once; only its sha256 is stored. */
export async function createApiToken (userId: string, name: string) {
  const raw = `cpt_${randomBytes(24).toString('base64url')}`
  const db = await useDb()
  const [row] = await db
    .insert(schema.apiTokens)
    .values({ userId, name, tokenHash: hashToken(raw), prefix: raw.slice(0, 8) })
    .returning()
  return { id: row!.id, name: row!.name, prefix: row!.prefix, createdAt: row!.createdAt, token: raw }
}

export async function listApiTokens (userId: string) {
  const db = await useDb()
  return db
    .select({
      id: schema.apiTokens.id,
      name: schema.apiTokens.name,
      prefix: schema.apiTokens.prefix,
      createdAt: schema.apiTokens.createdAt,
      lastUsedAt: schema.apiTokens.lastUsedAt,
      revokedAt: schema.apiTokens.revokedAt
    })
    .from(schema.apiTokens)
    .where(eq(schema.apiTokens.userId, userId))
    .orderBy(schema.apiTokens.id)
}

export async function revokeApiToken (userId: string, id: number) {
  const db = await useDb()
  const rows = await db
    .update(schema.apiTokens)
    .set({ revokedAt: new Date() })
    .where(and(eq(schema.apiTokens.id, id), eq(schema.apiTokens.userId, userId), isNull(schema.apiTokens.revokedAt)))
    .returning({ id: schema.apiTokens.id })
  if (!rows.length) throw httpError(404, 'No such active token')
}
