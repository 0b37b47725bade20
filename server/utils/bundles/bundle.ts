// eslint-disable-next-line @typescript-eslint/triple-slash-reference -- an ambient module declaration, which import style cannot bring in
/// <reference path="../../types/archiver.d.ts" />
/**
 * Citable, checksummed bundles: a ZIP in BagIt 1.0 layout (RFC 8493), streamed with archiver.
 * Records are read from the database in pages (their CSV lines stored beside them, their JSON as
 * stored) and hashed as they stream; the manifests are
 * written last, when every payload file's sha256 and size are known. A client that disconnects
 * stops the work.
 */
import { oneLine } from '../../../shared/text'
import { createHash } from 'node:crypto'
import { Readable } from 'node:stream'
import { ZipArchive } from 'archiver'
import { eq, inArray, sql } from 'drizzle-orm'
import { useDb, schema } from '../storage/db'
import { dataciteJson, toCitable, type CitableVersion } from '../publishing/citation'
import { publicUrl } from '../services/mail'
import rateRecordSchema from '../../../schemas/rate-record.v1.json'
import datasetSchema from '../../../schemas/dataset.v1.json'
import { CSV_HEADER, csvLine } from '../../../shared/records/csv'
import { FROM, type Selection, pages, refreshCsvLines, withReadSnapshot } from './selection'
import { bundleCff, readme } from './texts'
import { tracesOfSelection } from './traces'
import { readOriginal } from '../storage/originals'

const { datasetVersions: versions, datasets, labs } = schema

interface Entry {
  path: string
  sha256: string
  bytes: number
}

/** Appends one file from chunks, hashing as it goes, and resolves once archiver has consumed it. */
function appendHashed (
  { zip, root }: { zip: ZipArchive, root?: string },
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
    zip.append(stream, { name: root ? `${root}/${path}` : path })
  })
}

/** Writes the bag to `out`; returns the counts. Stops early when `signal` aborts. */
export async function writeBundle (
  sel: Selection,
  out: NodeJS.WritableStream,
  signal: AbortSignal,
  /** the folder the bag is unpacked into (the download's name without .zip); BagIt paths stay relative to it */
  root?: string
): Promise<{ records: number, datasets: number }> {
  const zip = new ZipArchive({ zlib: { level: 1 } })
  const bag = { zip, root }
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
    payload.push(await appendHashed(bag, 'data/records.csv', csv()))
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
    payload.push(await appendHashed(bag, 'data/records.json', json()))
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
      await appendHashed(bag, `data/datasets/${c.datasetId}-v${c.versionNumber}.datacite.json`, [
        JSON.stringify(dataciteJson(c), null, 2)
      ])
    )
  payload.push(
    await appendHashed(bag, 'data/schemas/rate-record.v1.json', [
      JSON.stringify({ ...rateRecordSchema, $id: publicUrl('/schemas/rate-record.v1.json') }, null, 2)
    ])
  )
  payload.push(
    await appendHashed(bag, 'data/schemas/dataset.v1.json', [
      JSON.stringify({ ...datasetSchema, $id: publicUrl('/schemas/dataset.v1.json') }, null, 2)
    ])
  )
  // the decay traces fitted rates name (by sha256), as uploaded: data/traces/<sha256>.<ext>
  for (const t of await tracesOfSelection(sel)) {
    if (signal.aborted) break
    payload.push(await appendHashed(bag, `data/traces/${t.sha256}.${t.ext}`, [Buffer.from(await readOriginal(t.storageKey))]))
  }
  payload.push(await appendHashed(bag, 'data/CITATION.cff', [bundleCff(cited, sel)]))
  payload.push(await appendHashed(bag, 'data/README.md', [readme(cited, sel, count, header)]))

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
      `Crosspoint-Records: ${count}`,
      ...cited.map(c => `Crosspoint-Dataset: ${c.doi ?? c.landingUrl} (${c.license})`)
    ]
      .map(oneLine)
      .join('\n') + '\n' // one line per tag, whatever the stored values hold
  const tags: Entry[] = []
  tags.push(await appendHashed(bag, 'bagit.txt', ['BagIt-Version: 1.0\nTag-File-Character-Encoding: UTF-8\n']))
  tags.push(await appendHashed(bag, 'bag-info.txt', [bagInfo]))
  tags.push(await appendHashed(bag, 'manifest-sha256.txt', [manifest]))
  await appendHashed(bag, 'tagmanifest-sha256.txt', [tags.map(e => `${e.sha256}  ${e.path}`).join('\n') + '\n'])
  await zip.finalize()
  await done
  return { records: count, datasets: cited.length }
}
