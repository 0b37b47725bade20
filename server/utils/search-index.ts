/**
 * The in-memory record index behind search, facets and similar systems; pure (no database), so the
 * benchmark and unit tests can feed it synthetic records.
 *
 * Text: minisearch indexes each distinct field value once (a donor name, a solvent, a dataset title),
 * not each record: records of one archive repeat the same names, solvents and titles thousands of
 * times, and minisearch's per-hit result objects were the whole cost of a query at 100 000 records
 * (≈ 200 ms for one common term). minisearch still does all the text work — tokenising, prefix and
 * typo matching, BM25 weighting with field boosts; a posting list per value then maps each matched
 * value to its records, and a bitmask per record keeps the AND semantics across query terms.
 *
 * Records: one slot per record in typed-array columns (numbers as Float64 with NaN for "none",
 * text as value ids), so filters, facet counts and ranges are tight loops without per-record objects.
 */
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

const FACET_FIELDS = ['process', 'solvent', 'technique', 'linkage', 'lab'] as const
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
type TextField = (typeof TEXT_FIELDS)[number]
const FIELD_NO = Object.fromEntries(TEXT_FIELDS.map((f, i) => [f, i])) as Record<TextField, number>

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
const FIRST_YEAR = 1950
const YEAR_SPAN = 200
const NUMBERS = ['deltaG', 'temperatureK', 'distance', 'log10Rate', 'pekar'] as const
type NumberColumn = (typeof NUMBERS)[number]

function grow<T extends Float64Array | Int32Array | Uint8Array> (a: T, size: number): T {
  if (a.length >= size) return a
  const b = new (a.constructor as new (n: number) => T)(Math.max(size, a.length * 2, 1024))
  b.set(a)
  return b
}

export class RecordIndex {
  /** minisearch over distinct values: document id = value id, the text in the field it came from. */
  readonly text = new MiniSearch<{ id: number } & Partial<Record<TextField, string>>>({
    fields: [...TEXT_FIELDS],
    storeFields: [],
    idField: 'id',
    searchOptions: SEARCH_OPTIONS
  })

  // value dictionary (text fields and SMILES share it; SMILES are not put into minisearch)
  private valueKey = new Map<string, number>()
  private valueText: string[] = []
  private valueField: number[] = []
  private postings: number[][] = []
  /** Position of a value among its field's values, and each field's values (for facet counts). */
  private valueLocal: number[] = []
  private fieldValues: number[][] = TEXT_FIELDS.map(() => [])
  // record columns, one slot per record
  private n = 0
  private free: number[] = []
  private slotOf = new Map<number, number>()
  private idCol = new Int32Array(0)
  private datasetCol = new Int32Array(0)
  private labCol = new Int32Array(0)
  private yearCol = new Int32Array(0)
  /** 0 = empty slot, 1 = public, 2 = its lab only. */
  private visCol = new Uint8Array(0)
  private num: Record<NumberColumn, Float64Array> = Object.fromEntries(
    NUMBERS.map(k => [k, new Float64Array(0)])
  ) as never

  private textCol: Int32Array[] = TEXT_FIELDS.map(() => new Int32Array(0))
  /** For facet fields: 1 + the value's position among its field's values, 0 for none. */
  private facetCol: Int32Array[] = TEXT_FIELDS.map(() => new Int32Array(0))
  private smilesCol = [new Int32Array(0), new Int32Array(0)]
  private byDataset = new Map<number, Set<number>>()
  /** Morgan fingerprints by SMILES value id (see structures.ts). */
  private fingerprints = new Map<number, Uint32Array>()
  // scratch for queries (JavaScript runs one query at a time)
  private mask = new Int32Array(0)
  private score = new Float64Array(0)
  private touched = new Int32Array(0)
  /** Bumped on every change; answers cached elsewhere key on it. */
  generation = 0

  get size () {
    return this.slotOf.size
  }

  has (id: number) {
    return this.slotOf.has(id)
  }

  private valueId (field: number, text: string): number {
    const key = `${field}\u0000${text}`
    let v = this.valueKey.get(key)
    if (v === undefined) {
      v = this.valueText.length
      this.valueKey.set(key, v)
      this.valueText.push(text)
      this.valueField.push(field)
      this.postings.push([])
      const own = this.fieldValues[field]
      this.valueLocal.push(own ? own.push(v) - 1 : -1)
    }
    return v
  }

  private pendingText: ({ id: number } & Partial<Record<TextField, string>>)[] = []

  /** Adds records (or replaces them when the id is already there). */
  add (docs: Iterable<SearchDoc>) {
    for (const d of docs) {
      if (this.slotOf.has(d.id)) this.removeIds([d.id])
      const slot = this.free.pop() ?? this.n++
      this.ensure(slot + 1)
      this.slotOf.set(d.id, slot)
      this.idCol[slot] = d.id
      this.datasetCol[slot] = d.datasetId
      this.labCol[slot] = d.labId
      this.yearCol[slot] = d.year ?? 0
      this.visCol[slot] = d.visibility === 'public' ? 1 : 2
      for (const k of NUMBERS) this.num[k][slot] = d[k] ?? NaN
      for (let f = 0; f < TEXT_FIELDS.length; f++) {
        const t = d[TEXT_FIELDS[f]!]
        const v = t ? this.valueId(f, t) : -1
        this.textCol[f]![slot] = v
        this.facetCol[f]![slot] = v >= 0 ? this.valueLocal[v]! + 1 : 0
        if (v >= 0) {
          const list = this.postings[v]!
          // a value enters the text index with its first record (again, after its last one left)
          if (!list.length) this.pendingText.push({ id: v, [TEXT_FIELDS[f]!]: t })
          list.push(slot)
        }
      }
      const sm = [d.donorSmiles, d.acceptorSmiles]
      for (let i = 0; i < 2; i++) this.smilesCol[i]![slot] = sm[i] ? this.valueId(TEXT_FIELDS.length + i, sm[i]!) : -1
      let set = this.byDataset.get(d.datasetId)
      if (!set) this.byDataset.set(d.datasetId, (set = new Set()))
      set.add(d.id)
    }
    if (this.pendingText.length) {
      this.text.addAll(this.pendingText)
      this.pendingText = []
    }
    this.generation++
  }

  private ensure (size: number) {
    if (this.idCol.length >= size) return
    this.idCol = grow(this.idCol, size)
    this.datasetCol = grow(this.datasetCol, size)
    this.labCol = grow(this.labCol, size)
    this.yearCol = grow(this.yearCol, size)
    this.visCol = grow(this.visCol, size)
    for (const k of NUMBERS) this.num[k] = grow(this.num[k], size)
    this.textCol = this.textCol.map(c => grow(c, size))
    this.facetCol = this.facetCol.map((c, f) =>
      (FACET_FIELDS as readonly string[]).includes(TEXT_FIELDS[f]!) ? grow(c, size) : c
    )
    this.smilesCol = this.smilesCol.map(c => grow(c, size))
  }

  /** Drops every record of these datasets (before they are read again). */
  removeDatasets (datasetIds: number[]) {
    const ids: number[] = []
    for (const d of datasetIds) for (const id of this.byDataset.get(d) ?? []) ids.push(id)
    this.removeIds(ids)
  }

  private removeIds (ids: number[]) {
    if (!ids.length) return
    const gone = new Set<number>()
    const touched = new Set<number>()
    for (const id of ids) {
      const slot = this.slotOf.get(id)
      if (slot === undefined) continue
      gone.add(slot)
      this.slotOf.delete(id)
      this.visCol[slot] = 0
      this.free.push(slot)
      this.byDataset.get(this.datasetCol[slot]!)?.delete(id)
      for (let f = 0; f < TEXT_FIELDS.length; f++) {
        const v = this.textCol[f]![slot]!
        if (v >= 0) touched.add(v)
      }
    }
    for (const v of touched) {
      const left = this.postings[v]!.filter(s => !gone.has(s))
      this.postings[v] = left
      // a value no record holds any more leaves the text index, so it neither matches nor weighs in BM25
      if (!left.length && this.text.has(v)) this.text.discard(v)
    }
    if (this.text.dirtCount > 5000) this.text.vacuum().catch(() => {})
    this.generation++
  }

  /** Stores the Morgan fingerprint of one SMILES (as given in records). */
  setFingerprint (smiles: string, bits: Uint32Array) {
    for (const f of [TEXT_FIELDS.length, TEXT_FIELDS.length + 1]) {
      const v = this.valueKey.get(`${f}\u0000${smiles}`)
      if (v !== undefined) this.fingerprints.set(v, bits)
    }
  }

  /** SMILES in the index that have no fingerprint yet. */
  smilesWithoutFingerprint (): string[] {
    const out = new Set<string>()
    for (let v = 0; v < this.valueText.length; v++)
      if (this.valueField[v]! >= TEXT_FIELDS.length && !this.fingerprints.has(v) && this.postings[v])
        out.add(this.valueText[v]!)
    return [...out]
  }

  /** One record as the index sees it (for explanations and tests). */
  doc (id: number): SearchDoc | undefined {
    const s = this.slotOf.get(id)
    if (s === undefined) return undefined
    const text = (f: number) => {
      const v = this.textCol[f]![s]!
      return v >= 0 ? this.valueText[v]! : ''
    }
    const nul = (x: number) => (Number.isNaN(x) ? null : x)
    return {
      id,
      datasetId: this.datasetCol[s]!,
      labId: this.labCol[s]!,
      visibility: this.visCol[s] === 1 ? 'public' : 'lab',
      ...(Object.fromEntries(TEXT_FIELDS.map((f, i) => [f, text(i)])) as Record<TextField, string>),
      year: this.yearCol[s] || null,
      deltaG: nul(this.num.deltaG[s]!),
      temperatureK: this.num.temperatureK[s]!,
      distance: nul(this.num.distance[s]!),
      log10Rate: this.num.log10Rate[s]!,
      pekar: nul(this.num.pekar[s]!),
      donorSmiles: this.smilesCol[0]![s]! >= 0 ? this.valueText[this.smilesCol[0]![s]!] : null,
      acceptorSmiles: this.smilesCol[1]![s]! >= 0 ? this.valueText[this.smilesCol[1]![s]!] : null
    }
  }

  private visibleTo (labs: Set<number>) {
    const vis = this.visCol
    const lab = this.labCol
    return labs.size ? (s: number) => vis[s] === 1 || (vis[s] === 2 && labs.has(lab[s]!)) : (s: number) => vis[s] === 1
  }

  /**
   * Narrows a list of slots to those passing the query's filters (visibility, lab, facet values by
   * value id, ranges), one tight loop per filter over the columns; false when a facet value is unknown.
   */
  private narrow (sel: Int32Array, len: number, query: SearchQuery, labs: Set<number>): number {
    // Written out loop by loop on purpose: one shared loop calling a test closure per record was
    // twice as slow (the call site sees many closures and V8 stops inlining).
    const vis = this.visCol
    const lab = this.labCol
    let j = 0
    if (labs.size) {
      for (let i = 0; i < len; i++) {
        const s = sel[i]!
        if (vis[s] === 1 || (vis[s] === 2 && labs.has(lab[s]!))) sel[j++] = s
      }
    }
    else {
      for (let i = 0; i < len; i++) {
        const s = sel[i]!
        if (vis[s] === 1) sel[j++] = s
      }
    }
    len = j
    if (query.labId) {
      const want = query.labId
      j = 0
      for (let i = 0; i < len; i++) {
        const s = sel[i]!
        if (lab[s] === want) sel[j++] = s
      }
      len = j
    }
    for (const f of ['process', 'solvent', 'technique', 'linkage'] as const) {
      const want = query[f]
      if (!want) continue
      const v = this.valueKey.get(`${FIELD_NO[f]}\u0000${want}`)
      if (v === undefined) return 0
      const col = this.textCol[FIELD_NO[f]]!
      j = 0
      for (let i = 0; i < len; i++) {
        const s = sel[i]!
        if (col[s] === v) sel[j++] = s
      }
      len = j
    }
    // NaN (no value) fails every comparison, so a record without the value is outside any range
    const ranges: [Float64Array | Int32Array, number | undefined, number | undefined][] = [
      [this.num.deltaG, query.deltaGMin, query.deltaGMax],
      [this.num.temperatureK, query.temperatureMin, query.temperatureMax],
      [this.num.distance, query.distanceMin, query.distanceMax],
      [this.num.log10Rate, query.log10RateMin, query.log10RateMax],
      [
        this.yearCol,
        query.yearMin === undefined && query.yearMax === undefined ? undefined : (query.yearMin ?? 1),
        query.yearMax
      ] // 0 = no year, below any minimum
    ]
    for (const [col, min, max] of ranges) {
      if (min === undefined && max === undefined) continue
      const lo = min ?? -Infinity
      const hi = max ?? Infinity
      j = 0
      for (let i = 0; i < len; i++) {
        const s = sel[i]!
        const x = col[s]!
        if (x >= lo && x <= hi) sel[j++] = s
      }
      len = j
    }
    return len
  }

  /** Hits with facet counts and value ranges. */
  search (query: SearchQuery, viewer: { labIds: number[] } | null): SearchAnswer {
    const labs = new Set(viewer?.labIds ?? [])
    let sel: Int32Array
    let len = 0
    const scored = !!query.q?.trim()
    if (scored) {
      sel = this.textHits(query.q!)
      len = sel.length
    }
    else if (query.ids) {
      sel = new Int32Array(query.ids.length)
      for (const id of new Set(query.ids)) {
        const s = this.slotOf.get(id)
        if (s !== undefined) sel[len++] = s
      }
    }
    else {
      // the visibility test is done here already for the common case (a visitor)
      sel = new Int32Array(this.n)
      const vis = this.visCol
      if (labs.size) {
        for (let s = 0; s < this.n; s++) if (vis[s]) sel[len++] = s
      }
      else {
        for (let s = 0; s < this.n; s++) if (vis[s] === 1) sel[len++] = s
      }
    }
    len = this.narrow(sel, len, query, labs)
    const hits = sel.subarray(0, len)
    const page = this.order(hits, query, scored)
    return {
      total: len,
      ids: page.map(s => ({ id: this.idCol[s]!, score: scored ? this.score[s]! : 0 })),
      ...this.summarise(hits)
    }
  }

  /** Slots of the records whose values match every query term, scored (score left in this.score). */
  private textHits (q: string): Int32Array {
    const tokenize = MiniSearch.getDefault('tokenize') as (t: string) => string[]
    const process = MiniSearch.getDefault('processTerm') as (t: string) => string | null | undefined
    const bit = new Map<string, number>()
    for (const t of tokenize(q)) {
      const p = process(t)
      if (p && !bit.has(p) && bit.size < MAX_QUERY_TERMS) bit.set(p, 1 << bit.size)
    }
    if (!bit.size) return new Int32Array(0)
    const full = (1 << bit.size) - 1
    const results = this.text.search([...bit.keys()].join(' '), { combineWith: 'OR' })
    if (this.mask.length < this.n) {
      this.mask = new Int32Array(this.idCol.length)
      this.score = new Float64Array(this.idCol.length)
    }
    const mask = this.mask
    const score = this.score
    if (this.touched.length < this.n) this.touched = new Int32Array(this.mask.length)
    const touched = this.touched
    let nt = 0
    for (const r of results) {
      let bits = 0
      for (const t of r.queryTerms) bits |= bit.get(t) ?? 0
      const list = this.postings[r.id as number]!
      const sc = r.score
      for (let i = 0; i < list.length; i++) {
        const s = list[i]!
        if (mask[s] === 0) {
          touched[nt++] = s
          score[s] = sc
        }
        else score[s]! += sc
        mask[s]! |= bits
      }
    }
    const hits = new Int32Array(nt)
    let n = 0
    for (let i = 0; i < nt; i++) {
      const s = touched[i]!
      if (mask[s] === full) hits[n++] = s
      mask[s] = 0
    }
    return hits.subarray(0, n)
  }

  /** The slots of the requested page, in the requested order (only the first page·size are ordered). */
  private order (hits: Int32Array, query: SearchQuery, scored: boolean): number[] {
    const ids = this.idCol
    const key = query.sort?.replace(/^-/, '')
    const dir = query.sort?.startsWith('-') ? -1 : 1
    let cmp: (a: number, b: number) => number
    if (key === 'donor' || key === 'acceptor') {
      const col = this.textCol[FIELD_NO[key]]!
      const text = this.valueText
      cmp = (a, b) => {
        const x = text[col[a]!] ?? ''
        const y = text[col[b]!] ?? ''
        return (x < y ? -1 : x > y ? 1 : 0) * dir || ids[a]! - ids[b]!
      }
    }
    else if (key && ['deltaG', 'log10Rate', 'temperature', 'distance'].includes(key)) {
      const col = this.num[key === 'temperature' ? 'temperatureK' : (key as NumberColumn)]
      cmp = (a, b) => {
        const x = col[a]!
        const y = col[b]!
        if (Number.isNaN(x) || Number.isNaN(y)) return Number.isNaN(x) ? (Number.isNaN(y) ? ids[a]! - ids[b]! : 1) : -1 // no value: last
        return (x - y) * dir || ids[a]! - ids[b]!
      }
    }
    else if (scored) {
      const sc = this.score
      cmp = (a, b) => sc[b]! - sc[a]! || ids[a]! - ids[b]!
    }
    else {
      cmp = (a, b) => ids[a]! - ids[b]!
    }
    const start = (query.page - 1) * query.pageSize
    return topK(hits, start + query.pageSize, cmp).slice(start)
  }

  /** Facet counts and value ranges of the hits, in one pass over them. */
  private summarise (hits: Int32Array): Pick<SearchAnswer, 'facets' | 'ranges'> {
    const fields = FACET_FIELDS.map(f => FIELD_NO[f])
    const [c0, c1, c2, c3, c4] = fields.map(f => this.facetCol[f]!) as [
      Int32Array,
      Int32Array,
      Int32Array,
      Int32Array,
      Int32Array
    ]
    const [n0, n1, n2, n3, n4] = fields.map(f => new Int32Array(this.fieldValues[f]!.length + 1)) as [
      Int32Array,
      Int32Array,
      Int32Array,
      Int32Array,
      Int32Array
    ]
    const byYear = new Int32Array(YEAR_SPAN)
    const yc = this.yearCol
    const dg = this.num.deltaG
    const tk = this.num.temperatureK
    const ds = this.num.distance
    const lk = this.num.log10Rate
    let dgLo = Infinity
    let dgHi = -Infinity
    let tLo = Infinity
    let tHi = -Infinity
    let dLo = Infinity
    let dHi = -Infinity
    let kLo = Infinity
    let kHi = -Infinity
    for (let i = 0; i < hits.length; i++) {
      const s = hits[i]!
      // facet columns hold 1 + the value's position in its field (0 = none), so no test is needed
      n0[c0[s]!]!++
      n1[c1[s]!]!++
      n2[c2[s]!]!++
      n3[c3[s]!]!++
      n4[c4[s]!]!++
      const y = yc[s]! - FIRST_YEAR
      if (y >= 0 && y < YEAR_SPAN) byYear[y]!++
      // NaN (no value) never wins a comparison
      let x = dg[s]!
      if (x < dgLo) dgLo = x
      if (x > dgHi) dgHi = x
      x = tk[s]!
      if (x < tLo) tLo = x
      if (x > tHi) tHi = x
      x = ds[s]!
      if (x < dLo) dLo = x
      if (x > dHi) dHi = x
      x = lk[s]!
      if (x < kLo) kLo = x
      if (x > kHi) kHi = x
    }
    const named = (counts: Int32Array, f: number) => {
      const own = this.fieldValues[f]!
      const out: [string, number][] = []
      for (let i = 1; i < counts.length; i++) if (counts[i]) out.push([this.valueText[own[i - 1]!]!, counts[i]!])
      return Object.fromEntries(out.sort((a, b) => b[1] - a[1]))
    }
    const years: [string, number][] = []
    for (let y = 0; y < YEAR_SPAN; y++) if (byYear[y]) years.push([String(FIRST_YEAR + y), byYear[y]!])
    const range = (lo: number, hi: number) => (Number.isFinite(lo) ? { min: lo, max: hi } : null)
    const [process, solvent, technique, linkage, lab] = [n0, n1, n2, n3, n4].map((c, i) => named(c, fields[i]!))
    return {
      facets: {
        process: process!,
        solvent: solvent!,
        technique: technique!,
        linkage: linkage!,
        lab: lab!,
        year: Object.fromEntries(years)
      },
      ranges: {
        deltaG: range(dgLo, dgHi),
        temperature: range(tLo, tHi),
        distance: range(dLo, dHi),
        log10Rate: range(kLo, kHi)
      }
    }
  }

  /**
   * Records most like one record, by the documented score (see SIMILARITY below): a scan over the
   * columns with per-value caches, so only distinct names and structures are compared.
   */
  similar (id: number, viewer: { labIds: number[] } | null, limit: number) {
    const me = this.slotOf.get(id)
    if (me === undefined) return null
    const visible = this.visibleTo(new Set(viewer?.labIds ?? []))
    const nameCache = new Map<number, Map<number, number>>()
    const fpCache = new Map<number, number>()
    const mine = this.features(me)
    const w = SIMILARITY_WEIGHTS
    const { deltaG, pekar, distance, temperatureK } = this.num
    const proc = this.textCol[FIELD_NO.process]!
    const link = this.textCol[FIELD_NO.linkage]!
    const don = this.textCol[FIELD_NO.donor]!
    const acc = this.textCol[FIELD_NO.acceptor]!
    const cls = this.textCol[FIELD_NO.classes]!
    const [dfp, afp] = this.smilesCol as [Int32Array, Int32Array]
    const g = (x: number, scale: number) => Math.exp(-((x / scale) ** 2))
    const scores = new Float64Array(this.n).fill(-1)
    // The same score as compare() below, unrolled over the columns (no objects per record).
    for (let s = 0; s < this.n; s++) {
      if (s === me || !this.visCol[s] || !visible(s)) continue
      let sum
        = w.temperature * g(mine.temperatureK - temperatureK[s]!, 40)
          + w.process * (mine.process === proc[s] ? 1 : 0)
          + w.linkage * (mine.linkage === link[s] ? 1 : 0)
      let total = w.temperature + w.process + w.linkage
      const x = deltaG[s]!
      if (!Number.isNaN(x) && !Number.isNaN(mine.deltaG)) {
        sum += w.deltaG * g(mine.deltaG - x, 0.25)
        total += w.deltaG
      }
      const p = pekar[s]!
      if (!Number.isNaN(p) && !Number.isNaN(mine.pekar)) {
        sum += w.polarity * g(mine.pekar - p, 0.08)
        total += w.polarity
      }
      const r = distance[s]!
      if (!Number.isNaN(r) && !Number.isNaN(mine.distance)) {
        sum += w.distance * g(mine.distance - r, 3)
        total += w.distance
      }
      const st = this.structureCloseness(mine, dfp[s]!, afp[s]!, fpCache)
      if (st) {
        sum += w.structure * st.closeness
        total += w.structure
      }
      else {
        sum += w.names * this.nameCloseness(mine, don[s]!, acc[s]!, cls[s]!, nameCache)
        total += w.names
      }
      scores[s] = sum / total
    }
    const cand: number[] = []
    for (let s = 0; s < this.n; s++) if (scores[s]! >= 0) cand.push(s)
    const ids = this.idCol
    return topK(cand, limit, (a, b) => scores[b]! - scores[a]! || ids[a]! - ids[b]!).map((s) => {
      const r = this.compare(mine, this.features(s), nameCache, fpCache)
      return { id: ids[s]!, score: r.score, why: r.why }
    })
  }

  /** Mean Tanimoto over the species (donor, acceptor) whose fingerprints both records have; null when none. */
  private structureCloseness (a: Features, donorFp: number, acceptorFp: number, cache: Map<number, number>) {
    let sum = 0
    let n = 0
    const species: { label: string, t: number }[] = []
    for (const [x, y, k] of [
      [a.donorFp, donorFp, 0],
      [a.acceptorFp, acceptorFp, 1]
    ] as const) {
      if (x < 0 || y < 0) continue
      const fx = this.fingerprints.get(x)
      const fy = this.fingerprints.get(y)
      if (!fx || !fy) continue
      let t = x === y ? 1 : cache.get(y * 2 + k)
      if (t === undefined) {
        t = tanimoto(fx, fy)
        cache.set(y * 2 + k, t)
      }
      sum += t
      n++
      species.push({ label: k ? 'acceptor' : 'donor', t })
    }
    return n ? { closeness: sum / n, species } : null
  }

  /** Character-trigram Jaccard of "donor acceptor classes", cached per distinct triple. */
  private nameCloseness (
    a: Features,
    donor: number,
    acceptor: number,
    classes: number,
    cache: Map<number, Map<number, number>>
  ) {
    const key = donor * 2_097_152 + acceptor
    let m = cache.get(key)
    if (!m) cache.set(key, (m = new Map()))
    let j = m.get(classes)
    if (j === undefined) {
      const text = (v: number) => (v >= 0 ? this.valueText[v]! : '')
      j = jaccard(
        trigrams(`${text(a.donor)} ${text(a.acceptor)} ${text(a.classes)}`),
        trigrams(`${text(donor)} ${text(acceptor)} ${text(classes)}`)
      )
      m.set(classes, j)
    }
    return j
  }

  private features (s: number): Features {
    const t = (f: TextField) => this.textCol[FIELD_NO[f]]![s]!
    return {
      deltaG: this.num.deltaG[s]!,
      pekar: this.num.pekar[s]!,
      distance: this.num.distance[s]!,
      temperatureK: this.num.temperatureK[s]!,
      process: t('process'),
      linkage: t('linkage'),
      donor: t('donor'),
      acceptor: t('acceptor'),
      classes: t('classes'),
      solvent: t('solvent'),
      donorFp: this.smilesCol[0]![s]!,
      acceptorFp: this.smilesCol[1]![s]!
    }
  }

  private compare (a: Features, b: Features, nameCache: Map<number, Map<number, number>>, fpCache: Map<number, number>) {
    const text = (v: number) => (v >= 0 ? this.valueText[v]! : '')
    const parts: Part[] = []
    const gauss = (x: number, scale: number) => Math.exp(-((x / scale) ** 2))
    const both = (x: number, y: number) => !Number.isNaN(x) && !Number.isNaN(y)
    const w = SIMILARITY_WEIGHTS
    if (both(a.deltaG, b.deltaG))
      parts.push({
        feature: 'deltaG',
        closeness: gauss(a.deltaG - b.deltaG, 0.25),
        weight: w.deltaG,
        detail: () => `ΔG° ${b.deltaG.toFixed(2)} vs ${a.deltaG.toFixed(2)} eV`
      })
    if (both(a.pekar, b.pekar))
      parts.push({
        feature: 'polarity',
        closeness: gauss(a.pekar - b.pekar, 0.08),
        weight: w.polarity,
        detail: () => `1/n² − 1/ε ${b.pekar.toFixed(3)} vs ${a.pekar.toFixed(3)} (${text(b.solvent) || '—'})`
      })
    if (both(a.distance, b.distance))
      parts.push({
        feature: 'distance',
        closeness: gauss(a.distance - b.distance, 3),
        weight: w.distance,
        detail: () => `R ${b.distance.toFixed(1)} vs ${a.distance.toFixed(1)} Å`
      })
    parts.push({
      feature: 'temperature',
      closeness: gauss(a.temperatureK - b.temperatureK, 40),
      weight: w.temperature,
      detail: () => `T ${b.temperatureK} vs ${a.temperatureK} K`
    })
    parts.push({
      feature: 'process',
      closeness: a.process === b.process ? 1 : 0,
      weight: w.process,
      detail: () => `${a.process === b.process ? 'same' : 'other'} process (${text(b.process)})`
    })
    parts.push({
      feature: 'linkage',
      closeness: a.linkage === b.linkage ? 1 : 0,
      weight: w.linkage,
      detail: () => `${a.linkage === b.linkage ? 'same' : 'other'} linkage (${text(b.linkage)})`
    })
    // structures where both records have them (per species), names otherwise
    const st = this.structureCloseness(a, b.donorFp, b.acceptorFp, fpCache)
    if (st) {
      parts.push({
        feature: 'structure',
        closeness: st.closeness,
        weight: w.structure,
        detail: () =>
          `structure (Tanimoto, Morgan radius 2): ${st.species.map(x => `${x.label} ${x.t.toFixed(2)}`).join(', ')}`
      })
    }
    else {
      parts.push({
        feature: 'names',
        closeness: this.nameCloseness(a, b.donor, b.acceptor, b.classes, nameCache),
        weight: w.names,
        detail: () => `${text(b.donor)} → ${text(b.acceptor)} (name resemblance; no structures on both sides)`
      })
    }
    let total = 0
    let sum = 0
    for (const p of parts) {
      total += p.weight
      sum += p.weight * p.closeness
    }
    return {
      score: sum / total,
      get why () {
        return parts.map(p => ({
          feature: p.feature,
          closeness: Number(p.closeness.toFixed(3)),
          contribution: Number(((p.weight * p.closeness) / total).toFixed(3)),
          detail: p.detail()
        }))
      }
    }
  }
}

interface Features {
  deltaG: number
  pekar: number
  distance: number
  temperatureK: number
  process: number
  linkage: number
  donor: number
  acceptor: number
  classes: number
  solvent: number
  donorFp: number
  acceptorFp: number
}
interface Part {
  feature: string
  closeness: number
  weight: number
  detail: () => string
}

/**
 * The documented similarity score (0–1): a weighted mean, over the features both records have, of
 * Gaussian closeness in ΔG° (scale 0.25 eV), solvent polarity 1/n² − 1/ε (0.08), distance (3 Å) and
 * temperature (40 K); equality of process and linkage; and the chemistry of donor and acceptor —
 * the mean Tanimoto coefficient of their Morgan fingerprints (radius 2, 2048 bits) where both records
 * carry structures, else the character-trigram Jaccard resemblance of the names and classes (a weaker
 * signal, so it weighs less). Scales are common practice, chosen to make "similar" mean "within typical
 * experimental spread".
 */
export const SIMILARITY_WEIGHTS = {
  deltaG: 0.3,
  polarity: 0.15,
  distance: 0.15,
  temperature: 0.1,
  process: 0.1,
  linkage: 0.1,
  structure: 0.25,
  names: 0.1
}

/** Tanimoto coefficient |A∩B| / |A∪B| of two bit sets packed in 32-bit words (1 when both are empty). */
export function tanimoto (a: Uint32Array, b: Uint32Array): number {
  let and = 0
  let or = 0
  for (let i = 0; i < a.length; i++) {
    and += popcount(a[i]! & b[i]!)
    or += popcount(a[i]! | b[i]!)
  }
  return or ? and / or : 1
}
function popcount (x: number): number {
  x -= (x >>> 1) & 0x55555555
  x = (x & 0x33333333) + ((x >>> 2) & 0x33333333)
  return (((x + (x >>> 4)) & 0x0f0f0f0f) * 0x01010101) >>> 24
}
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
 * The first k items of `xs` in `cmp` order, sorted: a bounded binary heap, O(n log k), because a
 * page of 50 out of 100 000 hits need not sort them all. Falls back to a full sort for large k.
 */
export function topK (
  xs: ArrayLike<number> & Iterable<number>,
  k: number,
  cmp: (a: number, b: number) => number
): number[] {
  if (k <= 0) return []
  if (k >= xs.length / 4) return Array.from(xs).sort(cmp).slice(0, k)
  const heap: number[] = [] // max-heap by cmp: the worst kept item on top
  const up = (i: number) => {
    while (i > 0) {
      const p = (i - 1) >> 1
      if (cmp(heap[i]!, heap[p]!) <= 0) break
      ;[heap[i], heap[p]] = [heap[p]!, heap[i]!]
      i = p
    }
  }
  const down = (i: number) => {
    for (;;) {
      const l = 2 * i + 1
      const r = l + 1
      let m = i
      if (l < heap.length && cmp(heap[l]!, heap[m]!) > 0) m = l
      if (r < heap.length && cmp(heap[r]!, heap[m]!) > 0) m = r
      if (m === i) return
      ;[heap[i], heap[m]] = [heap[m]!, heap[i]!]
      i = m
    }
  }
  for (const x of xs) {
    if (heap.length < k) {
      heap.push(x)
      up(heap.length - 1)
    }
    else if (cmp(x, heap[0]!) < 0) {
      heap[0] = x
      down(0)
    }
  }
  return heap.sort(cmp)
}
