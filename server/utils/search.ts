/**
 * Record search: a minisearch index per instance, built from the database at start and kept up to
 * date per dataset (after every local write, and by polling dataset_version.updated_at so that
 * changes made by other instances arrive too). Facets and ranges are computed over the hits.
 * Visibility is decided per query: published records for everyone, a lab's own drafts for its members.
 */
import MiniSearch from 'minisearch'
import { and, eq, gt, inArray, sql } from 'drizzle-orm'
import { useDb, schema } from './db'
import type { Viewer } from './auth'
import type { RateRecordV1 } from '../../shared/records/types'

export interface SearchDoc {
  id: number
  datasetId: number
  labId: number
  /** 'public' for the newest published, out-of-embargo version; otherwise the version's state. */
  visibility: string
  donor: string
  acceptor: string
  bridge: string
  classes: string
  solvent: string
  technique: string
  process: string
  linkage: string
  notes: string
  datasetTitle: string
  lab: string
  keywords: string
  year: number | null
  deltaG: number | null
  temperatureK: number
  distance: number | null
  log10Rate: number
  /** Solvent polarity 1/n² − 1/ε_s, when the record gives n and ε. */
  pekar: number | null
}

const FIELDS = ['donor', 'acceptor', 'bridge', 'classes', 'solvent', 'technique', 'process', 'linkage', 'notes', 'datasetTitle', 'lab', 'keywords']
/** Prefix matching from 3 characters and typo tolerance (at most 2 edits) from 5: short terms explode the candidate set. */
export const SEARCH_OPTIONS = {
  prefix: (term: string) => term.length >= 3,
  fuzzy: (term: string) => term.length >= 5 ? 0.2 : false,
  maxFuzzy: 2,
  boost: { donor: 3, acceptor: 3, bridge: 2, classes: 2, datasetTitle: 1.5, solvent: 1.5 },
  combineWith: 'AND' as const
}

export function newIndex () {
  return new MiniSearch<SearchDoc>({ fields: FIELDS, storeFields: [], idField: 'id', searchOptions: SEARCH_OPTIONS })
}

interface State { index: MiniSearch<SearchDoc>, docs: Map<number, SearchDoc>, byDataset: Map<number, number[]>, lastSync: number, generation: number }
let state: Promise<State> | undefined

/** Rows → documents. Kept separate from the database so the benchmark can feed synthetic records. */
export function toDoc (r: { id: number, data: RateRecordV1, datasetId: number, labId: number, visibility: string, title: string, lab: string, keywords: string[], year: number | null, deltaG: number | null, temperatureK: number, distance: number | null, log10Rate: number }): SearchDoc {
  const d = r.data
  return {
    id: r.id, datasetId: r.datasetId, labId: r.labId, visibility: r.visibility,
    donor: d.system.donor.name, acceptor: d.system.acceptor.name, bridge: d.system.bridge?.name ?? '',
    classes: [d.system.donor.class, d.system.acceptor.class].filter(Boolean).join(' '),
    solvent: d.medium.solvent ?? d.medium.matrix ?? '', technique: d.technique.method, process: d.process, linkage: d.system.linkage,
    notes: d.notes ?? '', datasetTitle: r.title, lab: r.lab, keywords: r.keywords.join(' '),
    year: r.year, deltaG: r.deltaG, temperatureK: r.temperatureK, distance: r.distance, log10Rate: r.log10Rate,
    pekar: d.medium.permittivity && d.medium.refractiveIndex ? 1 / d.medium.refractiveIndex ** 2 - 1 / d.medium.permittivity : null
  }
}

/** Documents of the versions that matter for search: each dataset's newest version, and its newest published one. */
async function loadDocs (datasetIds?: number[]): Promise<SearchDoc[]> {
  const db = await useDb()
  const v = schema.datasetVersions
  const rows = await db.select({
    id: schema.rateRecords.id, data: schema.rateRecords.data, datasetId: v.datasetId, labId: schema.datasets.labId, state: v.state, versionNumber: v.versionNumber,
    embargo: v.embargoUntil, title: v.title, metadata: v.metadata, publishedAt: v.publishedAt, lab: schema.labs.name,
    deltaG: schema.rateRecords.deltaG, temperatureK: schema.rateRecords.temperatureK, distance: schema.rateRecords.distanceAngstrom, log10Rate: schema.rateRecords.log10Rate,
    newest: sql<number>`(select max(v2.version_number) from dataset_version v2 where v2.dataset_id = ${v.datasetId})`,
    newestPublished: sql<number>`(select max(v3.version_number) from dataset_version v3 where v3.dataset_id = ${v.datasetId} and v3.state = 'published')`
  }).from(schema.rateRecords).innerJoin(v, eq(v.id, schema.rateRecords.versionId)).innerJoin(schema.datasets, eq(schema.datasets.id, v.datasetId)).innerJoin(schema.labs, eq(schema.labs.id, schema.datasets.labId))
    .where(and(inArray(v.state, ['draft', 'returned', 'submitted', 'published']), datasetIds ? inArray(v.datasetId, datasetIds) : undefined))
  const today = new Date().toISOString().slice(0, 10)
  return rows.filter(r => r.versionNumber === r.newest || r.versionNumber === r.newestPublished).map(r => toDoc({
    ...r, data: r.data as unknown as RateRecordV1,
    visibility: r.state === 'published' && r.versionNumber === r.newestPublished ? (r.embargo && r.embargo > today ? 'embargo' : 'public') : r.state,
    keywords: ((r.metadata as { keywords?: string[] }).keywords ?? []), year: r.publishedAt ? r.publishedAt.getUTCFullYear() : null
  }))
}

async function build (): Promise<State> {
  const start = Date.now()
  const index = newIndex()
  const docs = await loadDocs()
  index.addAll(docs)
  const byDataset = new Map<number, number[]>()
  for (const d of docs) { const l = byDataset.get(d.datasetId) ?? []; l.push(d.id); byDataset.set(d.datasetId, l) }
  return { index, docs: new Map(docs.map(d => [d.id, d])), byDataset, lastSync: start, generation: 0 }
}

export function useSearch (): Promise<State> {
  if (!state) { state = build(); state.catch(() => { state = undefined }) }
  return state
}

/** Re-reads one or more datasets into the index (after a write here, or a change seen in the database). */
export async function reindexDatasets (ids: number[]): Promise<void> {
  if (!state || !ids.length) return
  const s = await state
  for (const id of ids) {
    const old = s.byDataset.get(id) ?? []
    for (const docId of old) if (s.index.has(docId)) s.index.discard(docId)
    for (const docId of old) s.docs.delete(docId)
    s.byDataset.delete(id)
  }
  const fresh = await loadDocs(ids)
  s.generation++
  resultCache.clear()
  s.index.addAll(fresh)
  for (const d of fresh) { s.docs.set(d.id, d); const l = s.byDataset.get(d.datasetId) ?? []; l.push(d.id); s.byDataset.set(d.datasetId, l) }
  if (s.index.dirtCount > 2000) s.index.vacuum().catch(() => {})
}

/** Picks up changes made by other instances: datasets whose versions changed since the last look. */
export async function syncFromDatabase (): Promise<number> {
  if (!state) return 0
  const s = await state
  const since = s.lastSync - 2000
  s.lastSync = Date.now()
  const db = await useDb()
  const changed = await db.selectDistinct({ id: schema.datasetVersions.datasetId }).from(schema.datasetVersions).where(gt(schema.datasetVersions.updatedAt, new Date(since)))
  await reindexDatasets(changed.map(c => c.id))
  return changed.length
}

export interface SearchQuery {
  q?: string, process?: string, solvent?: string, technique?: string, linkage?: string, labId?: number
  deltaGMin?: number, deltaGMax?: number, temperatureMin?: number, temperatureMax?: number, distanceMin?: number, distanceMax?: number, log10RateMin?: number, log10RateMax?: number
  yearMin?: number, yearMax?: number
  ids?: number[]
  sort?: string, page: number, pageSize: number
}

/**
 * Answers per (query, viewer's labs), dropped whenever the index changes: the same searches come
 * back again and again (shared links, paging back), and each costs a scan of the hits for facets.
 */
const resultCache = new Map<string, Promise<unknown>>()
const CACHE_SIZE = 1000

/** The search answer (shaped by `finish`, e.g. with the page's rows), cached until the index changes. */
export async function cachedSearch<T> (query: SearchQuery, viewer: Pick<Viewer, 'labIds'> | null, finish: (r: ReturnType<typeof runSearch>) => Promise<T>): Promise<T> {
  const s = await useSearch()
  const key = JSON.stringify([s.generation, query, [...(viewer?.labIds ?? [])].sort()])
  const hit = resultCache.get(key)
  if (hit) { resultCache.delete(key); resultCache.set(key, hit); return hit as Promise<T> }
  const res = finish(runSearch(s, query, viewer))
  resultCache.set(key, res)
  res.catch(() => resultCache.delete(key))
  if (resultCache.size > CACHE_SIZE) resultCache.delete(resultCache.keys().next().value!)
  return res
}

const inRange = (v: number | null, lo?: number, hi?: number) => (lo === undefined || (v !== null && v >= lo)) && (hi === undefined || (v !== null && v <= hi))

/** Hits with facet counts and value ranges; pure over the index, so the benchmark can call it. */
export function runSearch (s: Pick<State, 'index' | 'docs'>, query: SearchQuery, viewer: Pick<Viewer, 'labIds'> | null) {
  const labs = new Set(viewer?.labIds ?? [])
  const only = query.ids ? new Set(query.ids) : null
  const visible = (d: SearchDoc) => d.visibility === 'public' || labs.has(d.labId)
  const pass = (d: SearchDoc) => visible(d) && (!only || only.has(d.id)) &&
    (!query.process || d.process === query.process) && (!query.solvent || d.solvent === query.solvent) &&
    (!query.technique || d.technique === query.technique) && (!query.linkage || d.linkage === query.linkage) &&
    (!query.labId || d.labId === query.labId) &&
    inRange(d.deltaG, query.deltaGMin, query.deltaGMax) && inRange(d.temperatureK, query.temperatureMin, query.temperatureMax) &&
    inRange(d.distance, query.distanceMin, query.distanceMax) && inRange(d.log10Rate, query.log10RateMin, query.log10RateMax) &&
    inRange(d.year, query.yearMin, query.yearMax)
  let hits: { doc: SearchDoc, score: number }[]
  if (query.q?.trim()) {
    hits = s.index.search(query.q, { filter: r => pass(s.docs.get(r.id as number)!) }).map(r => ({ doc: s.docs.get(r.id as number)!, score: r.score }))
  } else if (only) {
    hits = [...only].map(id => s.docs.get(id)).filter((d): d is SearchDoc => !!d && pass(d)).map(d => ({ doc: d, score: 0 }))
  } else {
    hits = []
    for (const d of s.docs.values()) if (pass(d)) hits.push({ doc: d, score: 0 })
  }
  const facets: Record<string, Record<string, number>> = { process: {}, solvent: {}, technique: {}, linkage: {}, lab: {}, year: {} }
  const ranges = { deltaG: [Infinity, -Infinity], temperature: [Infinity, -Infinity], distance: [Infinity, -Infinity], log10Rate: [Infinity, -Infinity] }
  const widen = (r: number[], v: number | null) => { if (v !== null) { if (v < r[0]!) r[0] = v; if (v > r[1]!) r[1] = v } }
  for (const { doc: d } of hits) {
    facets.process![d.process] = (facets.process![d.process] ?? 0) + 1
    if (d.solvent) facets.solvent![d.solvent] = (facets.solvent![d.solvent] ?? 0) + 1
    facets.technique![d.technique] = (facets.technique![d.technique] ?? 0) + 1
    facets.linkage![d.linkage] = (facets.linkage![d.linkage] ?? 0) + 1
    facets.lab![d.lab] = (facets.lab![d.lab] ?? 0) + 1
    if (d.year) facets.year![String(d.year)] = (facets.year![String(d.year)] ?? 0) + 1
    widen(ranges.deltaG, d.deltaG); widen(ranges.temperature, d.temperatureK); widen(ranges.distance, d.distance); widen(ranges.log10Rate, d.log10Rate)
  }
  const key = query.sort?.replace(/^-/, '')
  const dir = query.sort?.startsWith('-') ? -1 : 1
  const get: Record<string, (d: SearchDoc) => number | string | null> = { deltaG: d => d.deltaG, log10Rate: d => d.log10Rate, temperature: d => d.temperatureK, distance: d => d.distance, donor: d => d.donor, acceptor: d => d.acceptor }
  if (key && get[key]) {
    const g = get[key]!
    hits.sort((a, b) => { const x = g(a.doc); const y = g(b.doc); if (x === null) return 1; if (y === null) return -1; return (x < y ? -1 : x > y ? 1 : 0) * dir })
  }
  const start = (query.page - 1) * query.pageSize
  return {
    total: hits.length,
    ids: hits.slice(start, start + query.pageSize).map(h => ({ id: h.doc.id, score: h.score })),
    facets,
    ranges: Object.fromEntries(Object.entries(ranges).map(([k, [lo, hi]]) => [k, Number.isFinite(lo) ? { min: lo, max: hi } : null]))
  }
}

/** Call after any write that changes what a dataset's records look like to search. */
export async function afterDatasetChange (datasetId: number): Promise<void> {
  await reindexDatasets([datasetId])
}

// ── similar systems ──────────────────────────────────────────────────────────────────────
function trigrams (s: string): Set<string> {
  const t = ` ${s.toLowerCase()} `
  const out = new Set<string>()
  for (let i = 0; i + 3 <= t.length; i++) out.add(t.slice(i, i + 3))
  return out
}
function jaccard (a: Set<string>, b: Set<string>): number {
  let inter = 0
  for (const x of a) if (b.has(x)) inter++
  return inter / (a.size + b.size - inter || 1)
}

/**
 * The documented similarity score (0–1): a weighted mean over the features both records have of
 * Gaussian closeness in ΔG° (scale 0.25 eV), solvent polarity 1/n² − 1/ε (0.08), distance (3 Å) and
 * temperature (40 K), equality of process and linkage, and a name resemblance (character-trigram
 * Jaccard of donor and acceptor names and classes), which stands in for structure fingerprints
 * until records carry structures. Scales are common practice, chosen to make "similar" mean
 * "within typical experimental spread".
 */
export const SIMILARITY_WEIGHTS = { deltaG: 0.3, polarity: 0.15, distance: 0.15, temperature: 0.1, process: 0.1, linkage: 0.1, names: 0.1 }

export function similarity (a: SearchDoc, b: SearchDoc) {
  const parts: { feature: string, closeness: number, weight: number, detail: string }[] = []
  const gauss = (x: number, scale: number) => Math.exp(-((x / scale) ** 2))
  if (a.deltaG !== null && b.deltaG !== null) parts.push({ feature: 'deltaG', closeness: gauss(a.deltaG - b.deltaG, 0.25), weight: SIMILARITY_WEIGHTS.deltaG, detail: `ΔG° ${b.deltaG.toFixed(2)} vs ${a.deltaG.toFixed(2)} eV` })
  if (a.pekar !== null && b.pekar !== null) parts.push({ feature: 'polarity', closeness: gauss(a.pekar - b.pekar, 0.08), weight: SIMILARITY_WEIGHTS.polarity, detail: `1/n² − 1/ε ${b.pekar.toFixed(3)} vs ${a.pekar.toFixed(3)} (${b.solvent || '—'})` })
  if (a.distance !== null && b.distance !== null) parts.push({ feature: 'distance', closeness: gauss(a.distance - b.distance, 3), weight: SIMILARITY_WEIGHTS.distance, detail: `R ${b.distance.toFixed(1)} vs ${a.distance.toFixed(1)} Å` })
  parts.push({ feature: 'temperature', closeness: gauss(a.temperatureK - b.temperatureK, 40), weight: SIMILARITY_WEIGHTS.temperature, detail: `T ${b.temperatureK} vs ${a.temperatureK} K` })
  parts.push({ feature: 'process', closeness: a.process === b.process ? 1 : 0, weight: SIMILARITY_WEIGHTS.process, detail: a.process === b.process ? `same process (${b.process})` : `other process (${b.process})` })
  parts.push({ feature: 'linkage', closeness: a.linkage === b.linkage ? 1 : 0, weight: SIMILARITY_WEIGHTS.linkage, detail: a.linkage === b.linkage ? `same linkage (${b.linkage})` : `other linkage (${b.linkage})` })
  const na = trigrams(`${a.donor} ${a.acceptor} ${a.classes}`); const nb = trigrams(`${b.donor} ${b.acceptor} ${b.classes}`)
  parts.push({ feature: 'names', closeness: jaccard(na, nb), weight: SIMILARITY_WEIGHTS.names, detail: `${b.donor} → ${b.acceptor}` })
  const w = parts.reduce((s, p) => s + p.weight, 0)
  const score = parts.reduce((s, p) => s + p.weight * p.closeness, 0) / w
  return { score, why: parts.map(p => ({ feature: p.feature, closeness: Number(p.closeness.toFixed(3)), contribution: Number((p.weight * p.closeness / w).toFixed(3)), detail: p.detail })) }
}

export function similarTo (s: Pick<State, 'docs'>, id: number, viewer: Pick<Viewer, 'labIds'> | null, limit: number) {
  const me = s.docs.get(id)
  if (!me) return null
  const labs = new Set(viewer?.labIds ?? [])
  const out: { id: number, score: number, why: ReturnType<typeof similarity>['why'] }[] = []
  for (const d of s.docs.values()) {
    if (d.id === id || !(d.visibility === 'public' || labs.has(d.labId))) continue
    const r = similarity(me, d)
    out.push({ id: d.id, score: r.score, why: r.why })
  }
  out.sort((a, b) => b.score - a.score)
  return out.slice(0, limit)
}
