/** Drafts: who may change them, the solvent context, stored originals, and writing records in one transaction. */
import { randomUUID } from 'node:crypto'
import { and, desc, eq, inArray, sql } from 'drizzle-orm'
import type { H3Event } from 'h3'
import { useDb, schema, type Tx } from '../storage/db'
import { httpError, MESSAGES } from '../http/errors'
import { discardBody } from '../http/body'
import { requireUser, type Viewer } from '../accounts/auth'
import { compile } from '../http/validation'
import rateRecordSchema from '../../../schemas/rate-record.v1.json'
import { recordColumns } from '../../../shared/records/record-columns'
import type { RateRecordV1 } from '../../../shared/records/types'
import type { IngestContext, SchemaValidator } from '../../../shared/records/ingest'
import { afterDatasetChange } from '../search/search'

async function touchVersion (versionId: number): Promise<void> {
  const db = await useDb()
  const [v] = await db
    .select({ datasetId: schema.datasetVersions.datasetId })
    .from(schema.datasetVersions)
    .where(eq(schema.datasetVersions.id, versionId))
  if (v) await afterDatasetChange(v.datasetId)
}

export function recordValidator (): SchemaValidator {
  return compile(rateRecordSchema as object) as SchemaValidator
}

export async function ingestContext (): Promise<IngestContext> {
  const db = await useDb()
  const rows = await db.select().from(schema.solvents)
  return {
    solvents: new Map(
      rows.map(r => [
        r.name.toLowerCase(),
        { name: r.name, permittivity: r.permittivity, refractiveIndex: r.refractiveIndex, viscosity: r.viscosity }
      ])
    )
  }
}

/**
 * The dataset's newest version, which the viewer (a member of the dataset's lab) may change:
 * 404 for other labs, 409 when it is under review or published.
 */
export async function requireEditableDraft (
  event: H3Event,
  datasetId: number
): Promise<{
  viewer: Viewer
  dataset: typeof schema.datasets.$inferSelect
  version: typeof schema.datasetVersions.$inferSelect
}> {
  const viewer = await requireUser(event)
  const db = await useDb()
  const [dataset] = await db.select().from(schema.datasets).where(eq(schema.datasets.id, datasetId))
  if (!dataset || !viewer.labIds.includes(dataset.labId)) throw httpError(404, MESSAGES.notFound)
  const [version] = await db
    .select()
    .from(schema.datasetVersions)
    .where(eq(schema.datasetVersions.datasetId, datasetId))
    .orderBy(desc(schema.datasetVersions.versionNumber))
    .limit(1)
  if (!version) throw httpError(404, MESSAGES.notFound)
  if (version.state === 'published' || version.state === 'withdrawn') throw httpError(409, MESSAGES.published)
  if (version.state === 'submitted')
    throw httpError(409, 'This version is under review; it can be changed again if the curator returns it')
  return { viewer, dataset, version }
}

/**
 * requireEditableDraft for a route that receives a file: when the caller may not write, the file still on its way
 * is read and dropped (at most `maxBytes`) before the refusal, so the answer is not cut off by an unread body.
 */
export async function requireDraftForFile (event: H3Event, datasetId: number, maxBytes: number) {
  try {
    return await requireEditableDraft(event, datasetId)
  }
  catch (e) {
    await discardBody(event, maxBytes + 65536)
    throw e
  }
}

/** Appends (or, with replace, swaps in) records of a draft version in one transaction; all or nothing. */
export async function writeRecords (
  versionId: number,
  records: RateRecordV1[],
  mode: 'append' | 'replace',
  first?: (tx: Tx) => Promise<void>
): Promise<number> {
  const db = await useDb()
  const n = await db.transaction(async (tx) => {
    if (first) await first(tx) // e.g. claim the upload, in the same transaction as the rows
    if (mode === 'replace') await tx.delete(schema.rateRecords).where(eq(schema.rateRecords.versionId, versionId))
    const [{ maxPos }] = (await tx
      .select({ maxPos: sql<number>`coalesce(max(position), 0)` })
      .from(schema.rateRecords)
      .where(eq(schema.rateRecords.versionId, versionId))) as [{ maxPos: number }]
    const rows = records.map((data, i) => ({
      versionId,
      position: maxPos + i + 1,
      recordKey: randomUUID(),
      data,
      ...recordColumns(data)
    }))
    for (let i = 0; i < rows.length; i += 500) await tx.insert(schema.rateRecords).values(rows.slice(i, i + 500))
    const [{ n }] = (await tx
      .select({ n: sql<number>`count(*)` })
      .from(schema.rateRecords)
      .where(eq(schema.rateRecords.versionId, versionId))) as [{ n: number }]
    await tx
      .update(schema.datasetVersions)
      .set({ recordCount: n, updatedAt: new Date() })
      .where(eq(schema.datasetVersions.id, versionId))
    return n
  })
  await touchVersion(versionId)
  return n
}

export async function deleteRecords (versionId: number, ids: number[]): Promise<number> {
  const db = await useDb()
  const left = await db.transaction(async (tx) => {
    const gone = await tx
      .delete(schema.rateRecords)
      .where(and(eq(schema.rateRecords.versionId, versionId), inArray(schema.rateRecords.id, ids)))
      .returning({ id: schema.rateRecords.id })
    if (gone.length !== ids.length)
      throw httpError(404, `${ids.length - gone.length} of the records are not in this draft; nothing was deleted`)
    const [{ n }] = (await tx
      .select({ n: sql<number>`count(*)` })
      .from(schema.rateRecords)
      .where(eq(schema.rateRecords.versionId, versionId))) as [{ n: number }]
    await tx
      .update(schema.datasetVersions)
      .set({ recordCount: n, updatedAt: new Date() })
      .where(eq(schema.datasetVersions.id, versionId))
    return n
  })
  await touchVersion(versionId)
  return left
}

export async function replaceRecord (versionId: number, recordId: number, data: RateRecordV1): Promise<void> {
  const db = await useDb()
  const rows = await db
    .update(schema.rateRecords)
    .set({ data, ...recordColumns(data), updatedAt: new Date() })
    .where(and(eq(schema.rateRecords.id, recordId), eq(schema.rateRecords.versionId, versionId)))
    .returning({ id: schema.rateRecords.id })
  if (!rows.length) throw httpError(404, 'No such record in this draft')
  await touchVersion(versionId)
}
