/** What the record index is fed and answers, and the columns it keeps (see search-index.ts). */

/** What the index is fed for one record (rows → documents happens in search.ts). */
export interface SearchDoc {
  id: number
  datasetId: number
  labId: number
  /** 'public' for the newest published, out-of-embargo version; otherwise the version's state (its lab only). */
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
  donorSmiles?: string | null
  acceptorSmiles?: string | null
}

export const FACET_FIELDS = ['process', 'solvent', 'technique', 'linkage', 'lab'] as const
export const TEXT_FIELDS = [
  'donor',
  'acceptor',
  'bridge',
  'classes',
  'solvent',
  'technique',
  'process',
  'linkage',
  'notes',
  'datasetTitle',
  'lab',
  'keywords'
] as const
export type TextField = (typeof TEXT_FIELDS)[number]
export const FIELD_NO = Object.fromEntries(TEXT_FIELDS.map((f, i) => [f, i])) as Record<TextField, number>

/** Prefix matching from 3 characters and typo tolerance (at most 2 edits) from 5: short terms explode the candidate set. */
export const SEARCH_OPTIONS = {
  prefix: (term: string) => term.length >= 3,
  fuzzy: (term: string) => (term.length >= 5 ? 0.2 : false),
  maxFuzzy: 2,
  boost: { donor: 3, acceptor: 3, bridge: 2, classes: 2, datasetTitle: 1.5, solvent: 1.5 }
}
/** Query terms beyond this many are ignored (one bit each in the per-record mask). */
export const MAX_QUERY_TERMS = 30

export interface SearchQuery {
  q?: string
  process?: string
  solvent?: string
  technique?: string
  linkage?: string
  labId?: number
  deltaGMin?: number
  deltaGMax?: number
  temperatureMin?: number
  temperatureMax?: number
  distanceMin?: number
  distanceMax?: number
  log10RateMin?: number
  log10RateMax?: number
  yearMin?: number
  yearMax?: number
  ids?: number[]
  sort?: string
  page: number
  pageSize: number
}
export interface SearchAnswer {
  total: number
  ids: { id: number, score: number }[]
  facets: Record<'process' | 'solvent' | 'technique' | 'linkage' | 'lab' | 'year', Record<string, number>>
  ranges: Record<'deltaG' | 'temperature' | 'distance' | 'log10Rate', { min: number, max: number } | null>
}

/** Publication years counted in the year facet. */
export const FIRST_YEAR = 1950
export const YEAR_SPAN = 200
export const NUMBERS = ['deltaG', 'temperatureK', 'distance', 'log10Rate', 'pekar'] as const
export type NumberColumn = (typeof NUMBERS)[number]

export function grow<T extends Float64Array | Int32Array | Uint8Array> (a: T, size: number): T {
  if (a.length >= size) return a
  const b = new (a.constructor as new (n: number) => T)(Math.max(size, a.length * 2, 1024))
  b.set(a)
  return b
}
