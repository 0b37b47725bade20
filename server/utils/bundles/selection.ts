/** What a bundle holds: the selection as SQL, read in pages inside one read snapshot. */
import { eq, sql, type SQL } from 'drizzle-orm'
import { useDb, useDbClient, schema } from '../storage/db'
import { CSV_FORMAT, recordCsvLine } from '../../../shared/records/csv'
import type { RateRecordV1 } from '../../../shared/records/types'

const { rateRecords: records, datasetVersions: versions, datasets } = schema
const PAGE = 5000

export interface Selection {
  /** SQL filter on rate_record joined with dataset_version (and dataset). */
  where: SQL
  description: string
  source: string
}

const JOINS = sql`inner join dataset_version on dataset_version.id = rate_record.version_id
  inner join dataset on dataset.id = dataset_version.dataset_id`
export const FROM = sql`rate_record ${JOINS}`
/** The same tables, with SQLite kept on the rowid of rate_record (see pages()). */
const FROM_ROWID = sql`rate_record not indexed ${JOINS}`
/** A text cell as the CSV writer would make it, in SQL: formula cells neutralised, quoted when needed. */
const cell = (x: SQL) => {
  const safe = sql`(case when substr(${x}, 1, 1) in ('=', '+', '-', '@', char(9), char(13)) then '''' || ${x} else ${x} end)`
  return sql`(case when ${safe} glob ('*[",' || char(13, 10) || ']*') then '"' || replace(${safe}, '"', '""') || '"' else ${safe} end)`
}
/**
 * What every record of a version shares, made once per version (a materialised CTE, so SQLite does not
 * fold it back into the per-record expression): the provenance cells after record_id, and the JSON
 * item's fields between "id" and "record".
 */
const VERSION_PARTS = sql`with version_parts as materialized (select dataset_version.id as vid,
  ',' || dataset_version.dataset_id || ',' || dataset_version.version_number || ','
    || ${cell(sql`coalesce(dataset_version.doi, '')`)} || ',' || ${cell(sql`dataset_version.license`)} || ',' as csv,
  ',"datasetId":' || dataset_version.dataset_id || ',"datasetVersion":' || dataset_version.version_number
    || ',"identifier":' || coalesce(json_quote(dataset_version.doi), 'null')
    || ',"license":' || json_quote(dataset_version.license) || ',"record":' as json
  from dataset_version)`
const PREFIX = sql`rate_record.id || version_parts.csv`
const JSON_LINE = sql`'{"id":' || rate_record.id || version_parts.json || rate_record.data || '}'`

interface Reader {
  get: <T>(q: SQL) => Promise<T | undefined>
  all: <T>(q: SQL) => Promise<T[]>
}

/**
 * A read snapshot on its own connection: both files of a bundle see the same records even if the
 * archive changes meanwhile. Through the libSQL client, because drizzle's transaction() always
 * begins IMMEDIATE (a write lock that would queue every bundle and every writer behind each other);
 * a deferred transaction that only reads holds no lock in WAL mode.
 */
export async function withReadSnapshot<T> (fn: (r: Reader) => Promise<T>): Promise<T> {
  const db = await useDb()
  const tx = await (await useDbClient()).transaction('deferred')
  const run = async (q: SQL) => {
    const { sql: text, params } = (
      db as unknown as { dialect: { sqlToQuery: (q: SQL) => { sql: string, params: unknown[] } } }
    ).dialect.sqlToQuery(q)
    return (await tx.execute({ sql: text, args: params as never })).rows
  }
  try {
    const out = await fn({
      get: async <R>(q: SQL) => (await run(q))[0] as R | undefined,
      all: async <R>(q: SQL) => (await run(q)) as unknown as R[]
    })
    await tx.commit()
    return out
  }
  finally {
    tx.close()
  }
}

/**
 * The selection's records.csv rows or records.json items, a page at a time, each page joined by
 * SQLite (group_concat) and handed over as bytes (cast as blob: no UTF-8 decoding and re-encoding
 * in JavaScript), so one row crosses into JavaScript per page. A page is a range of 5 000 record
 * ids walked in rowid order (NOT INDEXED: SQLite would otherwise rescan the whole version through
 * its index for every page); an empty range skips ahead to the next record of the selection.
 */
export async function* pages (
  db: Reader,
  sel: Selection,
  span: { first: number, last: number },
  kind: 'csv' | 'json',
  signal: AbortSignal
): AsyncGenerator<{ bytes: Buffer, n: number }> {
  const item = kind === 'csv' ? sql`${PREFIX} || rate_record.csv_line` : JSON_LINE
  let lo = span.first
  while (lo <= span.last) {
    if (signal.aborted) return
    const hi = Math.min(lo + PAGE - 1, span.last)
    const row = await db.get<{
      n: number
      bytes: ArrayBuffer | null
    }>(sql`${VERSION_PARTS} select count(*) as n, cast(group_concat(${item}, ${kind === 'csv' ? '' : ','}) as blob) as bytes
      from ${FROM_ROWID} inner join version_parts on version_parts.vid = rate_record.version_id
      where rate_record.id between ${lo} and ${hi} and (${sel.where})`)
    if (row?.n) yield { bytes: Buffer.from(row.bytes!), n: row.n }
    else {
      const next = await db.get<{ id: number | null }>(
        sql`select min(rate_record.id) as id from ${FROM} where rate_record.id > ${hi} and (${sel.where})`
      )
      if (next?.id == null) return
      lo = next.id
      continue
    }
    lo = hi + 1
  }
}

/** Stored CSV lines missing or of another CSV_FORMAT are computed and stored first (rows written before the column existed). */
export async function refreshCsvLines (sel: Selection): Promise<void> {
  const db = await useDb()
  // Is any line in the archive stale? Three look-ups on rate_record_csv_format_idx; checking the selection through
  // its joins cost a scan of every record (3.4 s at a million) before every bundle, stale lines or not.
  // (all, not get: drizzle's libSQL get() throws on an empty result)
  const stale = await db.all<{ id: number }>(
    sql`select id from rate_record where csv_format is null or csv_format < ${CSV_FORMAT} or csv_format > ${CSV_FORMAT} limit 1`
  )
  if (!stale.length) return
  for (;;) {
    const rows = await db.all<{ id: number, data: string }>(
      sql`select rate_record.id as id, rate_record.data as data from ${FROM} where (${sel.where})
        and (rate_record.csv_format is null or rate_record.csv_format != ${CSV_FORMAT}) limit 2000`
    )
    if (!rows.length) return
    await db.transaction(async (tx) => {
      for (const r of rows)
        await tx
          .update(records)
          .set({ csvLine: recordCsvLine(JSON.parse(r.data) as RateRecordV1), csvFormat: CSV_FORMAT })
          .where(eq(records.id, r.id))
    })
  }
}

/**
 * How many records a selection holds, and the published datasets it draws on (each is counted as requested when
 * its bundle is sent): one grouped pass.
 */
export async function countSelection (sel: Selection): Promise<{ n: number, publishedDatasets: number[] }> {
  const db = await useDb()
  const rows = await db
    .select({ id: datasets.id, state: versions.state, n: sql<number>`count(*)` })
    .from(records)
    .innerJoin(versions, eq(versions.id, records.versionId))
    .innerJoin(datasets, eq(datasets.id, versions.datasetId))
    .where(sel.where)
    .groupBy(datasets.id, versions.state)
  return {
    n: rows.reduce((s, r) => s + r.n, 0),
    publishedDatasets: [...new Set(rows.filter(r => r.state === 'published').map(r => r.id))]
  }
}
