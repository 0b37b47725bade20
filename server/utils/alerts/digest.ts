/**
 * The saved-search digest job: for each saved search with mails on, the records that became public since it was
 * last checked (published, or out of embargo) and that its query finds are mailed as one digest. Run by the
 * in-process schedule (plugins/40.usage-alerts.ts), by `npm run alerts`, and by an admin from the app.
 * Several instances may run it at once: a search is claimed by moving its checked_until from the value read
 * (compare-and-set), so each digest is sent once.
 */
import { and, eq, gt, gte, inArray, isNotNull, lte, or } from 'drizzle-orm'
import { schema, useDb } from '../storage/db'
import { publicUrl, sendMail } from '../services/mail'
import { syncFromDatabase, useSearch } from '../search/search'
import { countOf } from '../../../shared/vocabulary'
import { exploreQuery, queryInWords, toSearchQuery, unsubscribeToken, type SavedQuery } from './saved-searches'

/** Records listed in one mail; the rest are behind the Explore link. */
export const DIGEST_LIMIT = 50
const ID_CHUNK = 5000

/** When each newly visible version became public: its publication, or the end of its embargo. */
async function newlyPublic (since: Date, now: Date): Promise<Map<number, Date>> {
  const db = await useDb()
  const v = schema.datasetVersions
  const sinceDay = since.toISOString().slice(0, 10)
  const rows = await db
    .select({ id: v.id, publishedAt: v.publishedAt, embargo: v.embargoUntil })
    .from(v)
    .where(and(eq(v.state, 'published'), isNotNull(v.publishedAt), or(gt(v.publishedAt, since), gte(v.embargoUntil, sinceDay))))
  const out = new Map<number, Date>()
  for (const r of rows) {
    const embargoEnd = r.embargo ? new Date(`${r.embargo}T00:00:00Z`) : null
    const at = embargoEnd && embargoEnd > r.publishedAt! ? embargoEnd : r.publishedAt!
    if (at > since && at <= now) out.set(r.id, at)
  }
  return out
}

function fmt (x: number, digits = 3): string {
  return Number(x.toPrecision(digits)).toString()
}

async function digestLines (ids: number[]): Promise<string[]> {
  const db = await useDb()
  const r = schema.rateRecords
  const v = schema.datasetVersions
  const rows = await db
    .select({
      id: r.id,
      donor: r.donorName,
      acceptor: r.acceptorName,
      solvent: r.solvent,
      t: r.temperatureK,
      log10Rate: r.log10Rate,
      deltaG: r.deltaG,
      title: v.title,
      doi: v.doi
    })
    .from(r)
    .innerJoin(v, eq(v.id, r.versionId))
    .where(inArray(r.id, ids))
  const byId = new Map(rows.map(x => [x.id, x]))
  return ids.map((id, i) => {
    const x = byId.get(id)!
    const dg = x.deltaG === null ? '' : `, ΔG° = ${fmt(x.deltaG)} eV`
    return [
      `${i + 1}. ${x.donor} → ${x.acceptor} (${x.solvent ?? 'no solvent'}, ${fmt(x.t, 4)} K): k = ${fmt(10 ** x.log10Rate)} s⁻¹${dg}`,
      `   ${publicUrl(`/records/${id}`)}`,
      `   from "${x.title}"${x.doi ? `, https://doi.org/${x.doi}` : ''}`
    ].join('\n')
  })
}

export interface AlertRun { searches: number, digests: number, records: number }

/**
 * Checks every saved search with mails on (or, with `dueBefore`, those last checked before it) and mails one
 * digest per search that has new matches.
 */
export async function runAlerts (opts: { now?: Date, dueBefore?: Date } = {}): Promise<AlertRun> {
  const now = opts.now ?? new Date()
  const db = await useDb()
  const s = schema.savedSearches
  const saved = await db
    .select({ s, email: schema.users.email, person: schema.users.name })
    .from(s)
    .innerJoin(schema.users, eq(schema.users.id, s.userId))
    .where(and(eq(s.alerts, true), opts.dueBefore ? lte(s.checkedUntil, opts.dueBefore) : undefined))
  const run: AlertRun = { searches: saved.length, digests: 0, records: 0 }
  if (!saved.length) return run
  const since = new Date(Math.min(...saved.map(x => x.s.checkedUntil.getTime())))
  const versions = await newlyPublic(since, now)
  const records = versions.size
    ? await db
        .select({ id: schema.rateRecords.id, versionId: schema.rateRecords.versionId })
        .from(schema.rateRecords)
        .where(inArray(schema.rateRecords.versionId, [...versions.keys()]))
    : []
  await syncFromDatabase()
  const index = (await useSearch()).index
  for (const { s: search, email, person } of saved) {
    const fresh = records.filter(r => versions.get(r.versionId)! > search.checkedUntil).map(r => r.id)
    const matched: number[] = []
    for (let i = 0; i < fresh.length; i += ID_CHUNK) {
      const ids = fresh.slice(i, i + ID_CHUNK)
      matched.push(...index.search(toSearchQuery(search.query as SavedQuery, ids), null).ids.map(h => h.id))
    }
    // claim the search (another instance may be running the same job)
    const claimed = await db
      .update(s)
      .set({ checkedUntil: now, ...(matched.length ? { lastDigestAt: now } : {}) })
      .where(and(eq(s.id, search.id), eq(s.checkedUntil, search.checkedUntil)))
      .returning({ id: s.id })
    if (!claimed.length || !matched.length) continue
    const q = search.query as SavedQuery
    const token = encodeURIComponent(unsubscribeToken(search.id, search.userId))
    const unsubscribe = publicUrl(`/unsubscribe?token=${token}`)
    const oneClick = publicUrl(`/api/v1/account/saved-searches/unsubscribe?token=${token}`)
    const since = search.checkedUntil.toISOString().slice(0, 16).replace('T', ' ')
    const shown = matched.slice(0, DIGEST_LIMIT)
    const text = [
      `Hello${person ? ` ${person}` : ''},`,
      '',
      `${countOf(matched.length, 'record')} published on Crosspoint since ${since} UTC `
      + `${matched.length === 1 ? 'matches' : 'match'} your saved search "${search.name}" (${queryInWords(q)}):`,
      '',
      ...(await digestLines(shown)),
      ...(matched.length > shown.length ? ['', `…and ${matched.length - shown.length} more.`] : []),
      '',
      `The search in Crosspoint: ${publicUrl(`/explore?${exploreQuery(q)}`)}`,
      `Your saved searches: ${publicUrl('/account#saved-searches')}`,
      `Stop these e-mails for "${search.name}" (no sign-in needed): ${unsubscribe}`
    ].join('\n')
    await sendMail(email, `Crosspoint: ${countOf(matched.length, 'new record')} for "${search.name}"`, text, {
      'List-Unsubscribe': `<${oneClick}>`,
      'List-Unsubscribe-Post': 'List-Unsubscribe=One-Click'
    })
    run.digests++
    run.records += matched.length
  }
  return run
}
