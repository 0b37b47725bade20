/**
 * Reading the archive with the viewer's rights: which versions a viewer may see, dataset lists,
 * landing-page data, record lists with facets, and the overview numbers for the home page.
 */
import { and, asc, desc, eq, inArray, or, sql, type SQL } from 'drizzle-orm'
import { useDb, schema } from '../storage/db'
import { httpError, MESSAGES } from '../http/errors'
import type { Viewer } from '../accounts/auth'

const { datasets, datasetVersions: versions, rateRecords: records, labs } = schema

/** SQL: versions that are the newest published version of their dataset and out of embargo. */
export function currentPublishedVersionIds (): SQL {
  return sql`(select v.id from dataset_version v where v.state = 'published'
    and (v.embargo_until is null or v.embargo_until <= date('now'))
    and v.version_number = (select max(v2.version_number) from dataset_version v2
      where v2.dataset_id = v.dataset_id and v2.state = 'published'))`
}

/** May this viewer see a version in this state, belonging to this lab? */
export function canSeeVersion (viewer: Viewer | null, labId: number, state: string): boolean {
  if (state === 'published' || state === 'withdrawn') return true
  if (!viewer) return false
  if (viewer.role === 'admin') return true
  if (viewer.labIds.includes(labId)) return true
  return viewer.role === 'curator' && state === 'submitted'
}

/** WHERE clause on dataset_version (joined with dataset) limiting rows to what the viewer may see. */
export function visibleVersionsWhere (viewer: Viewer | null): SQL | undefined {
  const pub = inArray(versions.state, ['published', 'withdrawn'])
  if (!viewer) return pub
  if (viewer.role === 'admin') return undefined
  const parts: SQL[] = [pub]
  if (viewer.labIds.length) parts.push(inArray(datasets.labId, viewer.labIds))
  if (viewer.role === 'curator') parts.push(eq(versions.state, 'submitted'))
  return or(...parts)
}

/** The visibility rule of visibleVersionsWhere for the subquery's version alias v2 (dataset: the outer row). */
function visibleV2 (viewer: Viewer | null): SQL {
  const pub = sql`v2.state in ('published', 'withdrawn')`
  if (!viewer) return pub
  if (viewer.role === 'admin') return sql`1 = 1`
  const parts: SQL[] = [pub]
  if (viewer.labIds.length) parts.push(sql`${datasets.labId} in ${viewer.labIds}`)
  if (viewer.role === 'curator') parts.push(sql`v2.state = 'submitted'`)
  return sql`(${sql.join(parts, sql` or `)})`
}

export async function listDatasets (
  viewer: Viewer | null,
  opts: { state?: string, labId?: number, q?: string, limit: number, offset: number }
) {
  const db = await useDb()
  const where = and(
    visibleVersionsWhere(viewer),
    opts.state ? eq(versions.state, opts.state as never) : undefined,
    opts.labId ? eq(datasets.labId, opts.labId) : undefined,
    opts.q ? sql`lower(${versions.title}) like ${'%' + opts.q.toLowerCase() + '%'}` : undefined,
    // one row per dataset: its newest version the viewer can see (a published dataset stays listed
    // for visitors while its next version is drafted or in review)
    sql`${versions.versionNumber} = (select max(v2.version_number) from dataset_version v2
      where v2.dataset_id = ${datasets.id} and ${visibleV2(viewer)})`
  )
  const rows = await db
    .select({
      id: datasets.id,
      labId: datasets.labId,
      labName: labs.name,
      conceptDoi: datasets.conceptDoi,
      isDemo: datasets.isDemo,
      versionNumber: versions.versionNumber,
      state: versions.state,
      title: versions.title,
      doi: versions.doi,
      recordCount: versions.recordCount,
      license: versions.license,
      publishedAt: versions.publishedAt,
      submittedAt: versions.submittedAt,
      updatedAt: versions.updatedAt
    })
    .from(versions)
    .innerJoin(datasets, eq(versions.datasetId, datasets.id))
    .innerJoin(labs, eq(labs.id, datasets.labId))
    .where(where)
    .orderBy(desc(versions.updatedAt))
    .limit(opts.limit)
    .offset(opts.offset)
  const [{ n }] = (await db
    .select({ n: sql<number>`count(*)` })
    .from(versions)
    .innerJoin(datasets, eq(versions.datasetId, datasets.id))
    .where(where)) as [{ n: number }]
  return { total: n, items: rows }
}

/** A dataset with every version the viewer may see; 404 when there is none. */
export async function getDataset (viewer: Viewer | null, id: number) {
  const db = await useDb()
  const [d] = await db.select().from(datasets).where(eq(datasets.id, id))
  if (!d) throw httpError(404, MESSAGES.notFound)
  const [lab] = await db.select().from(labs).where(eq(labs.id, d.labId))
  const all = await db.select().from(versions).where(eq(versions.datasetId, id)).orderBy(versions.versionNumber)
  const visible = all.filter(v => canSeeVersion(viewer, d.labId, v.state))
  if (!visible.length) throw httpError(404, MESSAGES.notFound)
  return { dataset: d, lab: lab!, versions: visible }
}

/** The version to show by default: newest published, else newest visible. */
export function defaultVersion<T extends { state: string, versionNumber: number }> (vs: T[]): T {
  const pub = vs.filter(v => v.state === 'published')
  return (pub.length ? pub : vs)[(pub.length ? pub : vs).length - 1]!
}

export function isUnderEmbargo (v: { embargoUntil: string | null }): boolean {
  return !!v.embargoUntil && v.embargoUntil > new Date().toISOString().slice(0, 10)
}

/** Columns of a version's records: `summary` leaves out each record's full JSON (tables and plots need only these). */
export type RecordDetail = 'full' | 'summary'
/** Columns a version's records can be sorted by (`sort=deltaG`, `sort=-log10Rate`); ties keep the deposit order. */
export const RECORD_SORTS = ['position', 'donorName', 'acceptorName', 'bridgeName', 'process', 'solvent', 'deltaG',
  'log10Rate', 'temperatureK', 'distanceAngstrom'] as const
export type RecordSort = (typeof RECORD_SORTS)[number]
/** Every record's id, ΔG°, log10 k and medium, in deposit order: what a plot of the whole version needs. */
export async function versionPoints (versionId: number, limit: number) {
  const db = await useDb()
  return db
    .select({ id: records.id, deltaG: records.deltaG, log10Rate: records.log10Rate, solvent: records.solvent })
    .from(records)
    .where(eq(records.versionId, versionId))
    .orderBy(records.position)
    .limit(limit)
}

export async function versionRecords (
  versionId: number,
  range: { offset: number, limit: number },
  detail: RecordDetail = 'full',
  sort: string = 'position'
) {
  const { offset, limit } = range
  const db = await useDb()
  const key = sort.replace(/^-/, '') as RecordSort
  const column = records[RECORD_SORTS.includes(key) ? key : 'position']
  const order = sort.startsWith('-') ? [desc(column), records.position] : [asc(column), records.position]
  const summary = {
    id: records.id,
    position: records.position,
    recordKey: records.recordKey,
    deltaG: records.deltaG,
    log10Rate: records.log10Rate,
    rate: records.rate,
    rateKind: records.rateKind,
    process: records.process,
    solvent: records.solvent,
    temperatureK: records.temperatureK,
    donorName: records.donorName,
    acceptorName: records.acceptorName,
    bridgeName: records.bridgeName,
    distanceAngstrom: records.distanceAngstrom,
    technique: records.technique,
    linkage: records.linkage
  }
  if (detail === 'summary')
    return db.select(summary).from(records).where(eq(records.versionId, versionId)).orderBy(...order).limit(limit).offset(offset)
  return db
    .select({ ...summary, data: records.data })
    .from(records)
    .where(eq(records.versionId, versionId))
    .orderBy(...order)
    .limit(limit)
    .offset(offset)
}

/** Records of the newest published, out-of-embargo version of each dataset: what anyone may download. */
export function publishedRecordsWhere (): SQL {
  return sql`${records.versionId} in ${currentPublishedVersionIds()}`
}

export const RECORD_LIST_COLUMNS = {
  id: records.id,
  versionId: records.versionId,
  datasetId: datasets.id,
  datasetTitle: versions.title,
  doi: versions.doi,
  labName: labs.name,
  donorName: records.donorName,
  acceptorName: records.acceptorName,
  bridgeName: records.bridgeName,
  linkage: records.linkage,
  process: records.process,
  solvent: records.solvent,
  technique: records.technique,
  temperatureK: records.temperatureK,
  distanceAngstrom: records.distanceAngstrom,
  rate: records.rate,
  rateKind: records.rateKind,
  log10Rate: records.log10Rate,
  deltaG: records.deltaG,
  rateUncertainty: sql<number | null>`json_extract(${records.data}, '$.rate.uncertainty')`,
  lambdaSolvent: sql<number | null>`json_extract(${records.data}, '$.reportedParameters.lambdaSolvent')`,
  license: versions.license,
  versionNumber: versions.versionNumber
}

/** The list rows of the given records, in the given order, with the search score. */
export async function pagedRecords (ids: { id: number, score: number }[]) {
  if (!ids.length) return []
  const db = await useDb()
  const rows = await db
    .select(RECORD_LIST_COLUMNS)
    .from(records)
    .innerJoin(versions, eq(records.versionId, versions.id))
    .innerJoin(datasets, eq(versions.datasetId, datasets.id))
    .innerJoin(labs, eq(labs.id, datasets.labId))
    .where(
      inArray(
        records.id,
        ids.map(i => i.id)
      )
    )
  const byId = new Map(rows.map(r => [r.id, r]))
  return ids.map(i => ({ ...byId.get(i.id)!, score: i.score })).filter(r => r.id !== undefined)
}

/** One record with its dataset; published ones for everybody, others only for who may see the version. */
export async function getRecord (viewer: Viewer | null, id: number) {
  const db = await useDb()
  const [row] = await db
    .select({ record: records, version: versions, dataset: datasets, labName: labs.name })
    .from(records)
    .innerJoin(versions, eq(records.versionId, versions.id))
    .innerJoin(datasets, eq(versions.datasetId, datasets.id))
    .innerJoin(labs, eq(labs.id, datasets.labId))
    .where(eq(records.id, id))
  if (
    !row
    || !canSeeVersion(viewer, row.dataset.labId, row.version.state)
    || row.version.state === 'withdrawn'
    || (isUnderEmbargo(row.version) && !(viewer && (viewer.role === 'admin' || viewer.labIds.includes(row.dataset.labId))))
  ) {
    throw httpError(404, MESSAGES.notFound)
  }
  return row
}

/** Numbers for the home page: counts, the latest publications, and (log10 k, ΔG°) of every published record. */
export async function archiveOverview () {
  const db = await useDb()
  const pubIds = currentPublishedVersionIds()
  const [c] = await db
    .select({
      labs: sql<number>`(select count(*) from lab)`,
      datasets: sql<number>`(select count(distinct dataset_id) from dataset_version where state = 'published')`,
      records: sql<number>`(select count(*) from rate_record where version_id in ${pubIds})`
    })
    .from(labs)
    .limit(1)
  const latest = await db
    .select({
      datasetId: versions.datasetId,
      versionNumber: versions.versionNumber,
      title: versions.title,
      doi: versions.doi,
      publishedAt: versions.publishedAt,
      recordCount: versions.recordCount,
      labName: labs.name
    })
    .from(versions)
    .innerJoin(datasets, eq(versions.datasetId, datasets.id))
    .innerJoin(labs, eq(labs.id, datasets.labId))
    .where(eq(versions.state, 'published'))
    .orderBy(desc(versions.publishedAt))
    .limit(6)
  const points = await db
    .select({
      deltaG: records.deltaG,
      log10Rate: records.log10Rate,
      process: records.process,
      rateKind: records.rateKind
    })
    .from(records)
    .where(and(sql`${records.versionId} in ${pubIds}`, sql`${records.deltaG} is not null`))
  return { counts: c ?? { labs: 0, datasets: 0, records: 0 }, latest, points }
}
