/** The trace files a selection's fitted rates name (trace, reference, measured responses), one per dataset and hash. */
import { sql } from 'drizzle-orm'
import { useDb } from '../storage/db'
import { FROM, type Selection } from './selection'
import { tracesByHash } from '../traces/traces'

const PATHS = [
  '$.provenance.trace.sha256',
  '$.provenance.reference.sha256',
  '$.provenance.fit.irfSha256',
  '$.provenance.referenceFit.irfSha256'
]

export async function tracesOfSelection (sel: Selection): Promise<{ sha256: string, ext: string, storageKey: string }[]> {
  const db = await useDb()
  const parts = PATHS.map(
    p => sql`select dataset_version.dataset_id as datasetId, json_extract(rate_record.data, ${p}) as h from ${FROM}
    where ${sel.where} and json_extract(rate_record.data, '$.provenance') is not null`
  )
  const rows = await db.all<{ datasetId: number, h: string | null }>(
    sql`select distinct datasetId, h from (${sql.join(parts, sql` union all `)}) where h is not null`
  )
  const byDataset = new Map<number, string[]>()
  for (const r of rows) byDataset.set(r.datasetId, [...(byDataset.get(r.datasetId) ?? []), r.h!])
  const out = new Map<string, { sha256: string, ext: string, storageKey: string }>()
  for (const [datasetId, hashes] of byDataset) {
    for (const x of await tracesByHash(datasetId, hashes))
      out.set(x.t.sha256, { sha256: x.t.sha256, ext: x.storageKey.split('.').pop() ?? 'csv', storageKey: x.storageKey })
  }
  return [...out.values()]
}
