/**
 * One-time tokens for e-mail verification, sign-in links, password resets and lab invitations,
 * kept (hashed) in the verificationToken table; consuming one deletes it.
 */
import { randomBytes } from 'node:crypto'
import { and, eq, gt, inArray } from 'drizzle-orm'
import { useDb, schema } from '../storage/db'
import { hashToken } from './secret-hash'

export type TokenPurpose = 'verify' | 'login' | 'reset' | `invite:${number}`

/** Purposes that sign someone in or change their password: one outstanding link of these per address. */
const ACCOUNT_ACCESS: TokenPurpose[] = ['login', 'reset']

export async function createOneTimeToken (purpose: TokenPurpose, email: string, ttlMinutes: number): Promise<string> {
  const raw = randomBytes(24).toString('base64url')
  const db = await useDb()
  // a new reset link replaces the older ones of the same address (and a new sign-in link the older sign-in links)
  if (ACCOUNT_ACCESS.includes(purpose))
    await db.delete(schema.verificationTokens).where(eq(schema.verificationTokens.identifier, `${purpose}|${email}`))
  await db
    .insert(schema.verificationTokens)
    .values({
      identifier: `${purpose}|${email}`,
      token: hashToken(raw),
      expires: new Date(Date.now() + ttlMinutes * 60e3)
    })
  return raw
}

/** The e-mail the token was issued for (and its purpose), or null when unknown or expired. */
export async function consumeOneTimeToken (
  raw: string,
  purposePrefix: string,
  accept: (t: { email: string, purpose: string }) => void = () => {}
): Promise<{ email: string, purpose: string } | null> {
  if (!raw || raw.length > 200) return null
  const db = await useDb()
  const [row] = await db
    .select()
    .from(schema.verificationTokens)
    .where(and(eq(schema.verificationTokens.token, hashToken(raw)), gt(schema.verificationTokens.expires, new Date())))
  if (!row || !row.identifier.startsWith(purposePrefix)) return null
  const i = row.identifier.indexOf('|')
  const t = { purpose: row.identifier.slice(0, i), email: row.identifier.slice(i + 1) }
  accept(t) // may throw: the token then stays usable for the right person
  const gone = await db
    .delete(schema.verificationTokens)
    .where(eq(schema.verificationTokens.token, row.token))
    .returning()
  if (!gone.length) return null // a concurrent use of the same token gets nothing
  // using a sign-in or reset link ends every other outstanding sign-in and reset link of that address
  if (ACCOUNT_ACCESS.includes(t.purpose as TokenPurpose)) {
    await db.delete(schema.verificationTokens).where(
      inArray(
        schema.verificationTokens.identifier,
        ACCOUNT_ACCESS.map(p => `${p}|${t.email}`)
      )
    )
  }
  return t
}
