/**
 * Reading uploaded files into header + rows: CSV (RFC 4180 through papaparse; UTF-8 with or without
 * BOM; comma, semicolon or tab), XLSX (exceljs; formulas and error cells refused) and JSON records.
 */
import Papa from 'papaparse'
import { isUtf8 } from 'node:buffer'
import { Readable } from 'node:stream'
import ExcelJS from 'exceljs'
import { Unzip, UnzipInflate } from 'fflate'
import type { RowIssue } from '../../../shared/records/ingest'
import { countOf } from '../../../shared/vocabulary'

export interface Table {
  headers: string[]
  rows: (string | number | null)[][]
}
export class FileProblem extends Error {
  /** For a header the template does not know: how the file could be read (shared/records/mapping.ts). */
  proposal?: unknown
  constructor (
    readonly status: number,
    message: string,
    readonly issues: RowIssue[] = []
  ) {
    super(message)
  }
}

export const MAX_FILE_BYTES = 25 * 1024 * 1024
export const MAX_ROWS = 100_000

export function detectKind (name: string, mediaType?: string): 'csv' | 'xlsx' | 'json' {
  const n = name.toLowerCase()
  if (n.endsWith('.xlsx') || mediaType?.includes('spreadsheetml')) return 'xlsx'
  if (n.endsWith('.json') || mediaType === 'application/json') return 'json'
  if (n.endsWith('.csv') || n.endsWith('.tsv') || n.endsWith('.txt') || mediaType?.startsWith('text/')) return 'csv'
  throw new FileProblem(415, `Cannot read "${name}": upload a .csv, .xlsx or .json file`, [
    { path: '/file', message: 'unsupported file type' }
  ])
}

/**
 * UTF-8 text of the upload. Valid files take Node's native check (buffer.isUtf8) and one decode; for an
 * invalid one, one linear pass finds the first bad byte and its line — neither TextDecoder nor isUtf8
 * says where the problem is, hence the small validator below (RFC 3629 well-formed sequences).
 */
export function decodeUtf8 (buf: Uint8Array): string {
  if (isUtf8(buf)) return new TextDecoder('utf-8').decode(buf).replace(/^\uFEFF/, '')
  const at = firstInvalidUtf8(buf)
  let line = 1
  for (let i = 0; i < at; i++) if (buf[i] === 10) line++
  throw new FileProblem(
    422,
    `The file is not UTF-8 text (first bad byte at byte ${at + 1}, line ${line}); save it as "CSV UTF-8"`,
    [{ row: line, path: '/file', message: 'not UTF-8' }]
  )
}

/** Offset of the first byte that does not belong to a well-formed UTF-8 sequence (RFC 3629, table 3-7 of Unicode); buf.length if none. */
export function firstInvalidUtf8 (buf: Uint8Array): number {
  const n = buf.length
  let i = 0
  while (i < n) {
    const b = buf[i]!
    if (b < 0x80) {
      i++
      continue
    }
    let need: number
    let lo = 0x80
    let hi = 0xbf
    if (b >= 0xc2 && b <= 0xdf) need = 1
    else if (b >= 0xe0 && b <= 0xef) {
      need = 2
      if (b === 0xe0) lo = 0xa0
      if (b === 0xed) hi = 0x9f
    }
    else if (b >= 0xf0 && b <= 0xf4) {
      need = 3
      if (b === 0xf0) lo = 0x90
      if (b === 0xf4) hi = 0x8f
    }
    else return i
    for (let k = 1; k <= need; k++) {
      const c = buf[i + k]
      if (c === undefined || c < (k === 1 ? lo : 0x80) || c > (k === 1 ? hi : 0xbf)) return i
    }
    i += need + 1
  }
  return n
}

/**
 * The separator a sheet uses: of comma, semicolon and tab, the one that splits the most of its first 200 lines into
 * the same number of cells (a title block above the table, or decimal commas, do not mislead it).
 */
export function guessDelimiter (text: string): string {
  const lines = text
    .slice(0, 200_000)
    .split(/\r?\n/, 200)
    .filter(l => l.trim())
  let best = ','
  let bestScore = -1
  for (const d of [';', '\t', ',']) {
    const counts = new Map<number, number>()
    for (const l of lines) {
      const n = l.split(d).length - 1
      if (n) counts.set(n, (counts.get(n) ?? 0) + 1)
    }
    const score = Math.max(0, ...counts.values())
    if (score > bestScore) {
      best = d
      bestScore = score
    }
  }
  return best
}

export function parseCsv (buf: Uint8Array, skipEmpty = true): Table {
  const text = decodeUtf8(buf)
  const res = Papa.parse<string[]>(
    text,
    skipEmpty
      ? { delimitersToGuess: [',', ';', '\t'], skipEmptyLines: 'greedy' }
      : { delimiter: guessDelimiter(text), skipEmptyLines: false }
  )
  const bad = res.errors.filter(e => e.type === 'Quotes')
  if (bad.length)
    throw new FileProblem(
      422,
      'The CSV has unbalanced quotes',
      bad.slice(0, 20).map(e => ({ row: (e.row ?? 0) + 1, path: '/file', message: e.message }))
    )
  const [headers, ...rows] = res.data
  if (!headers) throw new FileProblem(422, 'The file is empty', [{ path: '/file', message: 'no header row' }])
  return { headers, rows }
}

/** Caps for a workbook: what its XML may expand to, its shared-string table, and the cells read. */
export const MAX_XLSX_EXPANDED_BYTES = 256 * 1024 * 1024
export const MAX_XLSX_SHARED_STRINGS_BYTES = 48 * 1024 * 1024
export const MAX_XLSX_CELLS = 4_000_000

/**
 * How far the workbook expands, counted by inflating every entry as a stream (fflate) and throwing the
 * bytes away: the sizes a ZIP declares can lie, the inflated bytes cannot. Stops at the first cap.
 */
async function checkExpandedSize (buf: Uint8Array): Promise<void> {
  let total = 0
  let sinceTurn = 0
  let problem: FileProblem | null = null
  const unzip = new Unzip((entry) => {
    let mine = 0
    entry.ondata = (err, chunk) => {
      if (err) {
        problem ??= new FileProblem(422, 'The file is not a readable XLSX workbook', [{ path: '/file', message: 'not XLSX' }])
        return
      }
      total += chunk.length
      mine += chunk.length
      sinceTurn += chunk.length
      if (total > MAX_XLSX_EXPANDED_BYTES)
        problem ??= new FileProblem(
          413,
          `The workbook expands to more than ${MAX_XLSX_EXPANDED_BYTES / 1048576} MB of XML; save the data as CSV, or split it`,
          [{ path: '/file', message: 'expands too far' }]
        )
      if (/sharedStrings\.xml$/.test(entry.name) && mine > MAX_XLSX_SHARED_STRINGS_BYTES)
        problem ??= new FileProblem(
          413,
          `The workbook's text table is larger than ${MAX_XLSX_SHARED_STRINGS_BYTES / 1048576} MB`,
          [{ path: '/file', message: 'shared strings too large' }]
        )
      if (problem) entry.terminate()
    }
    entry.start()
  })
  unzip.register(UnzipInflate)
  try {
    // small input steps: fflate inflates one push into one buffer, and a 4 kB step expands to at most ~4 MB
    // (deflate's ratio is below 1 032:1); other requests get a turn after every 2 MB inflated or 64 kB read
    const step = 4096
    for (let i = 0, n = 0; i < buf.length && !problem; i += step, n++) {
      unzip.push(buf.subarray(i, Math.min(i + step, buf.length)), i + step >= buf.length)
      if (sinceTurn > 2 << 20 || n % 16 === 15) {
        sinceTurn = 0
        await new Promise(resolve => setImmediate(resolve))
      }
    }
  }
  catch {
    problem ??= new FileProblem(422, 'The file is not a readable XLSX workbook', [{ path: '/file', message: 'not XLSX' }])
  }
  if (problem) throw problem
}

/**
 * XLSX read as a stream (exceljs's WorkbookReader): rows are taken one at a time and the read stops at
 * the row and cell caps; the sheet named "records" is read, else the first. Formula and error cells are
 * refused, each by its address.
 */
export async function parseXlsx (buf: Uint8Array, want?: string): Promise<Table & { sheets: string[], sheet: string }> {
  if (buf.length < 4 || buf[0] !== 0x50 || buf[1] !== 0x4b)
    throw new FileProblem(422, 'The file is not a readable XLSX workbook', [{ path: '/file', message: 'not XLSX' }])
  await checkExpandedSize(buf)
  const reader = new ExcelJS.stream.xlsx.WorkbookReader(
    Readable.from([Buffer.from(buf.buffer, buf.byteOffset, buf.byteLength)]),
    { sharedStrings: 'cache', hyperlinks: 'ignore', styles: 'ignore', worksheets: 'emit', entries: 'ignore' }
  )
  const issues: RowIssue[] = []
  let chosen: { name: string, rows: (string | number | null)[][] } | null = null
  const sheets: string[] = []
  let cells = 0
  try {
    for await (const ws of reader as unknown as AsyncIterable<AsyncIterable<ExcelJS.Row> & { name: string }>) {
      sheets.push(ws.name)
      const isRecords = want ? ws.name === want : ws.name === 'records'
      if (chosen && !isRecords) {
        for await (const _row of ws) {
          void _row
        }
        continue
      } // drain other sheets
      const rows: (string | number | null)[][] = []
      let header: string[] = []
      for await (const row of ws) {
        // other requests get a turn every 500 rows (a large sheet takes seconds)
        if (rows.length % 500 === 499) await new Promise(resolve => setImmediate(resolve))
        if (rows.length > MAX_ROWS)
          throw new FileProblem(413, `Too many rows (at most ${MAX_ROWS} per upload)`, [
            { path: '/file', message: 'too many rows' }
          ])
        const width = Math.max(header.length, row.cellCount)
        cells += width
        if (cells > MAX_XLSX_CELLS)
          throw new FileProblem(413, `The sheet has more than ${MAX_XLSX_CELLS} cells; save the data as CSV, or split it`, [
            { path: '/file', message: 'too many cells' }
          ])
        const vals: (string | number | null)[] = []
        for (let c = 1; c <= width; c++) {
          const cell = row.getCell(c)
          const v = cell.value as unknown
          const column = header[c - 1] ?? String(c)
          if (v && typeof v === 'object' && ('formula' in (v as object) || 'sharedFormula' in (v as object))) {
            if (issues.length < 200)
              issues.push({
                row: row.number,
                column,
                path: `/file/${cell.address}`,
                message: `cell ${cell.address} holds a formula; paste values only`
              })
            vals.push(null)
          }
          else if (v && typeof v === 'object' && 'error' in (v as object)) {
            if (issues.length < 200)
              issues.push({
                row: row.number,
                column,
                path: `/file/${cell.address}`,
                message: `cell ${cell.address} holds the error ${(v as { error: string }).error}`
              })
            vals.push(null)
          }
          else if (v && typeof v === 'object' && 'richText' in (v as object)) {
            vals.push((v as { richText: { text: string }[] }).richText.map(t => t.text).join(''))
          }
          else if (v instanceof Date) {
            vals.push(v.toISOString().slice(0, 10))
          }
          else vals.push(v === undefined ? null : (v as string | number | null))
        }
        if (!rows.length) header = vals.map(h => String(h ?? ''))
        rows.push(vals)
      }
      if (!chosen || isRecords) chosen = { name: ws.name, rows }
    }
  }
  catch (e) {
    if (e instanceof FileProblem) throw e
    throw new FileProblem(422, 'The file is not a readable XLSX workbook', [{ path: '/file', message: 'not XLSX' }])
  }
  if (!chosen) throw new FileProblem(422, 'The workbook has no sheet', [{ path: '/file', message: 'no sheet' }])
  if (want && chosen.name !== want)
    throw new FileProblem(422, `The workbook has no sheet "${want}"; it has ${sheets.join(', ')}`, [
      { path: '/mapping/sheet', message: 'no such sheet' }
    ])
  if (issues.length) throw new FileProblem(422, `The workbook has ${countOf(issues.length, 'formula or error cell')}`, issues)
  const [headers, ...rows] = chosen.rows
  if (!headers) throw new FileProblem(422, 'The sheet is empty', [{ path: '/file', message: 'no header row' }])
  return { headers: headers.map(h => String(h ?? '')), rows, sheets, sheet: chosen.name }
}

export function parseJsonRecords (buf: Uint8Array): unknown[] {
  let data: unknown
  try {
    data = JSON.parse(decodeUtf8(buf))
  }
  catch (e) {
    if (e instanceof FileProblem) throw e
    throw new FileProblem(422, `The file is not valid JSON: ${(e as Error).message}`, [{ path: '/file', message: 'not JSON' }])
  }
  const records = Array.isArray(data) ? data : (data as { records?: unknown })?.records
  if (!Array.isArray(records))
    throw new FileProblem(422, 'A JSON upload is an array of records or { "records": [...] }', [
      { path: '/records', message: 'must be an array' }
    ])
  return records
}
