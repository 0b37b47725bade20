/** Queries over the record index: filters, text hits, ordering, facet counts and ranges. */
import MiniSearch from 'minisearch'
import {
  FACET_FIELD_NOS, FIELD_NO, FIRST_YEAR, MAX_QUERY_TERMS, type NumberColumn, type SearchAnswer, type SearchQuery, TUPLE_WIDTH,
  YEAR_SPAN, expandSynonyms
} from './index-schema'
import { topK, topKById, topKByKey } from './index-math'
import { IndexStore } from './index-store'

/*
 * The hot loops, each in a small function of its own with nothing after the loop: written inside the larger methods,
 * V8 compiled each loop on the fly and threw the code away at the first untried line after it, dozens of times
 * (--trace-deopt), and the slow queries at a million records ran at half speed. One loop per filter, not one loop
 * calling a test per record: the call site then sees many closures and V8 stops inlining.
 */
/** Keeps the slots with vis === 1 (public), in place; returns the new length. */
function keepPublic (sel: Int32Array, len: number, vis: Uint8Array): number {
  let j = 0
  for (let i = 0; i < len; i++) {
    const s = sel[i]!
    if (vis[s] === 1) sel[j++] = s
  }
  return j
}
/** Keeps the public slots and those of the viewer's labs. */
function keepVisibleTo (sel: Int32Array, len: number, vis: Uint8Array, lab: Int32Array, labs: Set<number>): number {
  let j = 0
  for (let i = 0; i < len; i++) {
    const s = sel[i]!
    if (vis[s] === 1 || (vis[s] === 2 && labs.has(lab[s]!))) sel[j++] = s
  }
  return j
}
function keepEqual (sel: Int32Array, len: number, col: Int32Array, v: number): number {
  let j = 0
  for (let i = 0; i < len; i++) {
    const s = sel[i]!
    if (col[s] === v) sel[j++] = s
  }
  return j
}
/** lo ≤ x ≤ hi; NaN (no value) fails every comparison, so a record without the value is outside any range. */
function keepRange (sel: Int32Array, len: number, col: Float64Array, lo: number, hi: number): number {
  let j = 0
  for (let i = 0; i < len; i++) {
    const s = sel[i]!
    const x = col[s]!
    if (x >= lo && x <= hi) sel[j++] = s
  }
  return j
}
/** The same for an Int32 column (years): one function for both kinds of column ran at half speed. */
function keepRangeInt (sel: Int32Array, len: number, col: Int32Array, lo: number, hi: number): number {
  let j = 0
  for (let i = 0; i < len; i++) {
    const s = sel[i]!
    const x = col[s]!
    if (x >= lo && x <= hi) sel[j++] = s
  }
  return j
}
/** Copies the slots of `from` that pass visibility into `sel` (vis !== 0 when the viewer has labs: narrow tests those). */
function copyVisible (from: number[] | null, n: number, sel: Int32Array, vis: Uint8Array, anyLab: boolean): number {
  let len = 0
  if (from) {
    for (let i = 0; i < from.length; i++) {
      const s = from[i]!
      if (vis[s] === 1 || (anyLab && vis[s] === 2)) sel[len++] = s
    }
  }
  else {
    for (let s = 0; s < n; s++) if (vis[s] === 1 || (anyLab && vis[s] === 2)) sel[len++] = s
  }
  return len
}
/**
 * Counts the hits per facet tuple into `perTuple` and leaves the ranges' ends in `ends` (min, max of ΔG°, T, distance,
 * log10 k; ±Infinity when no hit has the value: NaN never wins a comparison).
 */
function tally (
  hits: Int32Array,
  tc: Int32Array,
  perTuple: Int32Array,
  dg: Float64Array,
  tk: Float64Array,
  ds: Float64Array,
  lk: Float64Array,
  ends: Float64Array
): void {
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
    perTuple[tc[s]!]!++
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
  ends[0] = dgLo
  ends[1] = dgHi
  ends[2] = tLo
  ends[3] = tHi
  ends[4] = dLo
  ends[5] = dHi
  ends[6] = kLo
  ends[7] = kHi
}

/**
 * Adds one matched value's records to the text hits: score `sc`, query-term bits `bits`; a slot met for the first time
 * is listed in `touched`. Returns the new count of touched slots.
 */
function accumulate (
  list: number[],
  sc: number,
  bits: number,
  mask: Int32Array,
  score: Float64Array,
  touched: Int32Array,
  nt: number
): number {
  for (let i = 0; i < list.length; i++) {
    const s = list[i]!
    if (mask[s] === 0) {
      touched[nt++] = s
      score[s] = sc
    }
    else score[s]! += sc
    mask[s]! |= bits
  }
  return nt
}
/** The touched slots holding every query term (`full` bits) go to `out`; every mask is cleared. Returns their count. */
function keepFull (touched: Int32Array, nt: number, mask: Int32Array, full: number, out: Int32Array): number {
  let n = 0
  for (let i = 0; i < nt; i++) {
    const s = touched[i]!
    if (mask[s] === full) out[n++] = s
    mask[s] = 0
  }
  return n
}

export class QueryableIndex extends IndexStore {
  /**
   * Narrows a list of slots to those passing the query's filters (visibility, lab, facet values by
   * value id, ranges), one tight loop per filter over the columns; 0 when a facet value is unknown.
   */
  protected narrow (
    sel: Int32Array,
    len: number,
    query: SearchQuery,
    labs: Set<number>,
    visChecked: boolean,
    fieldDone?: string
  ): number {
    if (labs.size) len = keepVisibleTo(sel, len, this.visCol, this.labCol, labs)
    else if (!visChecked) len = keepPublic(sel, len, this.visCol)
    if (query.labId) len = keepEqual(sel, len, this.labCol, query.labId)
    for (const f of ['process', 'solvent', 'technique', 'linkage'] as const) {
      const want = query[f]
      if (!want || f === fieldDone) continue
      const v = this.valueKeys[FIELD_NO[f]]!.get(want)
      if (v === undefined) return 0
      len = keepEqual(sel, len, this.textCol[FIELD_NO[f]]!, v)
    }
    const ranges: [Float64Array, number | undefined, number | undefined][] = [
      [this.num.deltaG, query.deltaGMin, query.deltaGMax],
      [this.num.temperatureK, query.temperatureMin, query.temperatureMax],
      [this.num.distance, query.distanceMin, query.distanceMax],
      [this.num.log10Rate, query.log10RateMin, query.log10RateMax]
    ]
    for (const [col, min, max] of ranges) {
      if (min !== undefined || max !== undefined) len = keepRange(sel, len, col, min ?? -Infinity, max ?? Infinity)
    }
    // 0 = no year, below any minimum
    if (query.yearMin !== undefined || query.yearMax !== undefined)
      len = keepRangeInt(sel, len, this.yearCol, query.yearMin ?? 1, query.yearMax ?? Infinity)
    return len
  }

  /** Hits with facet counts and value ranges. */
  search (query: SearchQuery, viewer: { labIds: number[] } | null): SearchAnswer {
    const labs = new Set(viewer?.labIds ?? [])
    let sel: Int32Array
    let len = 0
    let fieldDone: string | undefined
    const scored = !!query.q?.trim()
    if (this.selBuf.length < this.n) this.selBuf = new Int32Array(this.idCol.length)
    if (scored) {
      sel = this.selBuf
      len = this.textHits(query.q!, sel).length
    }
    else if (query.ids) {
      sel = new Int32Array(query.ids.length)
      for (const id of new Set(query.ids)) {
        const s = this.slotOf.get(id)
        if (s !== undefined) sel[len++] = s
      }
    }
    else {
      sel = this.selBuf
      // start from the shortest posting list of the facet values asked for (narrow() tests the rest), else from every
      // slot; the visibility test is done here already
      let from: number[] | undefined
      for (const f of ['process', 'solvent', 'technique', 'linkage'] as const) {
        if (!query[f]) continue
        const v = this.valueKeys[FIELD_NO[f]]!.get(query[f])
        const list = v === undefined ? [] : this.postings[v]!
        if (!from || list.length < from.length) {
          from = list
          fieldDone = f
        }
      }
      len = copyVisible(from ?? null, this.n, sel, this.visCol, labs.size > 0)
    }
    len = this.narrow(sel, len, query, labs, !scored && !query.ids, fieldDone)
    const hits = sel.subarray(0, len)
    const page = this.order(hits, query, scored)
    const suggestion = scored ? this.suggest(query.q!, labs) : undefined
    return {
      total: len,
      ...(suggestion ? { suggestion } : {}),
      ids: page.map(s => ({ id: this.idCol[s]!, score: scored ? this.score[s]! : 0 })),
      ...this.summarise(hits)
    }
  }

  /**
   * "Did you mean": each query word that is neither in the index (whole or as a prefix) nor a synonym is replaced by the
   * indexed word minisearch ranks first within 1 edit (4 letters) or 2 edits (5 or more); undefined when nothing changes.
   * minisearch's own fuzzy search does the edit-distance work.
   */
  suggest (q: string, labs: Set<number>): string | undefined {
    const tokenize = MiniSearch.getDefault('tokenize') as (t: string) => string[]
    const process = MiniSearch.getDefault('processTerm') as (t: string) => string | null | undefined
    // a word is only ever suggested from a value some record the viewer may see carries (never from another lab's draft)
    const vis = this.visCol
    const lab = this.labCol
    const visible = (s: number) => vis[s] === 1 || (vis[s] === 2 && labs.has(lab[s]!))
    const seen = (value: number) => this.postings[value]!.some(visible)
    let out = q
    for (const t of tokenize(q).slice(0, MAX_QUERY_TERMS)) {
      const p = process(t)
      if (!p || p.length < 4 || /\d/.test(p) || expandSynonyms(p) !== p) continue
      if (this.text.search(p, { prefix: true, fuzzy: false }).length || this.notes.hasPrefix(p)) continue
      const edits = p.length >= 5 ? 2 : 1
      const near = this.text.search(p, { prefix: false, fuzzy: edits }).slice(0, 50)
      const term = near.find(r => seen(r.id as number))?.terms.find(x => x !== p)
        ?? this.notes.near(p, edits).find(w => w.word !== p && w.slots.some(visible))?.word
      if (term) out = out.replace(t, term)
    }
    return out === q ? undefined : out
  }

  /** Slots of the records whose values match every query term, scored (score left in this.score). */
  protected textHits (q: string, out: Int32Array): Int32Array {
    const tokenize = MiniSearch.getDefault('tokenize') as (t: string) => string[]
    const process = MiniSearch.getDefault('processTerm') as (t: string) => string | null | undefined
    const bit = new Map<string, number>()
    for (const t of tokenize(expandSynonyms(q))) {
      const p = process(t)
      if (p && !bit.has(p) && bit.size < MAX_QUERY_TERMS) bit.set(p, 1 << bit.size)
    }
    if (!bit.size) return out.subarray(0, 0)
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
      nt = accumulate(this.postings[r.id as number]!, r.score, bits, mask, score, touched, nt)
    }
    // notes: their own index (index-notes.ts), the same accumulation
    for (const [term, bits] of bit) {
      for (const { slots, weight } of this.notes.match(term)) nt = this.notes.accumulate(slots, weight, bits, mask, score, touched, nt)
    }
    const n = keepFull(touched, nt, mask, full, out)
    return out.subarray(0, n)
  }

  /** The slots of the requested page, in the requested order (only the first page·size are ordered). */
  protected order (hits: Int32Array, query: SearchQuery, scored: boolean): number[] {
    const ids = this.idCol
    const key = query.sort?.replace(/^-/, '')
    const dir = query.sort?.startsWith('-') ? -1 : 1
    const start = (query.page - 1) * query.pageSize
    const k = start + query.pageSize
    if (key === 'donor' || key === 'acceptor') {
      const col = this.textCol[FIELD_NO[key]]!
      const text = this.valueText
      const cmp = (a: number, b: number) => {
        const x = text[col[a]!] ?? ''
        const y = text[col[b]!] ?? ''
        return (x < y ? -1 : x > y ? 1 : 0) * dir || ids[a]! - ids[b]!
      }
      return topK(hits, k, cmp).slice(start)
    }
    // numbers (no value last), scores (best first), else ids
    const col = key && ['deltaG', 'log10Rate', 'temperature', 'distance'].includes(key)
      ? this.num[key === 'temperature' ? 'temperatureK' : (key as NumberColumn)]
      : null
    const top = col
      ? topKByKey(hits, k, col, dir, ids)
      : scored
        ? topKByKey(hits, k, this.score, -1, ids)
        : topKById(hits, k, ids)
    return top.slice(start)
  }

  /** Facet counts and value ranges of the hits, in one pass over them (facets by tuple, folded afterwards). */
  protected summarise (hits: Int32Array): Pick<SearchAnswer, 'facets' | 'ranges'> {
    const fields = FACET_FIELD_NOS
    const nTuples = this.tupleKeys.size
    if (this.tupleCounts.length < nTuples) this.tupleCounts = new Int32Array(Math.max(nTuples * 2, 1024))
    const perTuple = this.tupleCounts
    perTuple.fill(0, 0, nTuples)
    const ends = new Float64Array(8)
    tally(hits, this.tupleCol, perTuple, this.num.deltaG, this.num.temperatureK, this.num.distance, this.num.log10Rate, ends)
    const [dgLo, dgHi, tLo, tHi, dLo, dHi, kLo, kHi] = ends as unknown as [number, number, number, number, number, number, number, number]
    const counts = fields.map(f => new Int32Array(this.fieldValues[f]!.length + 1))
    const byYear = new Int32Array(YEAR_SPAN)
    const tv = this.tupleVals
    for (let t = 0; t < nTuples; t++) {
      const c = perTuple[t]!
      if (!c) continue
      const base = t * TUPLE_WIDTH
      for (let k = 0; k < fields.length; k++) counts[k]![tv[base + k]!]! += c
      const y = tv[base + fields.length]! - FIRST_YEAR
      if (y >= 0 && y < YEAR_SPAN) byYear[y]! += c
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
    const [process, solvent, technique, linkage, lab] = counts.map((c, i) => named(c, fields[i]!))
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
}
