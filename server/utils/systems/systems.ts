/**
 * The systems measured by more than one record in the published archive, with their consensus. Computed from the
 * current published records in one pass and kept until the search index changes (every publication, withdrawal or
 * reindex moves its generation), so the routes answer from memory.
 */
import { createHash } from 'node:crypto'
import { eq, sql } from 'drizzle-orm'
import { schema, useDb } from '../storage/db'
import { publishedRecordsWhere } from '../publishing/archive'
import { useSearch } from '../search/search'
import { structuresFor } from '../search/structures'
import {
  DISCREPANCY_Z_FOR_REVIEW, groupSystems, identityOf, log10Sigma, sameSystem, zAgainst, type MeasuredSystem, type Synonyms,
  type SystemMember
} from '../../../shared/records/systems'
import type { RateRecordV1 } from '../../../shared/records/types'

const { rateRecords: records, datasetVersions: versions, datasets, labs } = schema
interface Lookups {
  list: MeasuredSystem[]
  byKey: Map<string, MeasuredSystem>
  /** systems of more than one record, by each record's id (a record page asks on every view) */
  byRecord: Map<number, MeasuredSystem>
  /** systems by identity, for matching submitted records without comparing each with every system */
  byIdentity: Map<string, MeasuredSystem[]>
}
let cached: { generation: number, lookups: Promise<Lookups> } | undefined
let synonymCache: Promise<Synonyms> | undefined

/** Curators' species synonyms, normalised alias → normalised name. */
export function curatorSynonyms (): Promise<Synonyms> {
  synonymCache ??= useDb()
    .then(db => db.select().from(schema.speciesSynonyms))
    .then(rows => Object.fromEntries(rows.map(r => [r.alias, r.canonical])))
  synonymCache.catch(() => {
    synonymCache = undefined
  })
  return synonymCache
}
/** After a synonym is added or removed: systems are grouped again on the next request. */
export function forgetSystems (): void {
  cached = undefined
  synonymCache = undefined
}

const speciesInchiKey = (role: 'donor' | 'acceptor' | 'bridge') =>
  sql<string | null>`coalesce(json_extract(${records.data}, ${`$.system.${role}.inchiKey`}),
    (select st.inchi_key from structure st where st.smiles = json_extract(${records.data}, ${`$.system.${role}.smiles`})))`

async function compute (): Promise<MeasuredSystem[]> {
  const db = await useDb()
  const rows = await db
    .select({
      id: records.id,
      labId: labs.id,
      labName: labs.name,
      datasetId: datasets.id,
      doi: versions.doi,
      donorName: records.donorName,
      acceptorName: records.acceptorName,
      bridgeName: records.bridgeName,
      // an InChIKey the record gives, else the one RDKit made from its SMILES (the structure cache)
      donorKey: speciesInchiKey('donor'),
      acceptorKey: speciesInchiKey('acceptor'),
      bridgeKey: speciesInchiKey('bridge'),
      linkage: records.linkage,
      process: records.process,
      medium: sql<string | null>`coalesce(${records.solvent}, json_extract(${records.data}, '$.medium.matrix'))`,
      temperatureK: records.temperatureK,
      rate: records.rate,
      log10Rate: records.log10Rate,
      uncertainty: sql<number | null>`json_extract(${records.data}, '$.rate.uncertainty')`
    })
    .from(records)
    .innerJoin(versions, eq(records.versionId, versions.id))
    .innerJoin(datasets, eq(versions.datasetId, datasets.id))
    .innerJoin(labs, eq(labs.id, datasets.labId))
    .where(publishedRecordsWhere())
  const members = rows.map(r => ({
    id: r.id,
    labId: r.labId,
    labName: r.labName,
    datasetId: r.datasetId,
    doi: r.doi,
    donor: { name: r.donorName, inchiKey: r.donorKey },
    acceptor: { name: r.acceptorName, inchiKey: r.acceptorKey },
    bridge: r.bridgeName ? { name: r.bridgeName, inchiKey: r.bridgeKey } : null,
    linkage: r.linkage,
    process: r.process,
    medium: r.medium,
    temperatureK: r.temperatureK,
    log10Rate: r.log10Rate,
    sigma: log10Sigma(r.rate, r.uncertainty)
  }))
  const keyOf = (identity: string, lowestK: number) =>
    createHash('sha256').update(`${identity}|${lowestK.toFixed(1)}`).digest('hex').slice(0, 16)
  return groupSystems(members, keyOf, await curatorSynonyms())
    .sort((a, b) => b.labCount - a.labCount || b.recordCount - a.recordCount || (a.key < b.key ? -1 : 1))
}

async function lookups (): Promise<Lookups> {
  const generation = (await useSearch()).index.generation
  if (!cached || cached.generation !== generation) {
    const built = compute().then((list) => {
      const byRecord = new Map<number, MeasuredSystem>()
      const byIdentity = new Map<string, MeasuredSystem[]>()
      for (const s of list) {
        if (s.recordCount > 1) for (const r of s.records) byRecord.set(r.id, s)
        ;(byIdentity.get(s.identity) ?? byIdentity.set(s.identity, []).get(s.identity)!).push(s)
      }
      return { list, byKey: new Map(list.map(s => [s.key, s])), byRecord, byIdentity }
    })
    cached = { generation, lookups: built }
    built.catch(() => {
      cached = undefined
    })
  }
  return cached.lookups
}

/** Every system of the published archive (one record or more), largest first. */
export async function allSystems (): Promise<MeasuredSystem[]> {
  return (await lookups()).list
}

export async function systemByKey (key: string): Promise<MeasuredSystem | undefined> {
  return (await lookups()).byKey.get(key)
}

/** The system a published record belongs to, when other records (or labs) measured it too. */
export async function systemOfRecord (id: number): Promise<MeasuredSystem | undefined> {
  return (await lookups()).byRecord.get(id)
}

/** The cached InChIKeys of the SMILES these records give. */
export async function inchiKeysOf (data: RateRecordV1[]): Promise<Map<string, string | null>> {
  const smiles = data
    .flatMap(d => [d.system.donor.smiles, d.system.acceptor.smiles, d.system.bridge?.smiles])
    .filter((x): x is string => !!x)
  const known = await structuresFor(smiles)
  return new Map([...known].map(([k, v]) => [k, v.inchiKey]))
}

/** A stored record as a member of a system (lab and dataset given by the caller). */
export function memberOf (
  r: { id: number, data: RateRecordV1, temperatureK: number, rate: number, log10Rate: number, solvent: string | null },
  where: { labId: number, labName: string, datasetId: number },
  /** InChIKeys RDKit made from SMILES (the structure cache), for species that give SMILES but no key */
  keys: Map<string, string | null> = new Map()
): SystemMember {
  const d = r.data
  const key = (sp: { inchiKey?: string, smiles?: string }) => sp.inchiKey ?? (sp.smiles ? keys.get(sp.smiles) : null) ?? null
  return {
    id: r.id,
    ...where,
    doi: null,
    donor: { name: d.system.donor.name, inchiKey: key(d.system.donor) },
    acceptor: { name: d.system.acceptor.name, inchiKey: key(d.system.acceptor) },
    bridge: d.system.bridge ? { name: d.system.bridge.name, inchiKey: key(d.system.bridge) } : null,
    linkage: d.system.linkage,
    process: d.process,
    medium: r.solvent ?? d.medium.matrix ?? null,
    temperatureK: r.temperatureK,
    log10Rate: r.log10Rate,
    sigma: log10Sigma(r.rate, d.rate.uncertainty)
  }
}

/**
 * For the review desk: each submitted record that matches a published system of another dataset, with the system's
 * consensus and the record's z against it; |z| > 3 is a discrepancy the curator sees before accepting.
 */
export async function systemMatches (members: SystemMember[]) {
  const { byIdentity } = await lookups()
  const synonyms = await curatorSynonyms()
  const out = []
  for (const m of members) {
    const candidates = byIdentity.get(identityOf(m, synonyms)) ?? []
    const sys = candidates.find(s => sameSystem(s, m, synonyms) && s.records.some(r => r.datasetId !== m.datasetId))
    if (!sys) continue
    const against = zAgainst({ ...sys, records: sys.records.filter(r => r.datasetId !== m.datasetId) }, m)
    out.push({
      recordId: m.id,
      key: sys.key,
      labCount: sys.labCount,
      recordCount: sys.recordCount,
      publishedLog10Rate: against?.mean ?? null,
      log10Rate: m.log10Rate,
      z: against?.z ?? null,
      discrepant: against ? Math.abs(against.z) > DISCREPANCY_Z_FOR_REVIEW : false
    })
  }
  return out
}

/** The body of POST /api/v1/species-synonyms (also its OpenAPI request schema). */
export const SYNONYM_BODY = {
  type: 'object',
  additionalProperties: false,
  required: ['alias', 'canonical'],
  properties: {
    alias: { type: 'string', minLength: 1, maxLength: 120, description: 'the other name, as records write it' },
    canonical: { type: 'string', minLength: 1, maxLength: 120, description: 'the name it stands for' }
  }
}
