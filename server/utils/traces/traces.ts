/** Traces of a dataset: kept once per file (by sha256), read by whoever may see the dataset, fitted on request. */
import { and, asc, eq, inArray } from 'drizzle-orm'
import { schema, useDb } from '../storage/db'
import { storeOriginal } from '../storage/originals'
import { getDataset } from '../publishing/archive'
import { httpError } from '../http/errors'
import type { Viewer } from '../accounts/auth'
import type { TracePoints } from './parse'
import type { RateRecordV1 } from '../../../shared/records/types'
import { checkProvenance } from '../../../shared/records/provenance'

export const TRACE_META_QUERY = {
  type: 'object',
  additionalProperties: false,
  required: ['timeUnit', 'signal'],
  properties: {
    timeUnit: { enum: ['fs', 'ps', 'ns', 'us', 'ms', 's'], description: 'unit of the time column' },
    signal: { enum: ['transient-absorption', 'emission', 'other'], description: 'what the signal column measures' },
    wavelengthNm: { type: 'number', exclusiveMinimum: 0, maximum: 100000, description: 'probe or emission wavelength, nm' }
  }
}
export interface TraceMeta {
  timeUnit: 'fs' | 'ps' | 'ns' | 'us' | 'ms' | 's'
  signal: 'transient-absorption' | 'emission' | 'other'
  wavelengthNm?: number
}

const T = schema.traces
export const traceSummary = (t: typeof T.$inferSelect) => ({
  id: t.id,
  datasetId: t.datasetId,
  name: t.name,
  sha256: t.sha256,
  timeUnit: t.timeUnit,
  signal: t.signalKind,
  wavelengthNm: t.wavelengthNm,
  points: t.pointCount,
  hasSigma: t.hasSigma,
  createdAt: t.createdAt
})

/** Keeps a checked trace (the same file twice is one trace). */
export async function storeTrace (
  viewerId: string,
  datasetId: number,
  versionId: number,
  file: { filename: string, type: string, data: Uint8Array },
  meta: TraceMeta,
  points: TracePoints
) {
  const stored = await storeOriginal(versionId, viewerId, file.filename, file.type, file.data)
  const db = await useDb()
  const [known] = await db
    .select()
    .from(T)
    .where(and(eq(T.datasetId, datasetId), eq(T.sha256, stored.sha256)))
  if (known) return { trace: traceSummary(known), existing: true }
  const [row] = await db
    .insert(T)
    .values({
      datasetId,
      fileId: stored.id,
      sha256: stored.sha256,
      name: stored.name,
      timeUnit: meta.timeUnit,
      signalKind: meta.signal,
      wavelengthNm: meta.wavelengthNm ?? null,
      pointCount: points.times.length,
      hasSigma: !!points.sigma,
      points,
      uploadedBy: viewerId
    })
    .returning()
  return { trace: traceSummary(row!), existing: false }
}

export async function listTraces (viewer: Viewer | null, datasetId: number) {
  await getDataset(viewer, datasetId)
  const db = await useDb()
  return (await db.select().from(T).where(eq(T.datasetId, datasetId)).orderBy(asc(T.id))).map(traceSummary)
}

/** A trace with its points, if the viewer may see its dataset (404 otherwise). */
export async function readTrace (viewer: Viewer | null, id: number) {
  const db = await useDb()
  const [t] = await db.select().from(T).where(eq(T.id, id))
  if (!t) throw httpError(404, 'No such trace')
  await getDataset(viewer, t.datasetId)
  return t
}

/** The traces of a dataset a set of hashes names (bundles, record pages). */
export async function tracesByHash (datasetId: number, hashes: string[]) {
  if (!hashes.length) return []
  const db = await useDb()
  return db
    .select({ t: T, storageKey: schema.uploadedFiles.storageKey })
    .from(T)
    .innerJoin(schema.uploadedFiles, eq(schema.uploadedFiles.id, T.fileId))
    .where(and(eq(T.datasetId, datasetId), inArray(T.sha256, hashes)))
}

/**
 * Per record with a fitted rate: the traces its provenance names (ids of this dataset's traces, null when not
 * attached) and whether the stated rate agrees with the fit (review desk, record page).
 */
export async function provenanceOf (datasetId: number, recs: { id: number, position: number, data: RateRecordV1 }[]) {
  const withP = recs.filter(r => r.data.provenance)
  if (!withP.length) return []
  const hashes = new Set<string>()
  for (const r of withP) {
    const p = r.data.provenance!
    hashes.add(p.trace.sha256)
    if (p.reference) hashes.add(p.reference.sha256)
    if (p.fit.irfSha256) hashes.add(p.fit.irfSha256)
    if (p.referenceFit?.irfSha256) hashes.add(p.referenceFit.irfSha256)
  }
  const found = new Map((await tracesByHash(datasetId, [...hashes])).map(x => [x.t.sha256, x.t.id]))
  return withP.map((r) => {
    const p = r.data.provenance!
    return {
      recordId: r.id,
      position: r.position,
      traceId: found.get(p.trace.sha256) ?? null,
      referenceTraceId: p.reference ? (found.get(p.reference.sha256) ?? null) : undefined,
      irfTraceId: p.fit.irfSha256 ? (found.get(p.fit.irfSha256) ?? null) : undefined,
      check: checkProvenance(r.data)
    }
  })
}
