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
 * Notes are the exception: nearly every note is different, so they are indexed per record (index-notes.ts).
 *
 * Records: one slot per record in typed-array columns (numbers as Float64 with NaN for "none",
 * text as value ids, one facet-tuple id for the counts), so filters, facet counts and ranges are tight
 * loops without per-record objects.

 * Layers: index-schema.ts (types, columns) → index-notes.ts, index-store.ts (storage) → index-query.ts (queries) → this file
 * (similar systems; RecordIndex is the class to use).
 */
import { FIELD_NO, type TextField } from './index-schema'
import { jaccard, tanimoto, topK, trigrams } from './index-math'
import { QueryableIndex } from './index-query'

export class RecordIndex extends QueryableIndex {
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
  protected structureCloseness (a: Features, donorFp: number, acceptorFp: number, cache: Map<number, number>) {
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
  protected nameCloseness (
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

  protected features (s: number): Features {
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

  protected compare (a: Features, b: Features, nameCache: Map<number, Map<number, number>>, fpCache: Map<number, number>) {
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

export interface Features {
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
export interface Part {
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
