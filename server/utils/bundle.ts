/**
 * Citable, checksummed bundles: a ZIP in BagIt 1.0 layout (RFC 8493), streamed with archiver.
 * Records are read from the database in pages and hashed as they stream; the manifests are
 * written last, when every payload file's sha256 and size are known. A client that disconnects
 * stops the work.
 */
import { createHash } from 'node:crypto'
import { createReadStream, createWriteStream } from 'node:fs'
import { mkdtemp, rm } from 'node:fs/promises'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { PassThrough, Readable } from 'node:stream'
import { ZipArchive } from 'archiver'
import { sendStream, setHeaders, type H3Event } from 'h3'
import { and, asc, eq, gt, inArray, sql, type SQL } from 'drizzle-orm'
import { useDb, schema } from './db'
import { cff, dataciteJson, selectionCff, toCitable, type CitableVersion } from './citation'
import { publicUrl } from './mail'
import { httpError } from './errors'
import { clientAddress } from './rate-limit'
import rateRecordSchema from '../../schemas/rate-record.v1.json'
import datasetSchema from '../../schemas/dataset.v1.json'
import type { RateRecordV1 } from '../../shared/records/types'

const { rateRecords: records, datasetVersions: versions, datasets, labs } = schema
const PAGE = 5000

export const CSV_COLUMNS: [string, string, (r: RateRecordV1) => unknown][] = [
  ['donor_name', '', r => r.system.donor.name], ['donor_class', '', r => r.system.donor.class], ['donor_smiles', '', r => r.system.donor.smiles],
  ['acceptor_name', '', r => r.system.acceptor.name], ['acceptor_class', '', r => r.system.acceptor.class], ['acceptor_smiles', '', r => r.system.acceptor.smiles],
  ['bridge_name', '', r => r.system.bridge?.name], ['linkage', '', r => r.system.linkage], ['process', '', r => r.process], ['initial_state', '', r => r.initialState],
  ['solvent', '', r => r.medium.solvent], ['matrix', '', r => r.medium.matrix], ['permittivity', '', r => r.medium.permittivity], ['refractive_index', '', r => r.medium.refractiveIndex],
  ['temperature', 'K', r => r.temperatureK], ['distance_cc', 'angstrom', r => r.geometry?.centerToCenterAngstrom], ['distance_ee', 'angstrom', r => r.geometry?.edgeToEdgeAngstrom],
  ['rate', 's-1 or M-1 s-1', r => r.rate.value], ['rate_uncertainty', 'same as rate', r => r.rate.uncertainty], ['rate_kind', '', r => r.rate.kind], ['rate_method', '', r => r.rate.method],
  ['lifetime', 's', r => r.rate.lifetimeS], ['reference_lifetime', 's', r => r.rate.referenceLifetimeS],
  ['rate_as_reported', '', r => r.rate.original ? `${r.rate.original.value} ${r.rate.original.unit}` : undefined],
  ['delta_g', 'eV', r => r.drivingForce?.value], ['delta_g_uncertainty', 'eV', r => r.drivingForce?.uncertainty], ['delta_g_method', '', r => r.drivingForce?.method],
  ['delta_g_as_reported', '', r => r.drivingForce?.original ? `${r.drivingForce.original.value} ${r.drivingForce.original.unit}` : undefined],
  ['lambda_solvent', 'eV', r => r.reportedParameters?.lambdaSolvent], ['lambda_internal', 'eV', r => r.reportedParameters?.lambdaInternal],
  ['coupling', 'eV', r => r.reportedParameters?.coupling], ['vibration_energy', 'eV', r => r.reportedParameters?.vibrationEnergy],
  ['technique', '', r => r.technique.method], ['excitation_wavelength', 'nm', r => r.technique.excitationWavelengthNm], ['time_resolution', 's', r => r.technique.timeResolutionS],
  ['notes', '', r => r.notes], ['location', '', r => r.location]
]
const PROVENANCE = ['record_id', 'dataset_id', 'dataset_version', 'dataset_identifier', 'license']

/** Spreadsheet formula injection: a text cell starting with = + - @ or a control character is prefixed with '. */
export function neutralizeCell (v: unknown): unknown {
  return typeof v === 'string' && /^[=+\-@\t\r]/.test(v) ? `'${v}` : v
}

/**
 * One CSV line per RFC 4180 (quote a field only when it holds a comma, quote or line break).
 * Hand-written because papaparse's per-cell checks were the largest cost in the 100 000-record
 * bundle profile; the tests read the result back with papaparse.
 */
function csvLine (cells: unknown[]): string {
  let out = ''
  for (let i = 0; i < cells.length; i++) {
    const v = cells[i]
    const t = v === null || v === undefined ? '' : typeof v === 'string' ? v : String(v)
    out += (i ? ',' : '') + (/[",\r\n]/.test(t) ? `"${t.replace(/"/g, '""')}"` : t)
  }
  return out + '\r\n'
}

export interface Selection {
  /** SQL filter on rate_record joined with dataset_version (and dataset). */
  where: SQL
  description: string
  source: string
}

interface Row { id: number, raw: string, datasetId: number, versionNumber: number, doi: string | null, license: string }

async function * pages (sel: Selection, signal: AbortSignal): AsyncGenerator<Row[]> {
  const db = await useDb()
  let last = 0
  for (;;) {
    if (signal.aborted) return
    // the record's JSON text as stored: parsed once for the CSV, copied as is into records.json
    const rows = await db.select({ id: records.id, raw: sql<string>`rate_record.data`, datasetId: versions.datasetId, versionNumber: versions.versionNumber, doi: versions.doi, license: versions.license })
      .from(records).innerJoin(versions, eq(versions.id, records.versionId)).innerJoin(datasets, eq(datasets.id, versions.datasetId))
      .where(and(sel.where, gt(records.id, last))).orderBy(asc(records.id)).limit(PAGE)
    if (!rows.length) return
    last = rows[rows.length - 1]!.id
    yield rows as unknown as Row[]
  }
}

export async function countSelection (sel: Selection): Promise<number> {
  const db = await useDb()
  const [{ n }] = await db.select({ n: sql<number>`count(*)` }).from(records).innerJoin(versions, eq(versions.id, records.versionId)).innerJoin(datasets, eq(datasets.id, versions.datasetId)).where(sel.where) as [{ n: number }]
  return n
}

interface Entry { path: string, sha256: string, bytes: number }

/** Appends one file from chunks, hashing as it goes, and resolves once archiver has consumed it. */
function appendHashed (zip: ZipArchive, path: string, chunks: AsyncIterable<string | Buffer> | Iterable<string | Buffer>): Promise<Entry> {
  const hash = createHash('sha256')
  let bytes = 0
  const stream = Readable.from((async function * () {
    for await (const c of chunks) { const b = typeof c === 'string' ? Buffer.from(c, 'utf8') : c; hash.update(b); bytes += b.length; yield b }
  })())
  return new Promise((resolve, reject) => {
    stream.once('end', () => resolve({ path, sha256: hash.digest('hex'), bytes }))
    stream.once('error', reject)
    zip.append(stream, { name: path })
  })
}

/** Writes the bag to `out`; returns the counts. Stops early when `signal` aborts. */
export async function writeBundle (sel: Selection, out: NodeJS.WritableStream, signal: AbortSignal): Promise<{ records: number, datasets: number }> {
  const zip = new ZipArchive({ zlib: { level: 1 } })
  zip.on('warning', () => {})
  const done = new Promise<void>((resolve, reject) => { zip.on('error', reject); out.on('finish', () => resolve()); out.on('close', () => resolve()) })
  zip.pipe(out)
  signal.addEventListener('abort', () => zip.abort(), { once: true })
  const datasetIds = new Set<number>()
  const versionKeys = new Set<string>()
  let count = 0
  const payload: Entry[] = []
  const header = [...PROVENANCE, ...CSV_COLUMNS.map(([k, u]) => u ? `${k} (${u})` : k)]

  // One pass over the records: the CSV streams into the ZIP while records.json is spooled to a
  // temporary file (ZIP entries are sequential), then copied in.
  const spoolDir = await mkdtemp(join(tmpdir(), 'crosspoint-bundle-'))
  const spoolPath = join(spoolDir, 'records.json')
  try {
    const spool = createWriteStream(spoolPath)
    const put = (text: string) => spool.write(text) ? Promise.resolve() : new Promise<void>(r => spool.once('drain', () => r()))
    await put(`{"schema":${JSON.stringify(publicUrl('/schemas/rate-record.v1.json'))},"records":[`)
    const csv = async function * () {
      yield csvLine(header)
      for await (const page of pages(sel, signal)) {
        let lines = ''
        let json = ''
        for (const r of page) {
          datasetIds.add(r.datasetId); versionKeys.add(`${r.datasetId}:${r.versionNumber}`)
          const data = JSON.parse(r.raw) as RateRecordV1
          lines += csvLine([r.id, r.datasetId, r.versionNumber, r.doi ?? '', r.license, ...CSV_COLUMNS.map(([, , f]) => neutralizeCell(f(data) ?? ''))])
          json += `${count++ ? ',' : ''}{"id":${r.id},"datasetId":${r.datasetId},"datasetVersion":${r.versionNumber},"identifier":${JSON.stringify(r.doi)},"license":${JSON.stringify(r.license)},"record":${r.raw}}`
        }
        await put(json)
        yield lines
      }
    }
    payload.push(await appendHashed(zip, 'data/records.csv', csv()))
    await put(']}')
    await new Promise<void>((resolve, reject) => { spool.once('error', reject); spool.end(() => resolve()) })
    payload.push(await appendHashed(zip, 'data/records.json', createReadStream(spoolPath)))
  } finally {
    await rm(spoolDir, { recursive: true, force: true })
  }
  if (signal.aborted) { await done.catch(() => {}); return { records: count, datasets: datasetIds.size } }

  // dataset-level files: citations and licences of every contributing version
  const db = await useDb()
  const vrows = versionKeys.size
    ? await db.select({ v: versions, conceptDoi: datasets.conceptDoi, labName: labs.name }).from(versions).innerJoin(datasets, eq(datasets.id, versions.datasetId)).innerJoin(labs, eq(labs.id, datasets.labId))
      .where(inArray(versions.datasetId, [...datasetIds]))
    : []
  const cited: CitableVersion[] = vrows.filter(r => versionKeys.has(`${r.v.datasetId}:${r.v.versionNumber}`)).map(r => toCitable(r.v, r.conceptDoi, r.labName))
  for (const c of cited) payload.push(await appendHashed(zip, `data/datasets/${c.datasetId}-v${c.versionNumber}.datacite.json`, [JSON.stringify(dataciteJson(c), null, 2)]))
  payload.push(await appendHashed(zip, 'data/schemas/rate-record.v1.json', [JSON.stringify({ ...rateRecordSchema, $id: publicUrl('/schemas/rate-record.v1.json') }, null, 2)]))
  payload.push(await appendHashed(zip, 'data/schemas/dataset.v1.json', [JSON.stringify({ ...datasetSchema, $id: publicUrl('/schemas/dataset.v1.json') }, null, 2)]))
  payload.push(await appendHashed(zip, 'data/CITATION.cff', [bundleCff(cited, sel)]))
  payload.push(await appendHashed(zip, 'data/README.md', [readme(cited, sel, count, header)]))

  // tag files: manifest of the payload, bag-info with Payload-Oxum, then the tag manifest
  const manifest = payload.map(e => `${e.sha256}  ${e.path}`).join('\n') + '\n'
  const oxum = `${payload.reduce((s, e) => s + e.bytes, 0)}.${payload.length}`
  const bagInfo = [
    'Source-Organization: Crosspoint', `Bagging-Date: ${new Date().toISOString().slice(0, 10)}`, `Payload-Oxum: ${oxum}`,
    `External-Description: ${sel.description}`, `Source: ${sel.source}`, `Crosspoint-Query: ${sel.description}`,
    `Crosspoint-Records: ${count}`, ...cited.map(c => `Crosspoint-Dataset: ${c.doi ?? c.landingUrl} (${c.license})`)
  ].join('\n') + '\n'
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
  return cited.length === 1 ? cff(cited[0]!) : selectionCff(cited, `Crosspoint selection: ${sel.description}`, sel.source)
}

function readme (cited: CitableVersion[], sel: Selection, count: number, header: string[]): string {
  const licences = [...new Set(cited.map(c => c.license))]
  return [`# Crosspoint bundle`, '', `${count} electron-transfer rate records: ${sel.description}.`, `Made ${new Date().toISOString()} from ${sel.source}.`, '',
    '## What is here', '', '- `records.csv`: one row per record, canonical units in the header (eV, K, Å, s⁻¹ or M⁻¹ s⁻¹); the value as reported is kept in the *_as_reported columns.',
    '- `records.json`: the same records, in the same order; each `record` is valid against `schemas/rate-record.v1.json` (JSON Schema 2020-12).',
    '- `datasets/*.datacite.json`: citation metadata (DataCite) of every contributing dataset version.', '- `CITATION.cff`: how to cite this bundle.', '',
    '## Columns', '', '| column | unit |', '|---|---|', ...header.map(h => { const m = h.match(/^(.*?) \((.*)\)$/); return m ? `| ${m[1]} | ${m[2]} |` : `| ${h} | – |` }), '',
    '## How to cite', '', 'Cite every dataset you use:', '', ...cited.map(c => `- ${c.metadata.creators.map(a => a.name).join('; ')} (${(c.publishedAt ?? new Date()).getUTCFullYear()}). ${c.title} (Version ${c.versionNumber}). Crosspoint. ${c.doi ? `https://doi.org/${c.doi}` : c.landingUrl} — licence ${c.license}`), '',
    '## Licences', '', licences.length > 1 ? `This selection mixes licences: ${licences.join(', ')}. Each record's licence is in the license column; respect each.` : `All records: ${licences[0] ?? 'n/a'}.`, '',
    '## Checking the bag', '', 'This is a BagIt 1.0 bag (RFC 8493): `manifest-sha256.txt` lists the sha256 of every payload file, `bag-info.txt` gives Payload-Oxum (octets.files) and `tagmanifest-sha256.txt` covers the tag files.', '',
    'Model parameters in the records are what authors reported; derived values say how they were obtained. Demo datasets are invented.', ''].join('\n')
}

// ── answering a download ─────────────────────────────────────────────────────────────────

export const MAX_BUNDLE_RECORDS = 200_000
const running = new Map<string, number>()
export const MAX_CONCURRENT_BUNDLES = 2

/** Streams the bag as the answer; at most two bundles at once per client, and a disconnect stops the work. */
export async function sendBundle (event: H3Event, sel: Selection, filename: string) {
  const n = await countSelection(sel)
  if (n === 0) throw httpError(404, 'Nothing to bundle: the selection holds no record you may download')
  if (n > MAX_BUNDLE_RECORDS) throw httpError(413, `The selection holds ${n} records; a bundle takes at most ${MAX_BUNDLE_RECORDS}. Narrow the query.`, [{ path: '/query', message: 'too many records' }])
  const who = clientAddress(event)
  if ((running.get(who) ?? 0) >= MAX_CONCURRENT_BUNDLES) {
    setHeaders(event, { 'retry-after': '5' })
    throw httpError(429, `At most ${MAX_CONCURRENT_BUNDLES} bundles at once per client; wait for one to finish`)
  }
  running.set(who, (running.get(who) ?? 0) + 1)
  const controller = new AbortController()
  const out = new PassThrough()
  let finished = false
  const release = () => { if (!finished) { finished = true; running.set(who, Math.max(0, (running.get(who) ?? 1) - 1)) } }
  event.node.req.on('close', () => { if (!event.node.res.writableFinished) controller.abort(); release() })
  event.node.res.on('finish', release)
  setHeaders(event, { 'content-type': 'application/zip', 'content-disposition': `attachment; filename="${filename}"`, 'x-crosspoint-records': String(n) })
  writeBundle(sel, out, controller.signal).catch((e) => { out.destroy(e as Error) }).finally(release)
  return sendStream(event, out)
}
