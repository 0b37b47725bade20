/**
 * ΔG° derived from potentials by the process-aware rule: the one-time data migration that corrects
 * editable drafts, the curators' report of published records whose stored value differs (published
 * versions never change), and the correction version a curator starts from that report.
 */
import { and, eq, inArray, sql } from 'drizzle-orm'
import { rederive } from '../../../shared/records/derivation'
import { recordColumns } from '../../../shared/records/record-columns'
import { audit } from '../storage/audit'
import { schema, type Db, type Tx } from '../storage/db'
import { currentPublishedVersionIds } from '../publishing/archive'

const { rateRecords: records, datasetVersions: versions, datasets, labs, dataMigrations } = schema

/** Re-derives the records of the given versions in one transaction; returns how many changed. */
async function rederiveVersions (tx: Tx | Db, versionIds: number[]): Promise<{ changed: number, ids: number[] }> {
  if (!versionIds.length) return { changed: 0, ids: [] }
  const rows = await tx
    .select({ id: records.id, data: records.data })
    .from(records)
    .where(
      and(
        inArray(records.versionId, versionIds),
        sql`json_extract(${records.data}, '$.drivingForce.method') = 'redox-potentials'`
      )
    )
  const ids: number[] = []
  for (const row of rows) {
    const r = rederive(row.data)
    if (!r) continue
    await tx
      .update(records)
      .set({ data: r.record, ...recordColumns(r.record), updatedAt: new Date() })
      .where(eq(records.id, row.id))
    ids.push(row.id)
  }
  return { changed: ids.length, ids }
}

export const REDERIVE_MIGRATION = '2026-12-driving-force-by-process'

/**
 * Data migrations, once each, after the SQL ones: drafts and returned versions (the editable ones) get
 * ΔG° re-derived by process; submitted and published versions are left as they are (a submitted one is
 * flagged by the review check, a published one appears in the curators' report).
 */
export async function applyDataMigrations (db: Db): Promise<void> {
  const done = await db
    .select({ name: dataMigrations.name })
    .from(dataMigrations)
    .where(eq(dataMigrations.name, REDERIVE_MIGRATION))
  if (done.length) return
  await db.transaction(async (tx) => {
    const editable = await tx
      .select({ id: versions.id, datasetId: versions.datasetId })
      .from(versions)
      .where(inArray(versions.state, ['draft', 'returned']))
    const res = await rederiveVersions(
      tx,
      editable.map(v => v.id)
    )
    if (res.changed) {
      const byVersion = await tx
        .select({ versionId: records.versionId, n: sql<number>`count(*)` })
        .from(records)
        .where(inArray(records.id, res.ids))
        .groupBy(records.versionId)
      for (const v of byVersion) {
        const datasetId = editable.find(e => e.id === v.versionId)!.datasetId
        await audit(
          null,
          'dataset.rederived',
          'dataset',
          datasetId,
          { records: v.n, rule: 'ΔG° from potentials by process', migration: REDERIVE_MIGRATION },
          tx
        )
      }
    }
    await tx
      .insert(dataMigrations)
      .values({ name: REDERIVE_MIGRATION, appliedAt: new Date(), detail: { records: res.changed } })
  })
}

export interface DerivationReportItem {
  datasetId: number
  title: string
  labName: string
  versionNumber: number
  doi: string | null
  differing: number
  /** A newer version already under way (a draft, submitted or returned): the correction goes there, not into another one. */
  newerVersion: { versionNumber: number, state: string } | null
  examples: { recordId: number, position: number, process: string, stored: number, derived: number }[]
}

/** Published (current) versions holding records whose stored ΔG° differs from the derivation for their process. */
export async function derivationReport (db: Db): Promise<DerivationReportItem[]> {
  const rows = await db
    .select({
      id: records.id,
      position: records.position,
      data: records.data,
      datasetId: versions.datasetId,
      versionNumber: versions.versionNumber,
      doi: versions.doi,
      title: versions.title,
      labName: labs.name
    })
    .from(records)
    .innerJoin(versions, eq(versions.id, records.versionId))
    .innerJoin(datasets, eq(datasets.id, versions.datasetId))
    .innerJoin(labs, eq(labs.id, datasets.labId))
    .where(
      and(
        sql`${versions.id} in ${currentPublishedVersionIds()}`,
        sql`json_extract(${records.data}, '$.drivingForce.method') = 'redox-potentials'`
      )
    )
  const out = new Map<number, DerivationReportItem>()
  for (const row of rows) {
    const r = rederive(row.data)
    if (!r) continue
    let item = out.get(row.datasetId)
    if (!item) {
      item = {
        datasetId: row.datasetId,
        title: row.title,
        labName: row.labName,
        versionNumber: row.versionNumber,
        doi: row.doi,
        differing: 0,
        newerVersion: null,
        examples: []
      }
      out.set(row.datasetId, item)
    }
    item.differing++
    if (item.examples.length < 5)
      item.examples.push({
        recordId: row.id,
        position: row.position,
        process: (row.data as { process: string }).process,
        stored: r.stored,
        derived: r.derived
      })
  }
  if (out.size) {
    const newer = await db
      .select({ datasetId: versions.datasetId, versionNumber: versions.versionNumber, state: versions.state })
      .from(versions)
      .where(
        and(inArray(versions.datasetId, [...out.keys()]), inArray(versions.state, ['draft', 'submitted', 'returned']))
      )
    for (const n of newer) {
      const item = out.get(n.datasetId)!
      if (n.versionNumber > item.versionNumber) item.newerVersion = { versionNumber: n.versionNumber, state: n.state }
    }
  }
  return [...out.values()].sort((a, b) => b.differing - a.differing)
}

export { rederiveVersions }
