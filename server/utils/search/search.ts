/**
 * Record search: one RecordIndex per instance (record-index.ts), built from the database at start
 * and kept up to date per dataset (after every local write, and by polling dataset_version.updated_at
 * so that changes made by other instances arrive too). Visibility is decided per query: published
 * records for everyone, a lab's own drafts for its members.
 */
import { and, asc, eq, gt, inArray, sql } from 'drizzle-orm'
import { useDb, schema } from '../storage/db'
import type { Viewer } from '../accounts/auth'
import { RecordIndex } from './record-index'
import type { SearchAnswer, SearchDoc, SearchQuery } from './index-schema'
import { fingerprintsFor } from './structures'
import type { RateRecordV1 } from '../../../shared/records/types'

interface State {
  index: RecordIndex
  lastSync: number
}
let state: Promise<State> | undefined

/** A record (as parsed JSON) → document. Used by the benchmark and tests, which feed synthetic records. */
export function toDoc (r: {
  id: number
  data: RateRecordV1
  datasetId: number
  labId: number
  visibility: string
  title: string
  lab: string
  keywords: string[]
  year: number | null
  deltaG: number | null
  temperatureK: number
  distance: number | null
  log10Rate: number
}): SearchDoc {
  const d = r.data
  return {
    id: r.id,
    datasetId: r.datasetId,
    labId: r.labId,
    visibility: r.visibility,
    donor: d.system.donor.name,
    acceptor: d.system.acceptor.name,
    bridge: d.system.bridge?.name ?? '',
    classes: [d.system.donor.class, d.system.acceptor.class].filter(Boolean).join(' '),
    solvent: d.medium.solvent ?? d.medium.matrix ?? '',
    technique: d.technique.method,
    process: d.process,
    linkage: d.system.linkage,
    notes: d.notes ?? '',
    datasetTitle: r.title,
    lab: r.lab,
    keywords: r.keywords.join(' '),
    year: r.year,
    deltaG: r.deltaG,
    temperatureK: r.temperatureK,
    distance: r.distance,
    log10Rate: r.log10Rate,
    pekar:
      d.medium.permittivity && d.medium.refractiveIndex
        ? 1 / d.medium.refractiveIndex ** 2 - 1 / d.medium.permittivity
        : null,
    donorSmiles: d.system.donor.smiles ?? null,
    acceptorSmiles: d.system.acceptor.smiles ?? null
  }
}

const LOAD_PAGE = 10_000

/**
 * Documents of the versions that matter for search: each dataset's newest version, and its newest
 * published one. Read in pages of record ids, with the few JSON fields search needs extracted by
 * SQLite (json_extract), so that start-up never holds 100 000 parsed records at once.
 */
async function* loadDocs (datasetIds?: number[]): AsyncGenerator<SearchDoc[]> {
  const db = await useDb()
  const v = schema.datasetVersions
  const r = schema.rateRecords
  const versions = await db
    .select({
      id: v.id,
      datasetId: v.datasetId,
      labId: schema.datasets.labId,
      state: v.state,
      versionNumber: v.versionNumber,
      embargo: v.embargoUntil,
      title: v.title,
      metadata: v.metadata,
      publishedAt: v.publishedAt,
      lab: schema.labs.name,
      newest: sql<number>`(select max(v2.version_number) from dataset_version v2 where v2.dataset_id = ${v.datasetId})`,
      newestPublished: sql<number>`(select max(v3.version_number) from dataset_version v3
        where v3.dataset_id = ${v.datasetId} and v3.state = 'published')`
    })
    .from(v)
    .innerJoin(schema.datasets, eq(schema.datasets.id, v.datasetId))
    .innerJoin(schema.labs, eq(schema.labs.id, schema.datasets.labId))
    .where(
      and(
        inArray(v.state, ['draft', 'returned', 'submitted', 'published']),
        datasetIds ? inArray(v.datasetId, datasetIds) : undefined
      )
    )
  const today = new Date().toISOString().slice(0, 10)
  const wanted = new Map(
    versions
      .filter(x => x.versionNumber === x.newest || x.versionNumber === x.newestPublished)
      .map(x => [
        x.id,
        {
          ...x,
          keywords: (x.metadata.keywords ?? []).join(' '),
          year: x.publishedAt ? x.publishedAt.getUTCFullYear() : null,
          visibility:
            x.state === 'published' && x.versionNumber === x.newestPublished
              ? x.embargo && x.embargo > today
                ? 'embargo'
                : 'public'
              : x.state
        }
      ])
  )
  if (!wanted.size) return
  const j = (path: string) => sql<string | null>`json_extract(${r.data}, ${path})`
  let last = 0
  for (;;) {
    const rows = await db
      .select({
        id: r.id,
        versionId: r.versionId,
        deltaG: r.deltaG,
        temperatureK: r.temperatureK,
        distance: r.distanceAngstrom,
        log10Rate: r.log10Rate,
        donor: r.donorName,
        acceptor: r.acceptorName,
        bridge: r.bridgeName,
        linkage: r.linkage,
        process: r.process,
        solvent: r.solvent,
        technique: r.technique,
        donorClass: j('$.system.donor.class'),
        acceptorClass: j('$.system.acceptor.class'),
        notes: j('$.notes'),
        permittivity: sql<number | null>`json_extract(${r.data}, '$.medium.permittivity')`,
        refractiveIndex: sql<number | null>`json_extract(${r.data}, '$.medium.refractiveIndex')`,
        donorSmiles: j('$.system.donor.smiles'),
        acceptorSmiles: j('$.system.acceptor.smiles')
      })
      .from(r)
      .where(and(gt(r.id, last), inArray(r.versionId, [...wanted.keys()])))
      .orderBy(asc(r.id))
      .limit(LOAD_PAGE)
    if (!rows.length) return
    last = rows[rows.length - 1]!.id
    yield rows.map((x) => {
      const ver = wanted.get(x.versionId)!
      return {
        id: x.id,
        datasetId: ver.datasetId,
        labId: ver.labId,
        visibility: ver.visibility,
        donor: x.donor,
        acceptor: x.acceptor,
        bridge: x.bridge ?? '',
        classes: [x.donorClass, x.acceptorClass].filter(Boolean).join(' '),
        solvent: x.solvent ?? '',
        technique: x.technique ?? '',
        process: x.process,
        linkage: x.linkage,
        notes: x.notes ?? '',
        datasetTitle: ver.title,
        lab: ver.lab,
        keywords: ver.keywords,
        year: ver.year,
        deltaG: x.deltaG,
        temperatureK: x.temperatureK,
        distance: x.distance,
        log10Rate: x.log10Rate,
        pekar: x.permittivity && x.refractiveIndex ? 1 / x.refractiveIndex ** 2 - 1 / x.permittivity : null,
        donorSmiles: x.donorSmiles,
        acceptorSmiles: x.acceptorSmiles
      }
    })
  }
}

async function fill (index: RecordIndex, datasetIds?: number[]) {
  for await (const docs of loadDocs(datasetIds)) index.add(docs)
  const missing = index.smilesWithoutFingerprint()
  if (missing.length) for (const [smiles, fp] of await fingerprintsFor(missing)) index.setFingerprint(smiles, fp)
}

async function build (): Promise<State> {
  const start = Date.now()
  const index = new RecordIndex()
  await fill(index)
  return { index, lastSync: start }
}

export function useSearch (): Promise<State> {
  if (!state) {
    state = build()
    state.catch(() => {
      state = undefined
    })
  }
  return state
}

/** Re-reads one or more datasets into the index (after a write here, or a change seen in the database). */
export async function reindexDatasets (ids: number[]): Promise<void> {
  if (!state || !ids.length) return
  const s = await state
  s.index.removeDatasets(ids)
  await fill(s.index, ids)
  resultCache.clear()
}

/** Picks up changes made by other instances: datasets whose versions changed since the last look. */
export async function syncFromDatabase (): Promise<number> {
  if (!state) return 0
  const s = await state
  const since = s.lastSync - 2000
  s.lastSync = Date.now()
  const db = await useDb()
  const changed = await db
    .selectDistinct({ id: schema.datasetVersions.datasetId })
    .from(schema.datasetVersions)
    .where(gt(schema.datasetVersions.updatedAt, new Date(since)))
  await reindexDatasets(changed.map(c => c.id))
  return changed.length
}

/**
 * Answers per (query, viewer's labs), dropped whenever the index changes: the same searches come
 * back again and again (shared links, paging back), and the page's rows cost a database read.
 */
const resultCache = new Map<string, Promise<unknown>>()
const CACHE_SIZE = 500

/** The search answer (shaped by `finish`, e.g. with the page's rows), cached until the index changes. */
export async function cachedSearch<T> (
  query: SearchQuery,
  viewer: Pick<Viewer, 'labIds'> | null,
  finish: (r: SearchAnswer) => Promise<T>
): Promise<T> {
  const s = await useSearch()
  const key = JSON.stringify([s.index.generation, query, [...(viewer?.labIds ?? [])].sort()])
  const hit = resultCache.get(key)
  if (hit) {
    resultCache.delete(key)
    resultCache.set(key, hit)
    return hit as Promise<T>
  }
  const res = finish(s.index.search(query, viewer))
  resultCache.set(key, res)
  res.catch(() => resultCache.delete(key))
  if (resultCache.size > CACHE_SIZE) resultCache.delete(resultCache.keys().next().value!)
  return res
}

/** Hits of a query, uncached (for bundles of a search selection). */
export async function runSearch (query: SearchQuery, viewer: Pick<Viewer, 'labIds'> | null): Promise<SearchAnswer> {
  return (await useSearch()).index.search(query, viewer)
}

export async function similarTo (id: number, viewer: Pick<Viewer, 'labIds'> | null, limit: number) {
  return (await useSearch()).index.similar(id, viewer, limit)
}

/** Call after any write that changes what a dataset's records look like to search. */
export async function afterDatasetChange (datasetId: number): Promise<void> {
  await reindexDatasets([datasetId])
}
