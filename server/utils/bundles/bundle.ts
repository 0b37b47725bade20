/**
 * Citable, checksummed bundles: a ZIP in BagIt 1.0 layout (RFC 8493), streamed with archiver.
 * Records are read from the database in pages (their CSV lines stored beside them, their JSON as
 * stored) and hashed as they stream; the manifests are
 * written last, when every payload file's sha256 and size are known. A client that disconnects
 * stops the work.
 */
import { oneLine } from '../../../shared/text'
import { createHash } from 'node:crypto'
import { PassThrough, Readable } from 'node:stream'
import { ZipArchive } from 'archiver'
import { sendStream, setHeaders, type H3Event } from 'h3'
import { eq, inArray, sql, type SQL } from 'drizzle-orm'
import { useDb, useDbClient, schema } from '../storage/db'
import { cff, dataciteJson, selectionCff, toCitable, type CitableVersion } from '../publishing/citation'
import { publicUrl } from '../services/mail'
import { httpError } from '../http/errors'
import { clientAddress } from '../http/rate-limit'
import { CSV_FORMAT, CSV_HEADER, csvLine, recordCsvLine } from '../../../shared/records/csv'
import rateRecordSchema from '../../../schemas/rate-record.v1.json'
import datasetSchema from '../../../schemas/dataset.v1.json'
import type { RateRecordV1 } from '../../../shared/records/types'

const { rateRecords: records, datasetVersions: versions, datasets, labs } = schema
const PAGE = 5000

export interface Selection {
  /** SQL filter on rate_record joined with dataset_version (and dataset). */
  where: SQL
  description: string
  source: string
}

const JOINS = sql`inner join dataset_version on dataset_version.id = rate_record.version_id
  inner join dataset on dataset.id = dataset_version.dataset_id`
const FROM = sql`rate_record ${JOINS}`
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
async function withReadSnapshot<T> (fn: (r: Reader) => Promise<T>): Promise<T> {
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
async function* pages (
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
async function refreshCsvLines (sel: Selection): Promise<void> {
  const db = await useDb()
  for (;;) {
    const stale = await db.all<{ id: number, data: string }>(
      sql`select rate_record.id as id, rate_record.data as data from ${FROM} where (${sel.where})
        and (rate_record.csv_format is null or rate_record.csv_format != ${CSV_FORMAT}) limit 2000`
    )
    if (!stale.length) return
    await db.transaction(async (tx) => {
      for (const r of stale)
        await tx
          .update(records)
          .set({ csvLine: recordCsvLine(JSON.parse(r.data) as RateRecordV1), csvFormat: CSV_FORMAT })
          .where(eq(records.id, r.id))
    })
  }
}

export async function countSelection (sel: Selection): Promise<number> {
  const db = await useDb()
  const [{ n }] = (await db
    .select({ n: sql<number>`count(*)` })
    .from(records)
    .innerJoin(versions, eq(versions.id, records.versionId))
    .innerJoin(datasets, eq(datasets.id, versions.datasetId))
    .where(sel.where)) as [{ n: number }]
  return n
}

interface Entry {
  path: string
  sha256: string
  bytes: number
}

/** Appends one file from chunks, hashing as it goes, and resolves once archiver has consumed it. */
function appendHashed (
  zip: ZipArchive,
  path: string,
  chunks: AsyncIterable<string | Buffer> | Iterable<string | Buffer>
): Promise<Entry> {
  const hash = createHash('sha256')
  let bytes = 0
  const stream = Readable.from(
    (async function* () {
      for await (const c of chunks) {
        const b = typeof c === 'string' ? Buffer.from(c, 'utf8') : c
        hash.update(b)
        bytes += b.length
        yield b
      }
    })()
  )
  return new Promise((resolve, reject) => {
    stream.once('end', () => resolve({ path, sha256: hash.digest('hex'), bytes }))
    stream.once('error', reject)
    zip.append(stream, { name: path })
  })
}

/** Writes the bag to `out`; returns the counts. Stops early when `signal` aborts. */
export async function writeBundle (
  sel: Selection,
  out: NodeJS.WritableStream,
  signal: AbortSignal
): Promise<{ records: number, datasets: number }> {
  const zip = new ZipArchive({ zlib: { level: 1 } })
  zip.on('warning', () => {})
  const done = new Promise<void>((resolve, reject) => {
    zip.on('error', reject)
    out.on('finish', () => resolve())
    out.on('close', () => resolve())
  })
  zip.pipe(out)
  signal.addEventListener('abort', () => zip.abort(), { once: true })
  let count = 0
  const payload: Entry[] = []
  const header = CSV_HEADER
  await refreshCsvLines(sel)
  // Both files are read in one read transaction, so they hold the same records even if the
  // archive changes meanwhile (in WAL mode the snapshot blocks no writer).
  const contributing = await withReadSnapshot(async (tx) => {
    const found = await tx.get<{ first: number | null, last: number | null }>(
      sql`select min(rate_record.id) as first, max(rate_record.id) as last from ${FROM} where ${sel.where}`
    )
    const span = found?.first != null ? { first: found.first, last: found.last! } : { first: 1, last: 0 }
    const csv = async function* () {
      yield csvLine(header)
      for await (const p of pages(tx, sel, span, 'csv', signal)) {
        count += p.n
        yield p.bytes
      }
    }
    payload.push(await appendHashed(zip, 'data/records.csv', csv()))
    const json = async function* () {
      yield `{"schema":${JSON.stringify(publicUrl('/schemas/rate-record.v1.json'))},"records":[`
      let first = true
      for await (const p of pages(tx, sel, span, 'json', signal)) {
        if (!first) yield ','
        yield p.bytes
        first = false
      }
      yield ']}'
    }
    payload.push(await appendHashed(zip, 'data/records.json', json()))
    return tx.all<{ datasetId: number, versionNumber: number }>(
      sql`select distinct dataset_version.dataset_id as datasetId, dataset_version.version_number as versionNumber
        from ${FROM} where ${sel.where}`
    )
  })
  const db = await useDb()
  const datasetIds = new Set(contributing.map(c => c.datasetId))
  const versionKeys = new Set(contributing.map(c => `${c.datasetId}:${c.versionNumber}`))
  if (signal.aborted) {
    await done.catch(() => {})
    return { records: count, datasets: datasetIds.size }
  }

  // dataset-level files: citations and licences of every contributing version
  const vrows = versionKeys.size
    ? await db
        .select({ v: versions, conceptDoi: datasets.conceptDoi, labName: labs.name })
        .from(versions)
        .innerJoin(datasets, eq(datasets.id, versions.datasetId))
        .innerJoin(labs, eq(labs.id, datasets.labId))
        .where(inArray(versions.datasetId, [...datasetIds]))
    : []
  const cited: CitableVersion[] = vrows
    .filter(r => versionKeys.has(`${r.v.datasetId}:${r.v.versionNumber}`))
    .map(r => toCitable(r.v, r.conceptDoi, r.labName))
  for (const c of cited)
    payload.push(
      await appendHashed(zip, `data/datasets/${c.datasetId}-v${c.versionNumber}.datacite.json`, [
        JSON.stringify(dataciteJson(c), null, 2)
      ])
    )
  payload.push(
    await appendHashed(zip, 'data/schemas/rate-record.v1.json', [
      JSON.stringify({ ...rateRecordSchema, $id: publicUrl('/schemas/rate-record.v1.json') }, null, 2)
    ])
  )
  payload.push(
    await appendHashed(zip, 'data/schemas/dataset.v1.json', [
      JSON.stringify({ ...datasetSchema, $id: publicUrl('/schemas/dataset.v1.json') }, null, 2)
    ])
  )
  payload.push(await appendHashed(zip, 'data/CITATION.cff', [bundleCff(cited, sel)]))
  payload.push(await appendHashed(zip, 'data/README.md', [readme(cited, sel, count, header)]))

  // tag files: manifest of the payload, bag-info with Payload-Oxum, then the tag manifest
  const manifest = payload.map(e => `${e.sha256}  ${e.path}`).join('\n') + '\n'
  const oxum = `${payload.reduce((s, e) => s + e.bytes, 0)}.${payload.length}`
  const bagInfo
    = [
      'Source-Organization: Crosspoint',
      `Bagging-Date: ${new Date().toISOString().slice(0, 10)}`,
      `Payload-Oxum: ${oxum}`,
      `External-Description: ${sel.description}`,
      `Source: ${sel.source}`,
      `Crosspoint-Query: ${sel.description}`,
      `Crosspoint-Records: ${count}`,
      ...cited.map(c => `Crosspoint-Dataset: ${c.doi ?? c.landingUrl} (${c.license})`)
    ]
      .map(oneLine)
      .join('\n') + '\n' // one line per tag, whatever the stored values hold
  const tags: Entry[] = []
  tags.push(await appendHashed(zip, 'bagit.txt', ['BagIt-Version: 1.0\nTag-File-Character-Encoding: UTF-8\n']))
  tags.push(await appendHashed(zip, 'bag-info.txt', [bagInfo]))
  tags.push(await appendHashed(zip, 'manifest-sha256.txt', [manifest]))
  await appendHashed(zip, 'tagmanifest-sha256.txt', [tags.map(e => `${e.sha256}  ${e.path}`).join('\n') + '\n'])
  await zip.finalize()
  await done
  return { records: count, datasets: cited.length }
}

function bundleCff (cited: CitableVersion[], sel: Selection): string {
  return cited.length === 1
    ? cff(cited[0]!)
    : selectionCff(cited, `Crosspoint selection: ${sel.description}`, sel.source)
}

function readme (cited: CitableVersion[], sel: Selection, count: number, header: string[]): string {
  const licences = [...new Set(cited.map(c => c.license))]
  return [
    `# Crosspoint bundle`,
    '',
    `${count} electron-transfer rate records: ${sel.description}.`,
    `Made ${new Date().toISOString()} from ${sel.source}.`,
    '',
    '## What is here',
    '',
    '- `records.csv`: one row per record, canonical units in the header (eV, K, Å, s⁻¹ or M⁻¹ s⁻¹); '
    + 'the value as reported is kept in the *_as_reported columns.',
    '- `records.json`: the same records, in the same order; '
    + 'each `record` is valid against `schemas/rate-record.v1.json` (JSON Schema 2020-12).',
    '- `datasets/*.datacite.json`: citation metadata (DataCite) of every contributing dataset version.',
    '- `CITATION.cff`: how to cite this bundle.',
    '',
    '## Columns',
    '',
    '| column | unit |',
    '|---|---|',
    ...header.map((h) => {
      const m = h.match(/^(.*?) \((.*)\)$/)
      return m ? `| ${m[1]} | ${m[2]} |` : `| ${h} | – |`
    }),
    '',
    '## How to cite',
    '',
    'Cite every dataset you use:',
    '',
    ...cited.map(
      c =>
        `- ${c.metadata.creators.map(a => a.name).join('; ')} (${(c.publishedAt ?? new Date()).getUTCFullYear()}). `
        + `${c.title} (Version ${c.versionNumber}). Crosspoint. `
        + `${c.doi ? `https://doi.org/${c.doi}` : c.landingUrl} — licence ${c.license}`
    ),
    '',
    '## Licences',
    '',
    licences.length > 1
      ? `This selection mixes licences: ${licences.join(', ')}. Each record's licence is in the license column; respect each.`
      : `All records: ${licences[0] ?? 'n/a'}.`,
    '',
    '## Checking the bag',
    '',
    'This is a BagIt 1.0 bag (RFC 8493): `manifest-sha256.txt` lists the sha256 of every payload file, '
    + '`bag-info.txt` gives Payload-Oxum (octets.files) and `tagmanifest-sha256.txt` covers the tag files.',
    '',
    'Model parameters in the records are what authors reported; derived values say how they were obtained. Demo datasets are invented.',
    ''
  ].join('\n')
}

// ── answering a download ─────────────────────────────────────────────────────────────────

export const MAX_BUNDLE_RECORDS = 200_000
const running = new Map<string, number>()
export const MAX_CONCURRENT_BUNDLES = 2
/** Bundles at once on this instance, whoever asks (each holds a database connection for its read snapshot). */
export const MAX_BUNDLES_PER_INSTANCE = 8
let runningTotal = 0

/** Streams the bag as the answer; at most two bundles at once per client, and a disconnect stops the work. */
export async function sendBundle (event: H3Event, sel: Selection, filename: string) {
  const n = await countSelection(sel)
  if (n === 0) throw httpError(404, 'Nothing to bundle: the selection holds no record you may download')
  if (n > MAX_BUNDLE_RECORDS)
    throw httpError(
      413,
      `The selection holds ${n} records; a bundle takes at most ${MAX_BUNDLE_RECORDS}. Narrow the query.`,
      [{ path: '/query', message: 'too many records' }]
    )
  const who = clientAddress(event)
  if ((running.get(who) ?? 0) >= MAX_CONCURRENT_BUNDLES) {
    setHeaders(event, { 'retry-after': '5' })
    throw httpError(429, `At most ${MAX_CONCURRENT_BUNDLES} bundles at once per client; wait for one to finish`)
  }
  if (runningTotal >= MAX_BUNDLES_PER_INSTANCE) {
    setHeaders(event, { 'retry-after': '5' })
    throw httpError(503, `The server is making ${MAX_BUNDLES_PER_INSTANCE} bundles already; try again in a few seconds`)
  }
  running.set(who, (running.get(who) ?? 0) + 1)
  runningTotal++
  const controller = new AbortController()
  const out = new PassThrough()
  let finished = false
  const release = () => {
    if (finished) return
    finished = true
    const left = (running.get(who) ?? 1) - 1
    if (left > 0) running.set(who, left)
    else running.delete(who)
  }
  event.node.req.on('close', () => {
    if (!event.node.res.writableFinished) controller.abort()
    release()
  })
  event.node.res.on('finish', release)
  setHeaders(event, {
    'content-type': 'application/zip',
    'content-disposition': `attachment; filename="${filename}"`,
    'x-crosspoint-records': String(n)
  })
  // the instance-wide slot is freed when the work has really stopped (its snapshot closed), not at disconnect
  writeBundle(sel, out, controller.signal)
    .catch((e) => {
      out.destroy(e as Error)
    })
    .finally(() => {
      release()
      runningTotal--
    })
  return sendStream(event, out)
}
