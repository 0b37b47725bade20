/**
 * Which records measure the same system. A system is the same donor, acceptor and bridge, the same linkage, process
 * and medium (solvent or matrix), at the same temperature within ±2 K. A species is identified by its InChIKey where
 * the record gives one, otherwise by its normalised name: Unicode-normalised, lower case, without spaces and
 * punctuation other than charge signs ("N,N-Dimethylaniline" = "n,n-dimethylaniline" = "N,N dimethylaniline"), after
 * the synonyms below and those curators add (stored in the database). Temperatures are grouped from the lowest up:
 * a group takes every record within 4 K of its first, so all of its members lie within ±2 K of the group's middle.
 */
import { DISCREPANCY_Z, dersimonianLaird, leaveGroupOutZ, type Consensus } from '../stats/consensus'

/** Other names of species, normalised form → the normalised name they stand for. */
export const SPECIES_SYNONYMS: Record<string, string> = {
  zincporphyrin: 'znp',
  zinctetraphenylporphyrin: 'zntpp',
  freebaseporphyrin: 'h2p',
  methylviologen: 'mv2+',
  benzylviologen: 'bv2+',
  trisbipyridineruthenium: 'rubpy32+'
}
export const TEMPERATURE_WINDOW_K = 4
/** |z| above this against the published consensus is a warning at review (the same rule as between labs). */
export const DISCREPANCY_Z_FOR_REVIEW = DISCREPANCY_Z

/** Curators' synonyms (normalised alias → normalised name), added to the built-in ones. */
export type Synonyms = Readonly<Record<string, string>>

/** A name without case, spaces and punctuation (charge signs kept), before any synonym. */
export function bareName (name: string | null | undefined): string {
  return (name ?? '').normalize('NFKC').toLowerCase().replace(/[^\p{L}\p{N}+]/gu, '')
}
export function normaliseName (name: string | null | undefined, synonyms: Synonyms = {}): string {
  const n = bareName(name)
  return synonyms[n] ?? SPECIES_SYNONYMS[n] ?? n
}
export function speciesKey (s: { name?: string | null, inchiKey?: string | null } | null | undefined, synonyms: Synonyms = {}): string {
  if (!s) return ''
  return s.inchiKey ? `ik:${s.inchiKey.toUpperCase()}` : `n:${normaliseName(s.name, synonyms)}`
}

export interface SystemMember {
  id: number
  labId: number
  labName: string
  datasetId: number
  doi: string | null
  donor: { name: string, inchiKey?: string | null }
  acceptor: { name: string, inchiKey?: string | null }
  bridge?: { name: string, inchiKey?: string | null } | null
  linkage: string
  process: string
  medium: string | null
  temperatureK: number
  log10Rate: number
  /** σ of log10 k from the record's own uncertainty, or null */
  sigma: number | null
}
export interface SystemRecord extends SystemMember {
  /** σ used for the consensus (the record's, or its dataset's median) */
  sigmaUsed: number | null
  sigmaImputed: boolean
  z: number | null
  discrepant: boolean
}
export interface MeasuredSystem {
  key: string
  /** the identity string (species keys, linkage, process, medium) the key was made from */
  identity: string
  donor: string
  acceptor: string
  bridge: string | null
  linkage: string
  process: string
  medium: string | null
  temperatureK: number
  labCount: number
  recordCount: number
  consensus: { log10Rate: number, stderr: number, tau: number, q: number, i2: number } | null
  discrepant: boolean
  records: SystemRecord[]
}

export function identityOf (m: SystemMember, synonyms: Synonyms = {}): string {
  return [
    speciesKey(m.donor, synonyms), speciesKey(m.acceptor, synonyms), speciesKey(m.bridge, synonyms), m.linkage, m.process,
    normaliseName(m.medium, synonyms)
  ].join('|')
}

/** σ of log10 k from a rate and its 1σ uncertainty (first-order propagation: σ / (k ln 10)). */
export function log10Sigma (rate: number, uncertainty: number | null | undefined): number | null {
  return uncertainty && uncertainty > 0 && rate > 0 ? uncertainty / (rate * Math.LN10) : null
}

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b)
  return s.length % 2 ? s[(s.length - 1) / 2]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2
}

/** Groups records into systems and computes each system's consensus (with records from at least two labs). */
export function groupSystems (
  members: readonly SystemMember[],
  /** a short stable key from the identity and the group's lowest temperature (the server hashes them) */
  keyOf: (identity: string, lowestK: number) => string,
  synonyms: Synonyms = {}
): MeasuredSystem[] {
  // each dataset's median σ stands in for records that give none
  const perDataset = new Map<number, number[]>()
  for (const m of members) {
    if (m.sigma !== null) (perDataset.get(m.datasetId) ?? perDataset.set(m.datasetId, []).get(m.datasetId)!).push(m.sigma)
  }
  const datasetMedian = new Map([...perDataset].map(([d, xs]) => [d, median(xs)]))
  const byIdentity = new Map<string, SystemMember[]>()
  for (const m of members) {
    const k = identityOf(m, synonyms)
    ;(byIdentity.get(k) ?? byIdentity.set(k, []).get(k)!).push(m)
  }
  const out: MeasuredSystem[] = []
  for (const [identity, list] of byIdentity) {
    list.sort((a, b) => a.temperatureK - b.temperatureK || a.id - b.id)
    for (let i = 0; i < list.length;) {
      let j = i
      while (j < list.length && list[j]!.temperatureK <= list[i]!.temperatureK + TEMPERATURE_WINDOW_K) j++
      out.push(system(identity, keyOf(identity, list[i]!.temperatureK), list.slice(i, j), datasetMedian))
      i = j
    }
  }
  return out
}

function system (identity: string, key: string, group: SystemMember[], datasetMedian: Map<number, number>): MeasuredSystem {
  const first = group[0]!
  const records: SystemRecord[] = group.map((m) => {
    const imputed = m.sigma === null ? datasetMedian.get(m.datasetId) ?? null : null
    return { ...m, sigmaUsed: m.sigma ?? imputed, sigmaImputed: m.sigma === null && imputed !== null, z: null, discrepant: false }
  })
  const labs = new Set(group.map(m => m.labId))
  const usable = records.filter(r => r.sigmaUsed !== null)
  let consensus: Consensus | null = null
  if (labs.size >= 2 && new Set(usable.map(r => r.labId)).size >= 2) {
    const ms = usable.map(r => ({ y: r.log10Rate, sigma: r.sigmaUsed! }))
    consensus = dersimonianLaird(ms)
    // each record against the consensus of the other labs (its own lab's replicates left out with it)
    leaveGroupOutZ(ms, usable.map(r => r.labId)).forEach((z, i) => {
      usable[i]!.z = z
      usable[i]!.discrepant = Math.abs(z) > DISCREPANCY_Z
    })
  }
  const temps = group.map(m => m.temperatureK)
  return {
    key,
    identity,
    donor: first.donor.name,
    acceptor: first.acceptor.name,
    bridge: first.bridge?.name ?? null,
    linkage: first.linkage,
    process: first.process,
    medium: first.medium,
    temperatureK: Math.round(((Math.min(...temps) + Math.max(...temps)) / 2) * 10) / 10,
    labCount: labs.size,
    recordCount: group.length,
    consensus: consensus
      ? { log10Rate: consensus.mean, stderr: consensus.stderr, tau: consensus.tau, q: consensus.q, i2: consensus.i2 }
      : null,
    discrepant: records.some(r => r.discrepant),
    records
  }
}

/**
 * How a new measurement (a submitted record) sits against a published system: same identity, temperature within ±2 K
 * of the system's middle. z is against the random-effects consensus of the published records (all of them, whatever
 * their number of labs), as for a new lab's value.
 */
export function zAgainst (sys: MeasuredSystem, m: Pick<SystemMember, 'log10Rate' | 'sigma'>): { z: number, mean: number } | null {
  const usable = sys.records.filter(r => r.sigmaUsed !== null)
  if (!usable.length || m.sigma === null) return null
  const c = dersimonianLaird(usable.map(r => ({ y: r.log10Rate, sigma: r.sigmaUsed! })))
  return { z: (m.log10Rate - c.mean) / Math.sqrt(m.sigma * m.sigma + c.tau2 + c.stderr * c.stderr), mean: c.mean }
}
export function sameSystem (sys: MeasuredSystem, m: SystemMember, synonyms: Synonyms = {}): boolean {
  return sys.identity === identityOf(m, synonyms) && Math.abs(m.temperatureK - sys.temperatureK) <= TEMPERATURE_WINDOW_K / 2
}
