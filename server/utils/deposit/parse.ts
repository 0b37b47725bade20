/**
 * Reading uploaded files into header + rows: CSV (RFC 4180 through papaparse; UTF-8 with or without
 * BOM; comma, semicolon or tab), XLSX (exceljs; formulas and error cells refused) and JSON records.
 */
import Papa from 'papaparse'
import ExcelJS from 'exceljs'
import type { RowIssue } from '../../../shared/records/ingest'

export interface Table { headers: string[], rows: (string | number | null)[][] }
export class FileProblem extends Error {
  constructor (readonly status: number, message: string, readonly issues: RowIssue[] = []) { super(message) }
}

export const MAX_FILE_BYTES = 25 * 1024 * 1024
export const MAX_ROWS = 100_000

export function detectKind (name: string, mediaType?: string): 'csv' | 'xlsx' | 'json' {
  const n = name.toLowerCase()
  if (n.endsWith('.xlsx') || mediaType?.includes('spreadsheetml')) return 'xlsx'
  if (n.endsWith('.json') || mediaType === 'application/json') return 'json'
  if (n.endsWith('.csv') || n.endsWith('.tsv') || n.endsWith('.txt') || mediaType?.startsWith('text/')) return 'csv'
  throw new FileProblem(415, `Cannot read "${name}": upload a .csv, .xlsx or .json file`, [{ path: '/file', message: 'unsupported file type' }])
}

export function decodeUtf8 (buf: Uint8Array): string {
  try {
    return new TextDecoder('utf-8', { fatal: true }).decode(buf).replace(/^\uFEFF/, '')
  } catch {
    // find the first bad line for the message
    let line = 1
    for (let i = 0; i < buf.length; i++) {
      if (buf[i] === 10) line++
      try { new TextDecoder('utf-8', { fatal: true }).decode(buf.subarray(0, i + 1)) } catch { if (buf[i]! >= 0x80) break }
    }
    throw new FileProblem(422, `The file is not UTF-8 text (first bad byte near line ${line}); save it as "CSV UTF-8"`, [{ row: line, path: '/file', message: 'not UTF-8' }])
  }
}

export function parseCsv (buf: Uint8Array): Table {
  const text = decodeUtf8(buf)
  const res = Papa.parse<string[]>(text, { delimitersToGuess: [',', ';', '\t'], skipEmptyLines: 'greedy' })
  const bad = res.errors.filter(e => e.type === 'Quotes')
  if (bad.length) throw new FileProblem(422, 'The CSV has unbalanced quotes', bad.slice(0, 20).map(e => ({ row: (e.row ?? 0) + 1, path: '/file', message: e.message })))
  const [headers, ...rows] = res.data
  if (!headers) throw new FileProblem(422, 'The file is empty', [{ path: '/file', message: 'no header row' }])
  return { headers, rows }
}

export async function parseXlsx (buf: Uint8Array): Promise<Table> {
  const wb = new ExcelJS.Workbook()
  try { await wb.xlsx.load(buf as never) } catch { throw new FileProblem(422, 'The file is not a readable XLSX workbook', [{ path: '/file', message: 'not XLSX' }]) }
  const ws = wb.getWorksheet('records') ?? wb.worksheets[0]
  if (!ws) throw new FileProblem(422, 'The workbook has no sheet', [{ path: '/file', message: 'no sheet' }])
  const issues: RowIssue[] = []
  const out: (string | number | null)[][] = []
  const width = ws.getRow(1).cellCount
  ws.eachRow({ includeEmpty: false }, (row, rowNumber) => {
    const vals: (string | number | null)[] = []
    for (let c = 1; c <= Math.max(width, row.cellCount); c++) {
      const cell = row.getCell(c)
      const v = cell.value as unknown
      if (v && typeof v === 'object' && ('formula' in (v as object) || 'sharedFormula' in (v as object))) {
        issues.push({ row: rowNumber, column: String(ws.getRow(1).getCell(c).value ?? c), path: `/file/${cell.address}`, message: `cell ${cell.address} holds a formula; paste values only` })
        vals.push(null)
      } else if (v && typeof v === 'object' && 'error' in (v as object)) {
        issues.push({ row: rowNumber, column: String(ws.getRow(1).getCell(c).value ?? c), path: `/file/${cell.address}`, message: `cell ${cell.address} holds the error ${(v as { error: string }).error}` })
        vals.push(null)
      } else if (v && typeof v === 'object' && 'richText' in (v as object)) {
        vals.push((v as { richText: { text: string }[] }).richText.map(t => t.text).join(''))
      } else if (v instanceof Date) {
        vals.push(v.toISOString().slice(0, 10))
      } else vals.push(v === undefined ? null : v as string | number | null)
    }
    out.push(vals)
  })
  if (issues.length) throw new FileProblem(422, `The workbook has ${issues.length} formula or error cell(s)`, issues)
  const [headers, ...rows] = out
  if (!headers) throw new FileProblem(422, 'The sheet is empty', [{ path: '/file', message: 'no header row' }])
  return { headers: headers.map(h => String(h ?? '')), rows }
}

export function parseJsonRecords (buf: Uint8Array): unknown[] {
  let data: unknown
  try { data = JSON.parse(decodeUtf8(buf)) } catch (e) {
    if (e instanceof FileProblem) throw e
    throw new FileProblem(422, `The file is not valid JSON: ${(e as Error).message}`, [{ path: '/file', message: 'not JSON' }])
  }
  const records = Array.isArray(data) ? data : (data as { records?: unknown })?.records
  if (!Array.isArray(records)) throw new FileProblem(422, 'A JSON upload is an array of records or { "records": [...] }', [{ path: '/records', message: 'must be an array' }])
  return records
}
