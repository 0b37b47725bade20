/** Saved searches: what a person keeps, the one-purpose unsubscribe token, and the query as the index takes it. */
import { createHmac, timingSafeEqual } from 'node:crypto'
import { recordQuerySchema, RANGE_KEYS } from '../search/record-query'
import type { SearchQuery } from '../search/index-schema'
import { DEMO_AUTH_SECRET } from '../accounts/demo-secret'
import { and, asc, count, eq } from 'drizzle-orm'
import { schema, useDb } from '../storage/db'
import { httpError } from '../http/errors'
import { audit } from '../storage/audit'

export const MAX_SAVED_SEARCHES = 50
/** The parameters a saved search keeps: Explore's filters (no paging, sorting or id list). */
export const SAVED_QUERY_NAMES = ['q', 'process', 'solvent', 'technique', 'linkage', 'lab', ...RANGE_KEYS] as const
const props = recordQuerySchema.properties as Record<string, object>
export const SAVED_SEARCH_BODY = {
  type: 'object',
  additionalProperties: false,
  required: ['name', 'query'],
  properties: {
    name: {
      type: 'string', minLength: 1, maxLength: 80, pattern: '\\S', description: 'a name of your own, unique among your saved searches'
    },
    query: {
      type: 'object',
      additionalProperties: false,
      description: 'the search as Explore and GET /api/v1/records take it (filters only)',
      properties: Object.fromEntries(SAVED_QUERY_NAMES.map(k => [k, props[k]]))
    },
    alerts: { type: 'boolean', description: 'mail a digest of newly published matching records (default true)' }
  }
}
export const SAVED_SEARCH_PATCH = {
  type: 'object',
  additionalProperties: false,
  minProperties: 1,
  properties: { alerts: { type: 'boolean' }, name: SAVED_SEARCH_BODY.properties.name }
}
export const UNSUBSCRIBE_BODY = {
  type: 'object',
  additionalProperties: false,
  required: ['token'],
  properties: { token: { type: 'string', minLength: 3, maxLength: 200 } }
}

export type SavedQuery = Partial<Record<(typeof SAVED_QUERY_NAMES)[number], string | number>>

/** The saved filters as a search of the index (the visitor's view: published records only). */
export function toSearchQuery (q: SavedQuery, ids: number[]): SearchQuery {
  const { lab, ...rest } = q as Record<string, string | number>
  const out: Record<string, unknown> = { ...rest, ids, page: 1, pageSize: ids.length || 1 }
  if (lab !== undefined) out.labId = Number(lab)
  for (const k of RANGE_KEYS) if (out[k] !== undefined) out[k] = Number(out[k])
  return out as unknown as SearchQuery
}

/** The search in words, for mails and lists: "porphyrin"; solvent toluene; ΔG° from −1.2. */
export function queryInWords (q: SavedQuery): string {
  const parts = Object.entries(q).map(([k, v]) => (k === 'q' ? `"${String(v)}"` : `${k} ${String(v)}`))
  return parts.join('; ') || 'every published record'
}
/** The Explore link of a saved search. */
export function exploreQuery (q: SavedQuery): string {
  return new URLSearchParams(Object.entries(q).map(([k, v]) => [k, String(v)])).toString()
}

function secret (): string {
  try {
    return useRuntimeConfig().authSecret
  }
  catch {
    return process.env.NUXT_AUTH_SECRET ?? DEMO_AUTH_SECRET
  }
}
const PURPOSE = 'crosspoint:saved-search:unsubscribe'
function mac (id: number, userId: string): string {
  return createHmac('sha256', secret()).update(`${PURPOSE}\0${id}\0${userId}`).digest('base64url')
}
/** A token that does one thing — turn off this saved search's mails — and needs no sign-in. */
export function unsubscribeToken (id: number, userId: string): string {
  return `${id}.${mac(id, userId)}`
}
/** The saved search id a token names, or null; `userOf` gives the owner of an id (to check the signature). */
export async function checkUnsubscribeToken (token: string, userOf: (id: number) => Promise<string | undefined>): Promise<number | null> {
  const m = /^(\d{1,12})\.([\w-]{43})$/.exec(token)
  if (!m) return null
  const id = Number(m[1])
  const owner = await userOf(id)
  if (!owner) return null
  const want = Buffer.from(mac(id, owner))
  const got = Buffer.from(m[2]!)
  return want.length === got.length && timingSafeEqual(want, got) ? id : null
}

// ── the person's list ─────────────────────────────────────────────────────────────────────

const S = schema.savedSearches
const shape = (r: typeof S.$inferSelect) => ({
  id: r.id,
  name: r.name,
  query: r.query,
  alerts: r.alerts,
  checkedUntil: r.checkedUntil,
  lastDigestAt: r.lastDigestAt,
  createdAt: r.createdAt
})

const nameInUse = (name: string) =>
  httpError(409, `You have a saved search named "${name}" already`, [{ path: '/name', message: 'name in use' }])

export async function listSavedSearches (userId: string) {
  const db = await useDb()
  return (await db.select().from(S).where(eq(S.userId, userId)).orderBy(asc(S.name))).map(shape)
}

export async function createSavedSearch (userId: string, b: { name: string, query: SavedQuery, alerts?: boolean }) {
  const db = await useDb()
  const name = b.name.trim()
  const [{ n }] = (await db.select({ n: count() }).from(S).where(eq(S.userId, userId))) as [{ n: number }]
  if (n >= MAX_SAVED_SEARCHES)
    throw httpError(422, `You keep ${MAX_SAVED_SEARCHES} saved searches already; delete one first`, [
      { path: '/name', message: 'too many saved searches' }
    ])
  const [clash] = await db.select({ id: S.id }).from(S).where(and(eq(S.userId, userId), eq(S.name, name)))
  if (clash) throw nameInUse(name)
  const [row] = await db
    .insert(S)
    .values({ userId, name, query: b.query, alerts: b.alerts ?? true, checkedUntil: new Date() })
    .returning()
  return shape(row!)
}

async function mine (userId: string, id: number) {
  const db = await useDb()
  const [row] = await db.select().from(S).where(and(eq(S.id, id), eq(S.userId, userId)))
  if (!row) throw httpError(404, 'No such saved search of yours')
  return row
}

export async function updateSavedSearch (userId: string, id: number, b: { alerts?: boolean, name?: string }) {
  await mine(userId, id)
  const db = await useDb()
  const name = b.name?.trim()
  if (name) {
    const [clash] = await db.select({ id: S.id }).from(S).where(and(eq(S.userId, userId), eq(S.name, name)))
    if (clash && clash.id !== id) throw nameInUse(name)
  }
  // turning mails back on starts from now: no digest of everything missed while they were off
  const [row] = await db
    .update(S)
    .set({
      ...(name ? { name } : {}),
      ...(b.alerts !== undefined ? { alerts: b.alerts, ...(b.alerts ? { checkedUntil: new Date() } : {}) } : {}),
      updatedAt: new Date()
    })
    .where(eq(S.id, id))
    .returning()
  return shape(row!)
}

export async function deleteSavedSearch (userId: string, id: number) {
  await mine(userId, id)
  const db = await useDb()
  await db.delete(S).where(eq(S.id, id))
  return { deleted: id }
}

/** Turns off one saved search's mails by its token (no sign-in); idempotent. */
export async function unsubscribe (token: string) {
  const db = await useDb()
  const id = await checkUnsubscribeToken(token, async i => (await db.select({ u: S.userId }).from(S).where(eq(S.id, i)))[0]?.u)
  if (id === null)
    throw httpError(422, 'This unsubscribe link is not valid (or its saved search was deleted)', [
      { path: '/token', message: 'not a valid unsubscribe token' }
    ])
  const [row] = await db.update(S).set({ alerts: false, updatedAt: new Date() }).where(eq(S.id, id)).returning()
  await audit(row!.userId, 'saved-search.unsubscribed', 'saved_search', id)
  return { id, name: row!.name, alerts: false }
}
