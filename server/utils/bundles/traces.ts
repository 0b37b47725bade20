/** The trace files a selection's fitted rates name (trace, reference, measured responses), one per dataset and hash. */
import { sql } from 'drizzle-orm'
import { schema, useDb } from '../storage/db'
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
  // only datasets with traces attached can have records naming one (most archives have none at all); asked in SQL, not
  // as a list of ids, which could pass SQLite's limit on bound parameters in a large archive
  if (!(await db.select({ id: schema.traces.id }).from(schema.traces).limit(1)).length) return []
  // Records with provenance are few: a text search for the key (no JSON parse) passes the rest over, and the JSON of
  // the few is read once (four json_extract scans of every record took 7 s of a million-record bundle).
  const rows = await db.all<{ datasetId: number, h: string | null }>(
    sql`select distinct datasetId, value as h from (
      select dataset_version.dataset_id as datasetId,
        json_extract(rate_record.data, ${sql.raw(PATHS.map(p => `'${p}'`).join(', '))}) as hashes
      from ${FROM} where ${sel.where} and dataset_version.dataset_id in (select dataset_id from trace)
        and instr(rate_record.data, '"provenance"') > 0 and json_extract(rate_record.data, '$.provenance') is not null
    ), json_each(hashes) where value is not null`
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
