/** The curator queue, and one submission as the curator sees it (report, diff, changes since a return, history). */
import { inchiKeysOf, memberOf, systemMatches } from '../systems/systems'
import { provenanceOf } from '../traces/traces'
import { createHash } from 'node:crypto'
import { and, desc, eq, inArray, ne, sql } from 'drizzle-orm'
import { useDb, schema } from '../storage/db'
import { httpError, MESSAGES } from '../http/errors'
import type { Viewer } from '../accounts/auth'
import { checkRecords } from '../deposit/check'
import { ingestContext, recordValidator } from '../deposit/drafts'
import { OWN_LAB, latestVersion } from './common'

const { datasets, labs, recordComments, rateRecords: records, reviews, users, datasetVersions: versions } = schema

export async function submittedFor (viewer: Viewer, datasetId: number, opts: { allowOwnLab?: boolean } = {}) {
  const db = await useDb()
  const [d] = await db.select().from(datasets).where(eq(datasets.id, datasetId))
  const v = d && (await latestVersion(datasetId))
  if (!d || !v) throw httpError(404, MESSAGES.notFound)
  const member = viewer.labIds.includes(d.labId)
  if (v.state !== 'submitted' && !member && viewer.role !== 'admin') throw httpError(404, MESSAGES.notFound)
  if (!opts.allowOwnLab && member) throw httpError(403, OWN_LAB)
  return { dataset: d, version: v }
}

export async function reviewQueue (viewer: Viewer, f: { lab?: number, q?: string }) {
  const db = await useDb()
  const rows = await db
    .select({
      datasetId: datasets.id,
      labId: datasets.labId,
      labName: labs.name,
      title: versions.title,
      versionNumber: versions.versionNumber,
      recordCount: versions.recordCount,
      submittedAt: versions.submittedAt,
      updatedAt: versions.updatedAt,
      returns: sql<number>`(select count(*) from review r where r.version_id = ${versions.id} and r.decision = 'returned')`
    })
    .from(versions)
    .innerJoin(datasets, eq(datasets.id, versions.datasetId))
    .innerJoin(labs, eq(labs.id, datasets.labId))
    .where(
      and(
        eq(versions.state, 'submitted'),
        f.lab ? eq(datasets.labId, f.lab) : undefined,
        f.q ? sql`lower(${versions.title}) like ${'%' + f.q.toLowerCase() + '%'}` : undefined
      )
    )
    .orderBy(versions.submittedAt)
  const ctx = await ingestContext()
  const validate = recordValidator()
  const out = []
  for (const r of rows) {
    const recs = await db
      .select({ data: records.data })
      .from(records)
      .innerJoin(versions, eq(versions.id, records.versionId))
      .where(and(eq(versions.datasetId, r.datasetId), eq(versions.versionNumber, r.versionNumber)))
    const check = await checkRecords(
      recs.map(x => x.data),
      validate,
      ctx,
      '/records'
    )
    out.push({
      ...r,
      ownLab: viewer.labIds.includes(r.labId),
      warnings: check.warningCount,
      problems: check.issueCount,
      ageDays: r.submittedAt ? Math.floor((Date.now() - r.submittedAt.getTime()) / 86400e3) : null
    })
  }
  return out
}

export function hashData (d: unknown): string {
  return createHash('sha256').update(JSON.stringify(d)).digest('hex').slice(0, 16)
}

/** Field-level changes between two records (JSON pointers of the leaves that differ). */
function changedFields (a: unknown, b: unknown, path = ''): string[] {
  if (typeof a !== 'object' || typeof b !== 'object' || a === null || b === null)
    return JSON.stringify(a) === JSON.stringify(b) ? [] : [path || '/']
  const keys = new Set([...Object.keys(a), ...Object.keys(b)])
  return [...keys].flatMap(k =>
    changedFields((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], `${path}/${k}`)
  )
}

export function diffRecords (
  before: { recordKey: string, data: unknown, position: number }[],
  after: { recordKey: string, data: unknown, position: number }[]
) {
  const old = new Map(before.map(r => [r.recordKey, r]))
  const now = new Map(after.map(r => [r.recordKey, r]))
  return {
    added: after.filter(r => !old.has(r.recordKey)).map(r => ({ recordKey: r.recordKey, position: r.position })),
    removed: before.filter(r => !now.has(r.recordKey)).map(r => ({ recordKey: r.recordKey, position: r.position })),
    changed: after
      .filter(r => old.has(r.recordKey))
      .map(r => ({
        recordKey: r.recordKey,
        position: r.position,
        fields: changedFields(old.get(r.recordKey)!.data, r.data)
      }))
      .filter(c => c.fields.length)
  }
}

export async function reviewView (viewer: Viewer, datasetId: number) {
  const db = await useDb()
  const { dataset, version } = await submittedFor(viewer, datasetId, { allowOwnLab: true })
  const [lab] = await db.select().from(labs).where(eq(labs.id, dataset.labId))
  const recs = await db.select().from(records).where(eq(records.versionId, version.id)).orderBy(records.position)
  const report = await checkRecords(
    recs.map(r => r.data),
    recordValidator(),
    await ingestContext(),
    '/records'
  )
  const [prev] = await db
    .select()
    .from(versions)
    .where(and(eq(versions.datasetId, datasetId), eq(versions.state, 'published'), ne(versions.id, version.id)))
    .orderBy(desc(versions.versionNumber))
    .limit(1)
  const prevRecs = prev ? await db.select().from(records).where(eq(records.versionId, prev.id)) : []
  const history = await db
    .select({
      id: reviews.id,
      decision: reviews.decision,
      comment: reviews.comment,
      createdAt: reviews.createdAt,
      snapshot: reviews.snapshot,
      curator: users.name
    })
    .from(reviews)
    .leftJoin(users, eq(users.id, reviews.curatorId))
    .where(eq(reviews.versionId, version.id))
    .orderBy(desc(reviews.id))
  const comments = history.length
    ? await db
        .select({ reviewId: recordComments.reviewId, recordId: recordComments.recordId, body: recordComments.body })
        .from(recordComments)
        .where(
          inArray(
            recordComments.reviewId,
            history.map(h => h.id)
          )
        )
    : []
  const lastReturn = history.find(h => h.decision === 'returned' && h.snapshot)
  let sinceReturn = null
  if (lastReturn?.snapshot) {
    const snap = new Map(lastReturn.snapshot.map(s => [s.key, s.hash]))
    sinceReturn = {
      added: recs.filter(r => !snap.has(r.recordKey)).map(r => r.position),
      changed: recs
        .filter(r => snap.has(r.recordKey) && snap.get(r.recordKey) !== hashData(r.data))
        .map(r => r.position),
      removed: [...snap.keys()].filter(k => !recs.some(r => r.recordKey === k)).length
    }
  }
  const keys = await inchiKeysOf(recs.map(r => r.data))
  const matches = await systemMatches(
    recs.map(r => memberOf(r, { labId: lab!.id, labName: lab!.name, datasetId }, keys))
  )
  return {
    datasetId,
    ownLab: viewer.labIds.includes(dataset.labId),
    /** submitted records that measure a published system, with the record's z against its consensus */
    systemMatches: matches,
    /** records whose rate was fitted from a trace: the traces, and whether the stated rate agrees with the fit */
    traceChecks: await provenanceOf(datasetId, recs),
    lab: { id: lab!.id, name: lab!.name },
    version: {
      id: version.id,
      versionNumber: version.versionNumber,
      state: version.state,
      title: version.title,
      description: version.description,
      metadata: version.metadata,
      license: version.license,
      recordCount: version.recordCount,
      submittedAt: version.submittedAt,
      updatedAt: version.updatedAt.getTime()
    },
    records: recs.map(r => ({
      id: r.id,
      position: r.position,
      recordKey: r.recordKey,
      data: r.data,
      deltaG: r.deltaG,
      log10Rate: r.log10Rate,
      donorName: r.donorName,
      acceptorName: r.acceptorName,
      solvent: r.solvent,
      process: r.process,
      temperatureK: r.temperatureK
    })),
    report: {
      issues: report.issues,
      issueCount: report.issueCount,
      warnings: report.warnings,
      warningCount: report.warningCount
    },
    diff: prev ? { against: prev.versionNumber, ...diffRecords(prevRecs, recs) } : null,
    sinceReturn,
    history: history.map(h => ({ ...h, snapshot: undefined, comments: comments.filter(c => c.reviewId === h.id) }))
  }
}
