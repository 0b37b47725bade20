/**
 * Reading a decay trace file: CSV or XLSX (the upload's readers, with their caps) with time in the first column,
 * signal in the second and an optional σ in the third; a header row is optional. Every bad row is named.
 */
import { FileProblem, detectKind, parseCsv, parseXlsx, type Table } from '../deposit/parse'
import { MAX_TRACE_POINTS, MIN_TRACE_POINTS } from '../../../shared/physics/decay-check'
import type { RowIssue } from '../../../shared/records/ingest-types'

export const MAX_TRACE_BYTES = 10 * 1024 * 1024
export interface TracePoints {
  times: number[]
  signal: number[]
  sigma?: number[]
}

function num (v: unknown): number {
  if (typeof v === 'number') return v
  if (typeof v !== 'string' || !v.trim()) return NaN
  return Number(v.trim())
}

export async function parseTrace (name: string, mediaType: string, buf: Uint8Array): Promise<TracePoints> {
  const kind = detectKind(name, mediaType)
  if (kind === 'json')
    throw new FileProblem(415, 'A trace is a CSV or XLSX file of time, signal and (optionally) σ', [
      { path: '/file', message: 'JSON is not a trace format' }
    ])
  const table: Table = kind === 'xlsx' ? await parseXlsx(buf) : parseCsv(buf)
  // a first row of numbers is data, not a header
  const headerIsData = table.headers.length >= 2 && table.headers.slice(0, 2).every(h => Number.isFinite(num(h)))
  const rows = headerIsData ? [table.headers, ...table.rows] : table.rows
  const first = headerIsData ? 1 : 2
  const names = headerIsData
    ? ['time', 'signal', 'σ']
    : [table.headers[0] || 'time', table.headers[1] || 'signal', table.headers[2] || 'σ']
  if (rows.length > MAX_TRACE_POINTS)
    throw new FileProblem(
      413,
      `The trace has ${rows.length.toLocaleString('en')} rows; at most ${MAX_TRACE_POINTS.toLocaleString('en')}`,
      [{ row: first + MAX_TRACE_POINTS, path: '/file', message: 'too many rows' }]
    )
  if (rows.length < MIN_TRACE_POINTS)
    throw new FileProblem(
      422,
      `A trace needs at least ${MIN_TRACE_POINTS} rows of time and signal; this one has ${rows.length}`,
      [{ path: '/file', message: 'too few rows' }]
    )
  const withSigma = rows.some(r => r[2] !== undefined && r[2] !== null && r[2] !== '')
  const issues: RowIssue[] = []
  const times: number[] = []
  const signal: number[] = []
  const sigma: number[] = []
  rows.forEach((r, i) => {
    const row = first + i
    const cells = [num(r[0]), num(r[1]), withSigma ? num(r[2]) : 1]
    cells.forEach((v, c) => {
      if (!Number.isFinite(v) && issues.length < 50)
        issues.push({
          row,
          column: names[c],
          path: '/file',
          message: `"${String(r[c] ?? '').slice(0, 30)}" is not a finite number`
        })
    })
    if (withSigma && Number.isFinite(cells[2]) && !(cells[2]! > 0) && issues.length < 50)
      issues.push({ row, column: names[2], path: '/file', message: `σ must be > 0 (it is ${cells[2]})` })
    if (i > 0 && Number.isFinite(cells[0]) && !(cells[0]! > times[i - 1]!) && issues.length < 50)
      issues.push({
        row,
        column: names[0],
        path: '/file',
        message: `time ${cells[0]} is not after the row above (${times[i - 1]}): sort the trace`
      })
    times.push(cells[0]!)
    signal.push(cells[1]!)
    sigma.push(cells[2]!)
  })
  if (issues.length)
    throw new FileProblem(
      422,
      `${issues.length >= 50 ? 'At least 50' : issues.length} problems in the trace; nothing was kept`,
      issues
    )
  return withSigma ? { times, signal, sigma } : { times, signal }
}
