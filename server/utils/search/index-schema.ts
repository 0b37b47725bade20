/** What the record index is fed and answers, and the columns it keeps (see record-index.ts). */
import MiniSearch from 'minisearch'

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
export const FACET_FIELD_NOS = FACET_FIELDS.map(f => FIELD_NO[f])
/** Notes are indexed per record (index-notes.ts), not as shared values. */
export const NOTES = FIELD_NO.notes
/** Numbers kept per facet tuple: one per facet field, then the year. */
export const TUPLE_WIDTH = FACET_FIELDS.length + 1

/** Prefix matching from 3 characters and typo tolerance (at most 2 edits) from 5: short terms explode the candidate set. */
/**
 * Typo tolerance: one edit from 5 letters, two from 6 (a swapped pair of letters is two edits: "toleune",
 * "proetin" and "iriidum" find toluene, protein and iridium).
 */
export const SEARCH_OPTIONS = {
  prefix: (term: string) => term.length >= 3,
  fuzzy: (term: string) => (term.length >= 6 ? 2 : term.length >= 5 ? 1 : false),
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
  /** The query with unknown words replaced by the nearest indexed ones ("did you mean"). */
  suggestion?: string
  facets: Record<'process' | 'solvent' | 'technique' | 'linkage' | 'lab' | 'year', Record<string, number>>
  ranges: Record<'deltaG' | 'temperature' | 'distance' | 'log10Rate', { min: number, max: number } | null>
}

/** Publication years counted in the year facet. */
export const FIRST_YEAR = 1950
export const YEAR_SPAN = 200
export const NUMBERS = ['deltaG', 'temperatureK', 'distance', 'log10Rate', 'pekar'] as const
export type NumberColumn = (typeof NUMBERS)[number]

export function grow<T extends Float64Array | Int32Array | Uint16Array | Uint8Array> (a: T, size: number): T {
  if (a.length >= size) return a
  const b = new (a.constructor as new (n: number) => T)(Math.max(size, a.length * 2, 1024))
  b.set(a)
  return b
}

/**
 * Substituent and multiplier prefixes of systematic names: "N,N-dimethylaniline" is also indexed as
 * "methylaniline" and "aniline", so that the parent compound finds its derivatives (common practice in
 * chemical text search; the list is the usual substituent prefixes of IUPAC names).
 */
const NAME_PREFIXES = ['di', 'tri', 'tetra', 'bis', 'tris', 'methyl', 'ethyl', 'propyl', 'butyl', 'tert', 'phenyl',
  'benzyl', 'methoxy', 'ethoxy', 'amino', 'nitro', 'cyano', 'chloro', 'bromo', 'fluoro', 'iodo', 'hydroxy', 'oxo', 'aza']
// minisearch's own tokenizer (split on spaces and punctuation), extended below, not written again
const DEFAULT_TOKENIZE = MiniSearch.getDefault('tokenize') as (text: string) => string[]
/**
 * Free-text notes: numbers standing alone ("record 123456", "run 17") are not indexed. In notes nearly every such
 * number is different, and at a million records they were half the index's terms and memory; words (and codes
 * with letters, "S1234", "C60") are indexed as everywhere else.
 */
const NUMBER_ONLY = /^\d+$/
export function indexTokenize (text: string, field?: string): string[] {
  const out: string[] = []
  for (const token of DEFAULT_TOKENIZE(text)) {
    if (field === 'notes' && NUMBER_ONLY.test(token)) continue
    out.push(token)
    let rest = token.toLowerCase()
    for (let guard = 0; rest.length >= 8 && guard < 6; guard++) {
      const p = NAME_PREFIXES.find(x => rest.startsWith(x) && rest.length - x.length >= 4)
      if (!p) break
      rest = rest.slice(p.length)
      out.push(rest)
    }
  }
  return out
}
export { DEFAULT_TOKENIZE as queryTokenize }

/**
 * Names people type for what records write as abbreviations (and the reverse is found anyway, as the
 * abbreviation is a word of the record): the query phrase is searched as the abbreviation.
 */
export const SEARCH_SYNONYMS: [RegExp, string][] = [
  [/\bzinc[\s-]+porphyrins?\b/g, 'ZnP'],
  [/\bfree[\s-]+base[\s-]+porphyrins?\b/g, 'H2P'],
  [/\bperylene[\s-]+di-?imides?\b/g, 'PDI'],
  [/\bnaphthalene[\s-]+di-?imides?\b/g, 'NDI'],
  [/\bpyromellitic[\s-]+di-?imides?\b/g, 'PMI'],
  [/\bmethyl[\s-]+viologen\b/g, 'MV'],
  [/\bbuckminsterfullerene\b/g, 'C60']
]
export function expandSynonyms (q: string): string {
  let out = q.toLowerCase()
  for (const [re, to] of SEARCH_SYNONYMS) out = out.replace(re, to)
  return out
}
