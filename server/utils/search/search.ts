/**
 * Record search: one RecordIndex per instance (record-index.ts), built from the database at start
 * and kept up to date per dataset (after every local write, and by polling dataset_version.updated_at
 * so that changes made by other instances arrive too). Visibility is decided per query: published
 * records for everyone, a lab's own drafts for its members.
 */
import { and, eq, gt, inArray, sql } from 'drizzle-orm'
import { consola } from 'consola'
import { useDb, schema } from '../storage/db'
import type { Viewer } from '../accounts/auth'
import { RecordIndex } from './record-index'
import type { SearchAnswer, SearchDoc, SearchQuery } from './index-schema'
import { fingerprintsFor } from './structures'
import type { RateRecordV1 } from '../../../shared/records/types'
import { solventPolarity } from '../../../shared/records/record-columns'

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
    pekar: solventPolarity(d),
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
  // A page is one JSON text (json_group_array of one array per record): the client turns each cell of each row into a
  // JS value one by one, which took longer than SQLite's own work; one cell per page and JSON.parse do not. Numbers
  // travel as quote() text, which SQLite writes with enough digits to give back the same double (its JSON rendering
  // keeps 15). Every field is a column (recordColumns): reading them from the record's JSON cost a parse per record.
  const num = (x: unknown) => sql`quote(${x})`
  const item = sql`json_array(${r.id}, ${r.position}, ${num(r.deltaG)}, ${num(r.temperatureK)}, ${num(r.distanceAngstrom)},
    ${num(r.log10Rate)}, ${r.donorName}, ${r.acceptorName}, ${r.bridgeName}, ${r.linkage}, ${r.process}, ${r.solvent},
    ${r.technique}, ${r.donorClass}, ${r.acceptorClass}, ${r.notes}, ${r.donorSmiles}, ${r.acceptorSmiles},
    ${num(r.solventPolarity)})`
  type Row = [number, number, string, string, string, string, string, string, string | null, string, string, string | null,
    string | null, string | null, string | null, string | null, string | null, string | null, string]
  const number = (q: string) => (q === 'NULL' ? null : Number(q))
  // Version by version, in pages along the (version_id, position) index: one query over all wanted versions ordered by
  // id had SQLite sort every remaining row (and build its JSON) for each page — quadratic, 28 s at a million records.
  for (const versionId of wanted.keys()) {
    let after: [number, number] = [0, Number.MIN_SAFE_INTEGER] // [id, position] of the last record read
    for (;;) {
      const [{ page }] = await db.all<{ page: string }>(sql`select json_group_array(json(item)) as page from (
        select ${item} as item from ${r} where ${r.versionId} = ${versionId} and (${r.position}, ${r.id}) > (${after[1]}, ${after[0]})
        order by ${r.position}, ${r.id} limit ${LOAD_PAGE})`) as [{ page: string }]
      const rows = JSON.parse(page) as Row[]
      if (!rows.length) break
      // the furthest (position, id) read, whatever order the aggregate kept
      for (const [id, position] of rows) if (position > after[1] || (position === after[1] && id > after[0])) after = [id, position]
      yield rows.map(([id, , dg, tk, dist, lk, donor, acceptor, bridge, linkage, process, solvent, technique, donorClass,
        acceptorClass, notes, donorSmiles, acceptorSmiles, polarity]) => {
        const ver = wanted.get(versionId)!
        return {
          id,
          datasetId: ver.datasetId,
          labId: ver.labId,
          visibility: ver.visibility,
          donor,
          acceptor,
          bridge: bridge ?? '',
          classes: [donorClass, acceptorClass].filter(Boolean).join(' '),
          solvent: solvent ?? '',
          technique: technique ?? '',
          process,
          linkage,
          notes: notes ?? '',
          datasetTitle: ver.title,
          lab: ver.lab,
          keywords: ver.keywords,
          year: ver.year,
          deltaG: number(dg),
          temperatureK: number(tk)!,
          distance: number(dist),
          log10Rate: number(lk)!,
          pekar: number(polarity),
          donorSmiles,
          acceptorSmiles
        }
      })
    }
  }
}

async function fill (index: RecordIndex, datasetIds?: number[]) {
  let adding = 0
  for await (const docs of loadDocs(datasetIds)) {
    const t = performance.now()
    index.add(docs)
    adding += performance.now() - t
  }
  const missing = index.smilesWithoutFingerprint()
  if (missing.length) for (const [smiles, fp] of await fingerprintsFor(missing)) index.setFingerprint(smiles, fp)
  return adding
}

async function build (): Promise<State> {
  const start = Date.now()
  const index = new RecordIndex()
  const adding = await fill(index)
  const took = (Date.now() - start) / 1000
  if (index.size >= 10_000 || took > 5)
    consola.info(`[crosspoint] search index: ${index.size} records in ${took.toFixed(1)} s (indexing ${(adding / 1000).toFixed(1)} s)`)
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
