/** The upload check: header → columns and units, every row → record, every problem by row and column. */
import { COLUMN_BY_KEY, COLUMNS, parseHeader } from '../../../shared/records/columns'
import {
  ingestRow,
  validateRecord,
  type Cell,
  type IngestContext,
  type RowIssue,
  type SchemaValidator
} from '../../../shared/records/ingest'
import type { RateRecordV1 } from '../../../shared/records/types'
import { FileProblem, MAX_ROWS, detectKind, parseCsv, parseJsonRecords, parseXlsx, type Table } from './parse'
import { structureIssues } from '../search/structures'
import { extraHeaderWords, solventNames } from './header-synonyms'
import { applyMapping, proposeMapping, type Grid, type Mapping } from '../../../shared/records/mapping'

export interface CheckResult {
  kind: 'csv' | 'xlsx' | 'json'
  rowCount: number
  records: RateRecordV1[]
  issues: RowIssue[]
  issueCount: number
  warnings: RowIssue[]
  warningCount: number
  derivedCount: number
}

const MAX_LISTED = 1000

function checkHeaders (headers: string[]): { keys: (string | null)[], units: Record<string, string | undefined> } {
  const issues: RowIssue[] = []
  const seen = new Map<string, number>()
  const units: Record<string, string | undefined> = {}
  const keys = headers.map((h, i) => {
    const raw = String(h ?? '').trim()
    if (!raw) {
      issues.push({ row: 1, column: `#${i + 1}`, path: '/header', message: `column ${i + 1} has no header` })
      return null
    }
    const { key, unit } = parseHeader(raw)
    const def = COLUMN_BY_KEY.get(key)
    if (!def) {
      issues.push({ row: 1, column: raw, path: '/header', message: `unknown column "${raw}"` })
      return null
    }
    if (seen.has(key)) {
      issues.push({
        row: 1,
        column: raw,
        path: '/header',
        message: `column "${key}" appears twice (columns ${seen.get(key)! + 1} and ${i + 1})`
      })
      return null
    }
    seen.set(key, i)
    if (unit && !def.units) issues.push({ row: 1, column: raw, path: '/header', message: `column "${key}" takes no unit` })
    if (unit && def.units && !def.units.includes(unit))
      issues.push({
        row: 1,
        column: raw,
        path: '/header',
        message: `unknown unit "${unit}" for ${key}; use one of: ${def.units.join(', ')}`
      })
    if (!unit && def.units && def.units.length > 1 && def.kind === 'number')
      issues.push({
        row: 1,
        column: raw,
        path: '/header',
        message: `column "${key}" needs a unit in its header, e.g. "${key} (${def.units[0]})"`
      })
    units[key] = unit ?? def.units?.[0]
    return key
  })
  const unknown = issues.filter(i => i.message.startsWith('unknown column')).map(i => i.column)
  if (unknown.length)
    issues.push({ row: 1, path: '/header', message: `known columns are: ${COLUMNS.map(c => c.key).join(', ')}` })
  if (issues.length)
    throw new FileProblem(
      422,
      unknown.length
        ? `Unknown ${unknown.length === 1 ? 'column' : 'columns'}: ${unknown.join(', ')}`
        : 'The header row has problems',
      issues
    )
  return { keys, units }
}

/** A mapping that names columns, rows or units the file does not have, each named. */
function mappingProblems (grid: Grid, m: Mapping): RowIssue[] {
  const out: RowIssue[] = []
  const header = grid[m.headerRow - 1]
  if (!header)
    return [{ path: '/mapping/headerRow', message: `the sheet has ${grid.length} rows; there is no row ${m.headerRow}` }]
  if (m.firstDataRow <= m.headerRow) out.push({ path: '/mapping/firstDataRow', message: 'the data start after the header row' })
  if (m.columns.length > header.length)
    out.push({
      path: '/mapping/columns',
      message: `the header row has ${header.length} columns; the mapping names ${m.columns.length}`
    })
  const seen = new Map<string, number>()
  m.columns.forEach((c, i) => {
    if (!c.field) return
    const def = COLUMN_BY_KEY.get(c.field)
    if (!def)
      out.push({
        path: `/mapping/columns/${i}/field`,
        column: String(header[i] ?? ''),
        message: `"${c.field}" is not a field of the open format`
      })
    else if (c.unit && !def.units?.includes(c.unit))
      out.push({
        path: `/mapping/columns/${i}/unit`,
        column: String(header[i] ?? ''),
        message: `unit "${c.unit}" is not one of ${(def.units ?? ['none']).join(', ')}`
      })
    if (seen.has(c.field))
      out.push({
        path: `/mapping/columns/${i}/field`,
        column: String(header[i] ?? ''),
        message: `"${c.field}" is also column ${seen.get(c.field)! + 1}`
      })
    seen.set(c.field, i)
  })
  for (const [k, v] of Object.entries(m.constants ?? {})) {
    const def = COLUMN_BY_KEY.get(k)
    if (!def) out.push({ path: `/mapping/constants/${k}`, message: `"${k}" is not a field of the open format` })
    else if (v.unit && !def.units?.includes(v.unit))
      out.push({
        path: `/mapping/constants/${k}/unit`,
        message: `unit "${v.unit}" is not one of ${(def.units ?? ['none']).join(', ')}`
      })
  }
  return out
}

type Checked = Omit<CheckResult, 'kind'> & { origins: { path: string, row?: number }[] }

/**
 * SMILES go through RDKit (server side only, so after the shared row rules): a SMILES it cannot
 * read is an error at its row and column and the record is left out; a given InChIKey that
 * disagrees with the structure is a warning.
 */
async function withStructures ({ origins, ...res }: Checked): Promise<Omit<CheckResult, 'kind'>> {
  const { errors, warnings } = await structureIssues(res.records, i => origins[i]!)
  if (!errors.length && !warnings.length) return res
  const bad = new Set(errors.map(e => e.index))
  const keep = res.records.filter((_, i) => !bad.has(i))
  const issue = ({ index: _, ...rest }: (typeof errors)[number]): RowIssue => rest
  const byRow = (a: RowIssue, b: RowIssue) => (a.row ?? 0) - (b.row ?? 0)
  return {
    ...res,
    records: keep,
    issues: [...res.issues, ...errors.map(issue)].sort(byRow).slice(0, MAX_LISTED),
    issueCount: res.issueCount + errors.length,
    warnings: [...res.warnings, ...warnings.map(issue)].sort(byRow).slice(0, MAX_LISTED),
    warningCount: res.warningCount + warnings.length
  }
}

function checkTable (t: Table, validate: SchemaValidator, ctx: IngestContext, onProgress?: (done: number) => void): Checked {
  if (t.rows.length > MAX_ROWS)
    throw new FileProblem(413, `Too many rows: ${t.rows.length} (at most ${MAX_ROWS} per upload)`, [
      { path: '/file', message: 'too many rows' }
    ])
  const { keys, units } = checkHeaders(t.headers)
  const records: RateRecordV1[] = []
  const origins: Checked['origins'] = []
  const issues: RowIssue[] = []
  const warnings: RowIssue[] = []
  let issueCount = 0
  let warningCount = 0
  let derivedCount = 0
  for (let r = 0; r < t.rows.length; r++) {
    const row = t.rows[r]!
    const cells: Record<string, Cell> = {}
    if (row.length > keys.length && row.slice(keys.length).some(v => v !== null && String(v).trim() !== '')) {
      issueCount++
      if (issues.length < MAX_LISTED)
        issues.push({
          row: r + 2,
          path: '/row',
          message: `has ${row.length} cells but the header has ${keys.length} columns`
        })
      continue
    }
    keys.forEach((k, i) => {
      if (k) cells[k] = row[i]
    })
    const res = ingestRow(cells, units, validate, ctx)
    derivedCount += res.derived.length
    for (const i of res.issues) {
      issueCount++
      if (issues.length < MAX_LISTED) issues.push({ ...i, row: r + 2 })
    }
    for (const w of res.warnings) {
      warningCount++
      if (warnings.length < MAX_LISTED) warnings.push({ ...w, row: r + 2 })
    }
    if (res.record) {
      records.push(res.record)
      origins.push({ path: '', row: r + 2 })
    }
    if (onProgress && r % 5000 === 0) onProgress(r)
  }
  return { rowCount: t.rows.length, records, origins, issues, issueCount, warnings, warningCount, derivedCount }
}

/** The sheet as read (every row, the header among them), for the mapping step. */
export async function readGrid (name: string, mediaType: string | undefined, buf: Uint8Array, sheet?: string) {
  const kind = detectKind(name, mediaType)
  if (kind === 'json')
    throw new FileProblem(422, 'A JSON file is records in the open format; it needs no mapping', [
      { path: '/mapping', message: 'not a sheet' }
    ])
  // empty lines are kept here, so that row numbers stay the file's own
  const t = kind === 'csv' ? { ...parseCsv(buf, false), sheets: [] as string[], sheet: undefined } : await parseXlsx(buf, sheet)
  return { kind, grid: [t.headers, ...t.rows] as Grid, sheets: t.sheets, sheet: t.sheet }
}

/**
 * Checks a whole file; throws FileProblem for problems with the file itself. With a mapping the sheet is read as
 * the mapping says (header row, units, decimal comma, columns, constants) and every problem is named by the
 * file's own row number and header; without one, a header the template does not know is refused with a
 * proposed mapping beside the problems.
 */
export async function checkFile (
  name: string,
  mediaType: string | undefined,
  buf: Uint8Array,
  validate: SchemaValidator,
  ctx: IngestContext,
  mapping?: Mapping
): Promise<CheckResult> {
  const kind = detectKind(name, mediaType)
  if (kind === 'json') {
    const recs = parseJsonRecords(buf)
    if (recs.length > MAX_ROWS)
      throw new FileProblem(413, `Too many records: ${recs.length} (at most ${MAX_ROWS} per upload)`, [
        { path: '/records', message: 'too many records' }
      ])
    return { kind, ...(await checkRecords(recs, validate, ctx, '/records')) }
  }
  if (mapping) {
    const { grid } = await readGrid(name, mediaType, buf, mapping.sheet)
    const problems = mappingProblems(grid, mapping)
    if (problems.length) throw new FileProblem(422, 'The mapping does not fit the file', problems)
    const applied = applyMapping(grid, mapping)
    const checked = checkTable({ headers: applied.headers, rows: applied.rows }, validate, ctx)
    // rows and columns as the file names them
    const place = (i: RowIssue): RowIssue => ({
      ...i,
      ...(i.row !== undefined ? { row: applied.rowNumbers[i.row - 2] ?? i.row } : {}),
      ...(i.column ? { column: applied.columnNames[i.column] ?? i.column } : {})
    })
    const res = await withStructures({
      ...checked,
      origins: checked.origins.map(o => ({ ...o, row: o.row !== undefined ? applied.rowNumbers[o.row - 2] : o.row }))
    })
    return { kind, ...res, issues: res.issues.map(place), warnings: res.warnings.map(place) }
  }
  const table = kind === 'csv' ? parseCsv(buf) : await parseXlsx(buf)
  try {
    return { kind, ...(await withStructures(checkTable(table, validate, ctx))) }
  }
  catch (e) {
    if (e instanceof FileProblem && e.issues.some(i => i.path === '/header'))
      e.proposal = proposeMapping([table.headers, ...table.rows], await extraHeaderWords(), await solventNames())
    throw e
  }
}

/** Canonical records (JSON upload or the API): schema + shared rules, issues addressed by pointer and index. */
export async function checkRecords (
  recs: unknown[],
  validate: SchemaValidator,
  ctx: IngestContext,
  base: string
): Promise<Omit<CheckResult, 'kind'>> {
  const records: RateRecordV1[] = []
  const origins: Checked['origins'] = []
  const issues: RowIssue[] = []
  const warnings: RowIssue[] = []
  let issueCount = 0
  let warningCount = 0
  recs.forEach((rec, i) => {
    const v = validateRecord(rec, validate, ctx)
    for (const x of v.issues) {
      issueCount++
      if (issues.length < MAX_LISTED) issues.push({ ...x, row: i + 1, path: `${base}/${i}${x.path === '/' ? '' : x.path}` })
    }
    for (const w of v.warnings) {
      warningCount++
      if (warnings.length < MAX_LISTED) warnings.push({ ...w, row: i + 1, path: `${base}/${i}${w.path}` })
    }
    if (!v.issues.length) {
      records.push(rec as RateRecordV1)
      origins.push({ path: `${base}/${i}`, row: i + 1 })
    }
  })
  return withStructures({
    rowCount: recs.length,
    records,
    origins,
    issues,
    issueCount,
    warnings,
    warningCount,
    derivedCount: 0
  })
}
