/** Sign-up, verification, links, resets and profile changes: the logic behind the account routes. */
import { randomBytes } from 'node:crypto'
import { and, eq, isNull } from 'drizzle-orm'
import { useDb, schema } from './db'
import { hashPassword, hashToken } from './auth'
import { createOneTimeToken } from './one-time-tokens'
import { publicUrl, sendMail } from './mail'
import { httpError } from './errors'

export const emailSchema = { type: 'string', format: 'email', maxLength: 200 } as const
export const passwordSchema = { type: 'string', minLength: 10, maxLength: 200 } as const

export async function findUserByEmail (email: string) {
  const db = await useDb()
  const [u] = await db.select().from(schema.users).where(eq(schema.users.email, email.trim().toLowerCase()))
  return u
}

export async function signUp (name: string, email: string, password: string) {
  const key = email.trim().toLowerCase()
  if (await findUserByEmail(key)) throw httpError(409, 'An account with this e-mail address exists; sign in or reset the password', [{ path: '/email', message: 'is already registered' }])
  const db = await useDb()
  const [u] = await db.insert(schema.users).values({ name: name.trim(), email: key, passwordHash: await hashPassword(password), role: 'contributor' }).returning()
  const token = await createOneTimeToken('verify', key, 48 * 60)
  await sendMail(key, 'Confirm your e-mail address for Crosspoint',
    `Hello ${name.trim()},\n\nConfirm your address to finish creating your Crosspoint account:\n${publicUrl(`/verify?token=${token}`)}\n\nThe link works once, for 48 hours. If you did not sign up, ignore this message.\n`)
  return u!
}

export async function markVerified (email: string) {
  const db = await useDb()
  await db.update(schema.users).set({ emailVerified: new Date(), updatedAt: new Date() }).where(eq(schema.users.email, email))
}

export async function sendSignInLink (email: string) {
  const u = await findUserByEmail(email)
  if (!u) return
  const token = await createOneTimeToken('login', u.email, 15)
  await sendMail(u.email, 'Your Crosspoint sign-in link', `Sign in to Crosspoint with this link (one use, 15 minutes):\n${publicUrl(`/signin/link?token=${token}`)}\n`)
}

export async function sendPasswordReset (email: string) {
  const u = await findUserByEmail(email)
  if (!u) return
  const token = await createOneTimeToken('reset', u.email, 60)
  await sendMail(u.email, 'Reset your Crosspoint password', `Choose a new password with this link (one use, 60 minutes):\n${publicUrl(`/reset?token=${token}`)}\n\nIf you did not ask for this, ignore this message; your password is unchanged.\n`)
}

export async function setPassword (email: string, password: string) {
  const db = await useDb()
  await db.update(schema.users).set({ passwordHash: await hashPassword(password), emailVerified: new Date(), updatedAt: new Date() }).where(eq(schema.users.email, email))
}

/** A new personal API token: the clear token is returned once; only its sha256 is stored. */
export async function createApiToken (userId: string, name: string) {
  const raw = `cpt_${randomBytes(24).toString('base64url')}`
  const db = await useDb()
  const [row] = await db.insert(schema.apiTokens).values({ userId, name, tokenHash: hashToken(raw), prefix: raw.slice(0, 8) }).returning()
  return { id: row!.id, name: row!.name, prefix: row!.prefix, createdAt: row!.createdAt, token: raw }
}

export async function listApiTokens (userId: string) {
  const db = await useDb()
  return db.select({ id: schema.apiTokens.id, name: schema.apiTokens.name, prefix: schema.apiTokens.prefix, createdAt: schema.apiTokens.createdAt, lastUsedAt: schema.apiTokens.lastUsedAt, revokedAt: schema.apiTokens.revokedAt })
    .from(schema.apiTokens).where(eq(schema.apiTokens.userId, userId)).orderBy(schema.apiTokens.id)
}

export async function revokeApiToken (userId: string, id: number) {
  const db = await useDb()
  const rows = await db.update(schema.apiTokens).set({ revokedAt: new Date() })
    .where(and(eq(schema.apiTokens.id, id), eq(schema.apiTokens.userId, userId), isNull(schema.apiTokens.revokedAt))).returning({ id: schema.apiTokens.id })
  if (!rows.length) throw httpError(404, 'No such active token')
}
