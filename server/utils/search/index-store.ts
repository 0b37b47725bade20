/** The record index's storage: a value dictionary with posting lists, and typed-array columns per record. */
import MiniSearch from 'minisearch'
import {
  FACET_FIELD_NOS, NOTES, NUMBERS, TUPLE_WIDTH, type NumberColumn, SEARCH_OPTIONS, type SearchDoc, TEXT_FIELDS, type TextField, grow,
  indexTokenize, queryTokenize
} from './index-schema'
import { NotesIndex } from './index-notes'
import { dropMarked } from './index-math'

export class IndexStore {
  /** minisearch over distinct values: document id = value id, the text in the field it came from. */
  readonly text = new MiniSearch<{ id: number } & Partial<Record<TextField, string>>>({
    fields: TEXT_FIELDS.filter(f => f !== 'notes'),
    storeFields: [],
    idField: 'id',
    tokenize: indexTokenize,
    searchOptions: { ...SEARCH_OPTIONS, tokenize: queryTokenize }
  })

  // value dictionary (text fields and SMILES share it; SMILES are not put into minisearch)
  /** Per field (text fields, then donor and acceptor SMILES): value text → value id. The key is the text itself. */
  protected valueKeys: Map<string, number>[] = Array.from({ length: TEXT_FIELDS.length + 2 }, () => new Map())
  protected valueText: string[] = []
  protected valueField: number[] = []
  protected postings: number[][] = []
  /** Position of a value among its field's values, and each field's values (for facet counts). */
  protected valueLocal: number[] = []
  protected fieldValues: number[][] = TEXT_FIELDS.map(() => [])
  // record columns, one slot per record
  protected n = 0
  protected free: number[] = []
  protected slotOf = new Map<number, number>()
  protected idCol = new Int32Array(0)
  protected datasetCol = new Int32Array(0)
  protected labCol = new Int32Array(0)
  protected yearCol = new Int32Array(0)
  /** 0 = empty slot, 1 = public, 2 = its lab only. */
  protected visCol = new Uint8Array(0)
  protected num: Record<NumberColumn, Float64Array> = Object.fromEntries(
    NUMBERS.map(k => [k, new Float64Array(0)])
  ) as never

  /** Value ids per text field (notes excepted: see `notes`). */
  protected textCol: Int32Array[] = TEXT_FIELDS.map(() => new Int32Array(0))
  protected notes = new NotesIndex()
  /**
   * Facet combinations: records share few distinct (process, solvent, technique, linkage, lab, year) tuples, so each
   * record keeps one tuple id and a query counts tuples (one read and one increment per hit instead of six), then
   * folds the tuple counts into per-facet counts. tupleVals holds, per tuple, TUPLE_WIDTH numbers: for each facet field
   * 1 + the value's position among its field's values (0 = none), then the year (0 = none).
   */
  protected tupleCol = new Int32Array(0)
  protected tupleKeys = new Map<string, number>()
  protected tupleVals = new Int32Array(0)
  protected smilesCol = [new Int32Array(0), new Int32Array(0)]
  protected byDataset = new Map<number, Set<number>>()
  /** Morgan fingerprints by SMILES value id (see structures.ts). */
  protected fingerprints = new Map<number, Uint32Array>()
  // scratch for queries (JavaScript runs one query at a time)
  protected mask = new Int32Array(0)
  protected score = new Float64Array(0)
  protected touched = new Int32Array(0)
  /** The current query's selection (reused: a fresh 4 MB array per query at 1 M records kept the collector busy). */
  protected selBuf = new Int32Array(0)
  protected tupleCounts = new Int32Array(0)
  /** Bumped on every change; answers cached elsewhere key on it. */
  generation = 0

  get size () {
    return this.slotOf.size
  }

  has (id: number) {
    return this.slotOf.has(id)
  }

  protected valueId (field: number, text: string): number {
    const keys = this.valueKeys[field]!
    let v = keys.get(text)
    if (v === undefined) {
      v = this.valueText.length
      keys.set(text, v)
      this.valueText.push(text)
      this.valueField.push(field)
      this.postings.push([])
      const own = this.fieldValues[field]
      this.valueLocal.push(own ? own.push(v) - 1 : -1)
    }
    return v
  }

  protected pendingText: ({ id: number } & Partial<Record<TextField, string>>)[] = []

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
      this.notes.add(slot, d.notes)
      for (let f = 0; f < TEXT_FIELDS.length; f++) {
        if (f === NOTES) continue
        const t = d[TEXT_FIELDS[f]!]
        const v = t ? this.valueId(f, t) : -1
        this.textCol[f]![slot] = v
        if (v >= 0) {
          const list = this.postings[v]!
          // a value enters the text index with its first record (again, after its last one left)
          if (!list.length) this.pendingText.push({ id: v, [TEXT_FIELDS[f]!]: t })
          list.push(slot)
        }
      }
      this.tupleCol[slot] = this.tupleOf(slot)
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

  /** The facet tuple of a record already written to the text columns (see tupleCol). */
  protected tupleOf (slot: number): number {
    const vals = FACET_FIELD_NOS.map((f) => {
      const v = this.textCol[f]![slot]!
      return v >= 0 ? this.valueLocal[v]! + 1 : 0
    })
    vals.push(this.yearCol[slot]!)
    const key = vals.join(',')
    let t = this.tupleKeys.get(key)
    if (t === undefined) {
      t = this.tupleKeys.size
      this.tupleKeys.set(key, t)
      this.tupleVals = grow(this.tupleVals, (t + 1) * TUPLE_WIDTH)
      this.tupleVals.set(vals, t * TUPLE_WIDTH)
    }
    return t
  }

  protected ensure (size: number) {
    if (this.idCol.length >= size) return
    this.idCol = grow(this.idCol, size)
    this.datasetCol = grow(this.datasetCol, size)
    this.labCol = grow(this.labCol, size)
    this.yearCol = grow(this.yearCol, size)
    this.visCol = grow(this.visCol, size)
    for (const k of NUMBERS) this.num[k] = grow(this.num[k], size)
    this.textCol = this.textCol.map((c, f) => (f === NOTES ? c : grow(c, size)))
    this.tupleCol = grow(this.tupleCol, size)
    this.smilesCol = this.smilesCol.map(c => grow(c, size))
  }

  /** Drops every record of these datasets (before they are read again). */
  removeDatasets (datasetIds: number[]) {
    const ids: number[] = []
    for (const d of datasetIds) for (const id of this.byDataset.get(d) ?? []) ids.push(id)
    this.removeIds(ids)
  }

  protected removeIds (ids: number[]) {
    if (!ids.length) return
    // gone slots are marked in a byte array: posting lists of common values hold most of the archive, and a Set
    // look-up per entry made re-reading one dataset of 10 000 records at a million take 0.5 s of filtering
    const gone = new Uint8Array(this.idCol.length)
    const slots: number[] = []
    const touched = new Set<number>()
    for (const id of ids) {
      const slot = this.slotOf.get(id)
      if (slot === undefined) continue
      gone[slot] = 1
      slots.push(slot)
      this.slotOf.delete(id)
      this.visCol[slot] = 0
      this.free.push(slot)
      this.byDataset.get(this.datasetCol[slot]!)?.delete(id)
      for (let f = 0; f < TEXT_FIELDS.length; f++) {
        if (f === NOTES) continue
        const v = this.textCol[f]![slot]!
        if (v >= 0) touched.add(v)
      }
    }
    this.notes.remove(slots, gone)
    for (const v of touched) {
      const left = dropMarked(this.postings[v]!, gone)
      // a value no record holds any more leaves the text index, so it neither matches nor weighs in BM25
      if (!left && this.text.has(v)) this.text.discard(v)
    }
    if (this.text.dirtCount > 5000) this.text.vacuum().catch(() => {})
    this.generation++
  }

  /** Stores the Morgan fingerprint of one SMILES (as given in records). */
  setFingerprint (smiles: string, bits: Uint32Array) {
    for (const f of [TEXT_FIELDS.length, TEXT_FIELDS.length + 1]) {
      const v = this.valueKeys[f]!.get(smiles)
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
      if (f === NOTES) return this.notes.noteOf(s)
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

  protected visibleTo (labs: Set<number>) {
    const vis = this.visCol
    const lab = this.labCol
    return labs.size ? (s: number) => vis[s] === 1 || (vis[s] === 2 && labs.has(lab[s]!)) : (s: number) => vis[s] === 1
  }
}
