/**
 * Free-text notes, indexed per record. Every other text field repeats a few thousand distinct values across an archive
 * (names, solvents, titles), which the record index stores once each in minisearch; notes are nearly all different, and
 * one minisearch document per note cost ≈ 1.3 kB of heap and 9 µs to add at a million records (1.3 GB and 9 s of the
 * 1.6 GB and 13 s the whole index took). Here a note costs its text, a length, and one posting entry per distinct word.
 *
 * minisearch's parts do the text work: its tokenizer and term processing (the same as the other fields, through
 * indexTokenize), its radix tree (SearchableMap) for exact, prefix and fuzzy term look-up, and its weighting rules —
 * prefix and fuzzy weights, and BM25+ with its defaults — restated in `score` below because minisearch keeps them
 * internal. Each distinct word counts once per note (term frequency 1).
 */
import MiniSearch from 'minisearch'
import SearchableMap from 'minisearch/SearchableMap'
import { SEARCH_OPTIONS, grow, indexTokenize } from './index-schema'
import { dropMarked } from './index-math'

const processTerm = MiniSearch.getDefault('processTerm') as (t: string) => string | null | undefined
/** minisearch 7.2's defaults: weights { fuzzy: 0.45, prefix: 0.375 }, bm25 { k: 1.2, b: 0.7, d: 0.5 }. */
const WEIGHTS = { fuzzy: 0.45, prefix: 0.375 }
const BM25 = { k: 1.2, b: 0.7, d: 0.5 }

export class NotesIndex {
  /** word → slots of the notes holding it */
  protected terms = new SearchableMap<number[]>()
  protected text: string[] = []
  protected length = new Uint16Array(0)
  protected count = 0
  protected tokens = 0

  /** The distinct processed words of a note. */
  static words (note: string): Set<string> {
    const out = new Set<string>()
    for (const t of indexTokenize(note, 'notes')) {
      const p = processTerm(t)
      if (p) out.add(p)
    }
    return out
  }

  add (slot: number, note: string) {
    if (!note) return
    const words = NotesIndex.words(note)
    this.text[slot] = note
    this.length = grow(this.length, slot + 1)
    this.length[slot] = Math.min(words.size, 65_535)
    this.count++
    this.tokens += this.length[slot]!
    for (const w of words) {
      const list = this.terms.get(w)
      if (list) list.push(slot)
      else this.terms.set(w, [slot])
    }
  }

  /** Forgets the notes of these slots (marked in `gone`) before the slots are used again. */
  remove (slots: number[], gone: Uint8Array) {
    const touched = new Set<string>()
    for (const slot of slots) {
      const note = this.text[slot]
      if (!note) continue
      for (const w of NotesIndex.words(note)) touched.add(w)
      this.count--
      this.tokens -= this.length[slot]!
      this.text[slot] = ''
    }
    for (const w of touched) if (!dropMarked(this.terms.get(w)!, gone)) this.terms.delete(w)
  }

  noteOf (slot: number): string {
    return this.text[slot] ?? ''
  }

  /** Whether a word is there, whole or as the start of one. */
  hasPrefix (word: string): boolean {
    return this.terms.atPrefix(word).size > 0
  }

  /** Words within `distance` edits, nearest first. */
  near (word: string, distance: number): { word: string, slots: number[] }[] {
    return [...this.terms.fuzzyGet(word, distance)]
      .map(([w, [slots, d]]) => ({ word: w, slots, d }))
      .sort((a, b) => a.d - b.d || b.slots.length - a.slots.length)
      .map(({ word: w, slots }) => ({ word: w, slots }))
  }

  /**
   * The notes matching one query word: exactly, by prefix (from 3 letters) or within the edits SEARCH_OPTIONS allows,
   * as lists of slots with the weight minisearch would give the word (match kind × IDF); `accumulate` finishes the
   * BM25+ sum per note.
   */
  match (word: string): { slots: number[], weight: number }[] {
    if (!this.count) return []
    const matches = new Map<string, { slots: number[], weight: number }>()
    const exact = this.terms.get(word)
    if (exact) matches.set(word, { slots: exact, weight: 1 })
    if (SEARCH_OPTIONS.prefix(word)) {
      for (const [w, slots] of this.terms.atPrefix(word)) {
        const distance = w.length - word.length
        if (distance) matches.set(w, { slots, weight: (WEIGHTS.prefix * w.length) / (w.length + 0.3 * distance) })
      }
    }
    const edits = SEARCH_OPTIONS.fuzzy(word)
    if (edits) {
      for (const [w, [slots, distance]] of this.terms.fuzzyGet(word, edits)) {
        if (distance && !matches.has(w))
          matches.set(w, { slots, weight: (WEIGHTS.fuzzy * w.length) / (w.length + distance) })
      }
    }
    return [...matches.values()].map(({ slots, weight }) => ({
      slots,
      weight: weight * Math.log(1 + (this.count - slots.length + 0.5) / (slots.length + 0.5))
    }))
  }

  /** textHits' accumulation (index-query.ts) for one matched word's notes, each scored by its length (BM25+). */
  accumulate (
    slots: number[],
    weight: number,
    bits: number,
    mask: Int32Array,
    score: Float64Array,
    touched: Int32Array,
    nt: number
  ): number {
    return accumulateNotes(slots, weight, bits, mask, score, touched, nt, this.length, this.tokens / this.count)
  }
}

/**
 * BM25+ as minisearch's calcBM25Score with term frequency 1: weight · (d + (k + 1) / (1 + k (1 − b + b · length / avg))).
 * A loop in a function of its own (see index-query.ts on V8 and hot loops).
 */
function accumulateNotes (
  slots: number[],
  weight: number,
  bits: number,
  mask: Int32Array,
  score: Float64Array,
  touched: Int32Array,
  nt: number,
  length: Uint16Array,
  avg: number
): number {
  const { k, b, d } = BM25
  for (let i = 0; i < slots.length; i++) {
    const s = slots[i]!
    const sc = weight * (d + (k + 1) / (1 + k * (1 - b + (b * length[s]!) / avg)))
    if (mask[s] === 0) {
      touched[nt++] = s
      score[s] = sc
    }
    else score[s]! += sc
    mask[s]! |= bits
  }
  return nt
}
