import { describe, expect, it } from 'vitest'
import { RecordIndex } from '../../../../../server/utils/search/record-index'
import { tanimoto, topK } from '../../../../../server/utils/search/index-math'
import type { SearchDoc } from '../../../../../server/utils/search/index-schema'

const base: Omit<SearchDoc, 'id'> = {
  datasetId: 1, labId: 1, visibility: 'public', donor: 'zinc porphyrin', acceptor: 'C60', bridge: '', classes: 'porphyrin fullerene', solvent: 'toluene',
  technique: 'transient-absorption', process: 'charge-separation', linkage: 'covalent', notes: '', datasetTitle: 'Dyads', lab: 'Lab A', keywords: '',
  year: 2025, deltaG: -0.8, temperatureK: 298.15, distance: 12, log10Rate: 9, pekar: 0.2
}
const doc = (id: number, over: Partial<SearchDoc> = {}): SearchDoc => ({ ...base, id, ...over })

function fixture () {
  const ix = new RecordIndex()
  ix.add([
    doc(1), doc(2, { solvent: 'benzonitrile', deltaG: -1.2 }), doc(3, { donor: 'triethylamine', acceptor: 'Ir(ppy)3', classes: 'amine iridium complex', linkage: 'bimolecular', deltaG: null }),
    doc(4, { visibility: 'draft', labId: 2, datasetId: 2, donor: 'zinc porphyrin draft', notes: 'secret probe' }),
    doc(5, { solvent: 'water', technique: 'tcspc', deltaG: -0.3, distance: null, year: 2023, lab: 'Lab B', labId: 3, datasetId: 3 })
  ])
  return ix
}
const ids = (r: { ids: { id: number }[] }) => r.ids.map(x => x.id)

describe('RecordIndex search', () => {
  it('matches typos, prefixes and AND across fields, and hides drafts from other labs', () => {
    const ix = fixture()
    expect(ids(ix.search({ q: 'porphirin', page: 1, pageSize: 10 }, null)).sort()).toEqual([1, 2, 5])
    expect(ids(ix.search({ q: 'triethyl', page: 1, pageSize: 10 }, null))).toEqual([3])
    expect(ids(ix.search({ q: 'porphyrin benzonitrile', page: 1, pageSize: 10 }, null))).toEqual([2])
    expect(ix.search({ q: 'secret', page: 1, pageSize: 10 }, null).total).toBe(0)
    expect(ix.search({ q: 'secret', page: 1, pageSize: 10 }, { labIds: [1] }).total).toBe(0)
    expect(ids(ix.search({ q: 'secret', page: 1, pageSize: 10 }, { labIds: [2] }))).toEqual([4])
  })
  it('finds what people type: swapped letters, parent compounds in systematic names, common names of abbreviations', () => {
    const ix = new RecordIndex()
    ix.add([
      doc(1, { donor: 'ZnP', classes: 'porphyrin', solvent: 'toluene' }),
      doc(2, { donor: 'N,N-dimethylaniline', acceptor: 'Ir(ppy)3', classes: 'amine iridium complex', solvent: 'acetonitrile' }),
      doc(3, { donor: 'azurin', classes: 'protein', solvent: 'water' })
    ])
    const q = (text: string) => ids(ix.search({ q: text, page: 1, pageSize: 10 }, null))
    // a swapped pair of letters is two edits (Damerau); from 6 letters two edits are allowed
    expect(q('toleune')).toEqual([1])
    expect(q('proetin')).toEqual([3])
    expect(q('iriidum')).toEqual([2])
    // the parent compound finds its N,N-dimethyl derivative
    expect(q('aniline')).toEqual([2])
    // the words people use for the abbreviation a record writes
    expect(q('zinc porphyrin')).toEqual([1])
    expect(q('ZnP')).toEqual([1])
  })
  it('offers "did you mean" for unknown words, never from a draft the viewer may not see', () => {
    const ix = fixture()
    const hint = (text: string, labIds: number[] = []) =>
      ix.search({ q: text, page: 1, pageSize: 10 }, labIds.length ? { labIds } : null).suggestion
    expect(hint('toleune')).toBe('toluene')
    expect(hint('Porphyrin benzonitrle')).toBe('Porphyrin benzonitrile') // only the unknown word is replaced
    expect(hint('toluene')).toBeUndefined() // a known word
    expect(hint('tolu')).toBeUndefined() // a prefix of a known word, typed half-way
    expect(hint('ZnP')).toBeUndefined() // short words and synonyms are left alone
    // "secret" is only in lab 2's draft: a visitor and lab 1 get no hint, lab 2's member does
    expect(hint('secrat')).toBeUndefined()
    expect(hint('secrat', [1])).toBeUndefined()
    expect(hint('secrat', [2])).toBe('secret')
  })
  it('filters by facet values and ranges; a record without a value is outside any range', () => {
    const ix = fixture()
    expect(ids(ix.search({ deltaGMin: -1, deltaGMax: -0.5, page: 1, pageSize: 10 }, null))).toEqual([1])
    expect(ids(ix.search({ distanceMin: 0, page: 1, pageSize: 10 }, null))).toEqual([1, 2, 3])
    expect(ids(ix.search({ solvent: 'water', page: 1, pageSize: 10 }, null))).toEqual([5])
    expect(ix.search({ solvent: 'no such solvent', page: 1, pageSize: 10 }, null).total).toBe(0)
    expect(ids(ix.search({ yearMax: 2024, page: 1, pageSize: 10 }, null))).toEqual([5])
    expect(ids(ix.search({ labId: 3, page: 1, pageSize: 10 }, null))).toEqual([5])
  })
  it('counts facets and ranges over the hits only', () => {
    const r = fixture().search({ page: 1, pageSize: 1 }, null)
    expect(r.total).toBe(4)
    expect(r.facets.solvent).toEqual({ toluene: 2, benzonitrile: 1, water: 1 })
    expect(r.facets.linkage).toEqual({ covalent: 3, bimolecular: 1 })
    expect(r.facets.year).toEqual({ 2023: 1, 2025: 3 })
    expect(r.ranges.deltaG).toEqual({ min: -1.2, max: -0.3 })
    expect(r.ranges.distance).toEqual({ min: 12, max: 12 })
  })
  it('sorts, pages, and takes records out when their dataset is re-read', () => {
    const ix = fixture()
    expect(ids(ix.search({ sort: 'deltaG', page: 1, pageSize: 10 }, null))).toEqual([2, 1, 5, 3]) // no value last
    expect(ids(ix.search({ sort: '-deltaG', page: 2, pageSize: 2 }, null))).toEqual([2, 3])
    ix.removeDatasets([1])
    expect(ids(ix.search({ page: 1, pageSize: 10 }, null))).toEqual([5])
    expect(ix.search({ q: 'triethylamine', page: 1, pageSize: 10 }, null).total).toBe(0)
    ix.add([doc(7, { donor: 'triethylamine' })])
    expect(ids(ix.search({ q: 'triethylamine', page: 1, pageSize: 10 }, null))).toEqual([7])
  })
})

describe('similarity and helpers', () => {
  it('topK returns the same first k as a full sort (fast-check style table of sizes)', () => {
    for (const n of [0, 1, 7, 100, 1000]) {
      const xs = Array.from({ length: n }, (_, i) => (i * 7919) % 1013)
      for (const k of [1, 5, 50]) expect(topK(xs, k, (a, b) => a - b)).toEqual([...xs].sort((a, b) => a - b).slice(0, k))
    }
  })
  it('Tanimoto is |A∩B|/|A∪B| (definition; checked against a set computation)', () => {
    const bits = (on: number[]) => { const w = new Uint32Array(64); for (const b of on) w[b >> 5]! |= 1 << (b & 31); return w }
    const a = [1, 5, 31, 32, 63, 2047]; const b = [5, 31, 100, 2047]
    const inter = a.filter(x => b.includes(x)).length; const union = new Set([...a, ...b]).size
    expect(tanimoto(bits(a), bits(b))).toBeCloseTo(inter / union, 12)
    expect(tanimoto(bits(a), bits(a))).toBe(1)
    expect(tanimoto(bits([0]), bits([1]))).toBe(0)
  })
  it('ranks by the documented score, uses structures where both records have them, and explains it', () => {
    const ix = fixture()
    const fp = (on: number[]) => { const w = new Uint32Array(64); for (const b of on) w[b >> 5]! |= 1 << (b & 31); return w }
    ix.add([doc(10, { donor: 'TEA', acceptor: 'benzene', classes: 'amine arene', donorSmiles: 'CCN(CC)CC', acceptorSmiles: 'c1ccccc1' }), doc(11, { donor: 'Et3N', acceptor: 'toluene', classes: 'amine arene', donorSmiles: 'CCN(CC)CC', acceptorSmiles: 'Cc1ccccc1' })])
    ix.setFingerprint('CCN(CC)CC', fp([1, 2, 3])); ix.setFingerprint('c1ccccc1', fp([10, 11])); ix.setFingerprint('Cc1ccccc1', fp([10, 11, 12, 13]))
    const hits = ix.similar(10, null, 3)!
    expect(hits[0]!.id).toBe(11)
    const st = hits[0]!.why.find(w => w.feature === 'structure')!
    expect(st.closeness).toBeCloseTo((1 + 0.5) / 2, 3) // donor identical, acceptor 2 of 4 bits shared
    for (const h of hits) expect(h.why.reduce((s, w) => s + w.contribution, 0)).toBeCloseTo(h.score, 2)
    // without structures on one side, names stand in
    expect(ix.similar(1, null, 5)!.every(h => h.why.some(w => w.feature === 'names'))).toBe(true)
    expect(ix.similar(999, null, 5)).toBeNull()
  })
})

describe('notes, facet tuples and the fast orders (the index at a million records)', () => {
  it('notes match by word, prefix and typo, leave with their records, and never hint from a hidden draft', () => {
    const ix = new RecordIndex()
    ix.add([
      doc(1, { notes: 'degassed by freeze pump thaw; sample S1234' }),
      doc(2, { notes: 'measured under argon' }),
      doc(3, { notes: 'confidential quencher batch', visibility: 'draft', labId: 2, datasetId: 2 })
    ])
    const q = (text: string, labIds?: number[]) => ids(ix.search({ q: text, page: 1, pageSize: 10 }, labIds ? { labIds } : null))
    expect(q('degassed')).toEqual([1])
    expect(q('degas')).toEqual([1]) // prefix
    expect(q('argn')).toEqual([]) // 4 letters: no typo allowed (SEARCH_OPTIONS)
    expect(q('degasesd')).toEqual([1]) // swapped letters, 8 letters: two edits
    expect(q('s1234')).toEqual([1]) // codes with letters are words
    expect(q('porphyrin argon')).toEqual([2]) // AND across notes and names
    expect(q('confidential')).toEqual([])
    expect(q('confidential', [2])).toEqual([3])
    expect(ix.search({ q: 'confidentail', page: 1, pageSize: 10 }, null).suggestion).toBeUndefined()
    expect(ix.search({ q: 'confidentail', page: 1, pageSize: 10 }, { labIds: [2] }).suggestion).toBe('confidential')
    expect(ix.doc(2)!.notes).toBe('measured under argon')
    // the record is read again with other notes: old words gone, new ones found
    ix.add([doc(2, { notes: 'measured under nitrogen' })])
    expect(q('argon')).toEqual([])
    expect(q('nitrogen')).toEqual([2])
    ix.removeDatasets([2])
    expect(q('confidential', [2])).toEqual([])
  })

  it('scores notes as minisearch scores the same notes (reference: minisearch 7.2 itself)', async () => {
    const { default: MiniSearch } = await import('minisearch')
    const { indexTokenize, SEARCH_OPTIONS } = await import('../../../../../server/utils/search/index-schema')
    // notes without repeated words (the index counts a word once per note) and no names elsewhere to match
    const notes = ['laser flash photolysis at 355 nm', 'flash photolysis with a ns laser', 'photolysis in frozen glass',
      'streak camera with femtosecond laser pulses', 'laser power dependence checked', 'pulse radiolysis reference']
    const ix = new RecordIndex()
    ix.add(notes.map((n, i) => doc(i + 1, { notes: n, donor: 'X', acceptor: 'Y', classes: '', solvent: '', datasetTitle: 'T', lab: 'L' })))
    const ms = new MiniSearch({ fields: ['notes'], tokenize: (t: string) => indexTokenize(t, 'notes'), searchOptions: SEARCH_OPTIONS })
    ms.addAll(notes.map((n, i) => ({ id: i + 1, notes: n })))
    for (const word of ['laser', 'photolysis', 'flsh', 'las', 'pulse']) {
      const ours = ix.search({ q: word, page: 1, pageSize: 10 }, null).ids
      const ref = ms.search(word, { combineWith: 'OR' })
      expect(ours.map(x => x.id).sort()).toEqual(ref.map(r => r.id).sort())
      for (const r of ref) expect(ours.find(x => x.id === r.id)!.score).toBeCloseTo(r.score, 10)
    }
  })

  it('facet counts and ranges equal a count over the visible documents, through adds, replacements and removals', () => {
    const rnd = (() => {
      let s = 7
      return () => (s = (s * 48271) % 2147483647) / 2147483647
    })()
    const pick = <T>(xs: T[]) => xs[Math.floor(rnd() * xs.length)]!
    const make = (id: number): SearchDoc => doc(id, {
      datasetId: 1 + (id % 7), labId: 1 + (id % 3), visibility: rnd() < 0.2 ? 'draft' : 'public',
      process: pick(['charge-separation', 'charge-recombination', 'charge-shift']), solvent: pick(['toluene', 'water', '']),
      technique: pick(['tcspc', 'transient-absorption']), linkage: pick(['covalent', 'bimolecular']), lab: `Lab ${id % 3}`,
      year: pick([2021, 2024, null]), deltaG: rnd() < 0.1 ? null : -2 * rnd(), distance: rnd() < 0.3 ? null : 20 * rnd(),
      temperatureK: 200 + 100 * rnd(), log10Rate: 6 + 6 * rnd()
    })
    const ix = new RecordIndex()
    const live = new Map<number, SearchDoc>()
    const put = (d: SearchDoc[]) => {
      ix.add(d)
      for (const x of d) live.set(x.id, x)
    }
    put(Array.from({ length: 300 }, (_, i) => make(i + 1)))
    put(Array.from({ length: 50 }, (_, i) => make(i * 3 + 1))) // replacements
    ix.removeDatasets([4])
    for (const [id, d] of live) if (d.datasetId === 4) live.delete(id)
    put(Array.from({ length: 40 }, (_, i) => make(1000 + i))) // reuse freed slots
    for (const viewer of [null, { labIds: [2] }]) {
      for (const query of [{}, { solvent: 'water' }, { process: 'charge-shift', deltaGMin: -1 }, { technique: 'tcspc', yearMin: 2022 }]) {
        const got = ix.search({ ...query, page: 1, pageSize: 500 }, viewer)
        const want = [...live.values()].filter(d =>
          (d.visibility === 'public' || viewer?.labIds.includes(d.labId))
          && Object.entries(query).every(([k, v]) => k === 'deltaGMin'
            ? d.deltaG !== null && d.deltaG >= (v as number)
            : k === 'yearMin' ? d.year !== null && d.year >= (v as number) : d[k as keyof SearchDoc] === v))
        expect(got.total).toBe(want.length)
        expect(got.ids.map(x => x.id)).toEqual(want.map(d => d.id).sort((a, b) => a - b))
        const count = (f: keyof SearchDoc) => {
          const out: Record<string, number> = {}
          for (const d of want) if (d[f]) out[String(d[f])] = (out[String(d[f])] ?? 0) + 1
          return out
        }
        for (const f of ['process', 'solvent', 'technique', 'linkage', 'lab', 'year'] as const) expect(got.facets[f]).toEqual(count(f))
        const dg = want.map(d => d.deltaG).filter((x): x is number => x !== null)
        expect(got.ranges.deltaG).toEqual(dg.length ? { min: Math.min(...dg), max: Math.max(...dg) } : null)
        const r = want.map(d => d.distance).filter((x): x is number => x !== null)
        expect(got.ranges.distance).toEqual(r.length ? { min: Math.min(...r), max: Math.max(...r) } : null)
      }
    }
  })

  it('the fast orders give what the comparator gives, with ties, missing values and both directions', async () => {
    const { topKByKey, topKById } = await import('../../../../../server/utils/search/index-math')
    const n = 5000
    const key = Float64Array.from({ length: n }, (_, i) => (i % 17 === 0 ? NaN : Math.round(Math.sin(i) * 50) / 10))
    const idOf = Int32Array.from({ length: n }, (_, i) => ((i * 7919) % n) + 1)
    const xs = Int32Array.from({ length: 3000 }, (_, i) => (i * 13) % n)
    for (const k of [1, 50, 2999, 3000, 4000]) {
      for (const dir of [1, -1] as const) {
        const cmp = (a: number, b: number) => {
          const x = key[a]!
          const y = key[b]!
          if (Number.isNaN(x) || Number.isNaN(y)) return Number.isNaN(x) ? (Number.isNaN(y) ? idOf[a]! - idOf[b]! : 1) : -1
          return (x - y) * dir || idOf[a]! - idOf[b]!
        }
        expect(topKByKey(xs, k, key, dir, idOf)).toEqual(topK(xs, k, cmp))
      }
      expect(topKById(xs, k, idOf)).toEqual(topK(xs, k, (a, b) => idOf[a]! - idOf[b]!))
    }
  })
})
