/**
 * Reading a spreadsheet as a lab wrote it: where its header and data start, how it writes numbers (decimal comma,
 * thousands separators), which of its columns is which field of the open format in which unit (from the header:
 * "T / K", "k (s-1)", "tau [ps]", "ΔG° (eV)", "E_ox vs SCE / V"), and values set once for the whole file.
 * proposeMapping guesses; the person (or a script) confirms or changes it; applyMapping turns the sheet into the
 * template's columns so that the usual checks run unchanged, with every row and column still named as in the file.
 */
import { COLUMN_BY_KEY } from './columns'

export type Grid = (string | number | null)[][]
export interface ColumnMapping {
  field: string | null
  unit?: string
}
export interface Mapping {
  /** XLSX: the sheet read (default: "records", else the first). */
  sheet?: string
  /** 1-based rows of the sheet: the header, an optional row of units under it, the first row of data. */
  headerRow: number
  unitsRow?: number
  firstDataRow: number
  decimal: '.' | ','
  thousands: '' | ',' | '.' | ' '
  /** One entry per column of the header row, in order. */
  columns: ColumnMapping[]
  /** Fields with one value for the whole file (e.g. a solvent written once in a title cell). */
  constants?: Record<string, { value: string | number, unit?: string }>
}

/** A header name as the synonyms are looked up: NFKC, lower case, Greek Δ/τ spelled out, punctuation as spaces. */
export const normaliseHeader = (s: string) =>
  s
    .normalize('NFKC')
    .toLowerCase()
    .replace(/[°^*·]/g, '')
    .replace(/δ/g, 'd')
    .replace(/τ/g, 'tau')
    .replace(/[\s_\-.]+/g, ' ')
    .trim()

/** Header words → field (common practice in the field's spreadsheets; curators may add more). */
export const HEADER_SYNONYMS: Record<string, string> = {
  'donor': 'donor_name',
  'donor name': 'donor_name',
  'd': 'donor_name',
  'electron donor': 'donor_name',
  'acceptor': 'acceptor_name',
  'acceptor name': 'acceptor_name',
  'a': 'acceptor_name',
  'electron acceptor': 'acceptor_name',
  'bridge': 'bridge_name',
  'spacer': 'bridge_name',
  'linker': 'bridge_name',
  'solvent': 'solvent',
  'medium': 'solvent',
  'solv': 'solvent',
  't': 'temperature',
  'temp': 'temperature',
  'temperature': 'temperature',
  'k': 'rate',
  'ket': 'rate',
  'k et': 'rate',
  'rate': 'rate',
  'rate constant': 'rate',
  'kcs': 'rate',
  'kcr': 'rate',
  'k cs': 'rate',
  'k cr': 'rate',
  'dk': 'rate_uncertainty',
  'k error': 'rate_uncertainty',
  'k err': 'rate_uncertainty',
  'error k': 'rate_uncertainty',
  'sigma k': 'rate_uncertainty',
  'dg': 'delta_g',
  'dg0': 'delta_g',
  'dgo': 'delta_g',
  'delta g': 'delta_g',
  'driving force': 'delta_g',
  'dget': 'delta_g',
  'dg et': 'delta_g',
  'tau': 'lifetime',
  'lifetime': 'lifetime',
  'tau da': 'lifetime',
  'tau0': 'reference_lifetime',
  'tau 0': 'reference_lifetime',
  'tau ref': 'reference_lifetime',
  'tau d': 'reference_lifetime',
  'reference lifetime': 'reference_lifetime',
  'eox': 'donor_oxidation_potential',
  'e ox': 'donor_oxidation_potential',
  'ered': 'acceptor_reduction_potential',
  'e red': 'acceptor_reduction_potential',
  'e00': 'excitation_energy',
  'e 00': 'excitation_energy',
  'r': 'distance_cc',
  'rcc': 'distance_cc',
  'r cc': 'distance_cc',
  'distance': 'distance_cc',
  'ree': 'distance_ee',
  'r ee': 'distance_ee',
  'process': 'process',
  'technique': 'technique',
  'method': 'technique',
  'notes': 'notes',
  'comment': 'notes',
  'comments': 'notes',
  'offset': 'reference_offset',
  'reference offset': 'reference_offset',
  'ref offset': 'reference_offset',
  'linkage': 'linkage',
  'state': 'initial_state',
  'initial state': 'initial_state',
  'source': 'location',
  'location': 'location'
}

/** Unit spellings → the template's unit codes. */
const UNIT_WORDS: Record<string, string> = {
  's-1': 's-1',
  's^-1': 's-1',
  '1/s': 's-1',
  's⁻¹': 's-1',
  '/s': 's-1',
  'ns-1': 'ns-1',
  'ns^-1': 'ns-1',
  '1/ns': 'ns-1',
  'ns⁻¹': 'ns-1',
  'ps-1': 'ps-1',
  'ps^-1': 'ps-1',
  '1/ps': 'ps-1',
  'ps⁻¹': 'ps-1',
  'us-1': 'us-1',
  'µs-1': 'us-1',
  'μs-1': 'us-1',
  'ms-1': 'ms-1',
  'm-1 s-1': 'M-1 s-1',
  'm^-1 s^-1': 'M-1 s-1',
  '1/(m s)': 'M-1 s-1',
  'l/(mol s)': 'M-1 s-1',
  'm-1s-1': 'M-1 s-1',
  's': 's',
  'ms': 'ms',
  'us': 'us',
  'µs': 'us',
  'μs': 'us',
  'ns': 'ns',
  'ps': 'ps',
  'fs': 'fs',
  'k': 'K',
  'kelvin': 'K',
  'c': 'degC',
  '°c': 'degC',
  'degc': 'degC',
  'ev': 'eV',
  'mev': 'meV',
  'cm-1': 'cm-1',
  'cm^-1': 'cm-1',
  'kj/mol': 'kJ/mol',
  'kj mol-1': 'kJ/mol',
  'kcal/mol': 'kcal/mol',
  'v': 'V',
  'mv': 'mV',
  'a': 'angstrom',
  'å': 'angstrom',
  'angstrom': 'angstrom',
  'nm': 'nm',
  'pm': 'pm'
}
const ELECTRODES = ['SCE', 'SHE', 'NHE', 'Ag/AgCl', 'Ag/Ag+', 'Fc+/Fc']

/**
 * A header split into its name, unit and reference electrode, in any of the usual notations:
 * "T / K", "k (s-1)", "tau [ps]", "ΔG° (eV)", "rate in ns-1", "E_ox vs SCE / V".
 */
export function splitHeader (h: string): { name: string, unit?: string, reference?: string } {
  let s = h.trim()
  let unit: string | undefined
  let reference: string | undefined
  const vs = s.match(/\s+vs\.?\s+(SCE|SHE|NHE|Ag\/AgCl|Ag\/Ag\+|Fc\+?\/Fc)\b/i)
  if (vs) {
    reference = ELECTRODES.find(e => e.toLowerCase() === vs[1]!.toLowerCase().replace(/^fc\//, 'fc+/'))
    s = s.replace(vs[0], '')
  }
  const m
    = s.match(/^(.*?)\s*(?:\(([^()]*)\)|\[([^[\]]*)\]|\{([^{}]*)\})\s*$/)
      ?? s.match(/^(.*?)\s+\/\s+(\S.*)$/)
      ?? s.match(/^(.*?)\s+in\s+(\S+)$/i)
  if (m) {
    s = m[1]!.trim()
    unit = (m[2] ?? m[3] ?? m[4] ?? '').trim() || undefined
  }
  return { name: s, unit, reference }
}

/** The template unit code a unit spelling stands for, if the field takes it. */
export function unitFor (field: string, spelled: string | undefined): string | undefined {
  const def = COLUMN_BY_KEY.get(field)
  if (!def?.units || !spelled) return undefined
  const exact = def.units.find(u => u === spelled)
  if (exact) return exact
  const code = UNIT_WORDS[spelled.toLowerCase().replace(/\s+/g, ' ').trim()] ?? UNIT_WORDS[spelled.trim()]
  return code && def.units.includes(code) ? code : undefined
}

/** The field a header names: the template's own key, or a synonym (built-in, then the curators'). */
export function fieldFor (name: string, extra: Record<string, string> = {}): string | null {
  const key = name.trim().toLowerCase().replace(/\s+/g, '_')
  if (COLUMN_BY_KEY.has(key)) return key
  const n = normaliseHeader(name)
  return extra[n] ?? HEADER_SYNONYMS[n] ?? null
}

const NUMERIC = /^[+-]?(\d[\d.,\s']*)?(\d)([eE][+-]?\d+)?$/
/** Decimal and thousands separators as the file writes them, from its numeric-looking cells. */
export function detectNumberFormat (rows: Grid): { decimal: '.' | ',', thousands: '' | ',' | '.' | ' ' } {
  let comma = 0
  let dot = 0
  let thinSpace = 0
  for (const row of rows.slice(0, 2000)) {
    for (const c of row) {
      if (typeof c !== 'string' || !NUMERIC.test(c.trim())) continue
      const t = c.trim()
      if (/^\d{1,3}( \d{3})+(,\d+)?$/.test(t)) thinSpace++
      if (/^[+-]?\d*,\d+([eE][+-]?\d+)?$/.test(t) || /\d\.\d{3},\d/.test(t)) comma++
      else if (/^[+-]?\d*\.\d+([eE][+-]?\d+)?$/.test(t) || /\d,\d{3}\.\d/.test(t)) dot++
    }
  }
  const decimal = comma > dot ? ',' : '.'
  return { decimal, thousands: thinSpace ? ' ' : decimal === ',' ? '.' : ',' }
}

/** A cell as a number in the file's format, or NaN (text stays text). */
export function parseNumber (cell: string | number | null, decimal: '.' | ',', thousands: string): number {
  if (typeof cell === 'number') return cell
  if (cell === null) return NaN
  let t = cell.trim().replace(/\u2212/g, '-')
  if (!t || !NUMERIC.test(t)) return NaN
  if (thousands) t = t.split(thousands).join('')
  if (decimal === ',') t = t.replace(',', '.')
  return /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(t) ? Number(t) : NaN
}

const isNumberLike = (c: unknown) => typeof c === 'number' || (typeof c === 'string' && NUMERIC.test(c.trim()))
const isText = (c: unknown) => typeof c === 'string' && c.trim() !== '' && !NUMERIC.test(c.trim())
/** A row of unit spellings (under the header): "(K)", "s-1", "eV", "[ps]". */
const isUnitsRow = (row: Grid[number]) => {
  const cells = row.filter(c => c !== null && String(c).trim() !== '')
  return (
    cells.length >= 2
    && cells.every(
      c => typeof c === 'string' && /^[([{]?\s*[\w°µμÅå/^⁻¹\- ]{1,12}\s*[)\]}]?$/.test(c.trim()) && !/^\d/.test(c.trim())
    )
    && cells.some(
      c =>
        !!UNIT_WORDS[
          String(c)
            .trim()
            .replace(/^[([{]|[)\]}]$/g, '')
            .trim()
            .toLowerCase()
        ]
    )
  )
}

/** The header row: the first of the first 50 with at least two text cells that has data rows under it. */
export function detectLayout (grid: Grid): { headerRow: number, unitsRow?: number, firstDataRow: number } {
  for (let i = 0; i < Math.min(grid.length, 50); i++) {
    const row = grid[i]!
    const texts = row.filter(isText).length
    if (texts < 2 || texts < row.filter(c => c !== null && String(c).trim() !== '').length * 0.6) continue
    const units = grid[i + 1] && isUnitsRow(grid[i + 1]!) ? i + 1 : undefined
    const data = grid[(units ?? i) + 1]
    if (data && data.some(isNumberLike))
      return { headerRow: i + 1, ...(units !== undefined ? { unitsRow: units + 1 } : {}), firstDataRow: (units ?? i) + 2 }
  }
  return { headerRow: 1, firstDataRow: 2 }
}

/** Title cells like "Solvent: acetonitrile" or "T = 298 K" above the table: values set once for the file. */
function constantsAbove (grid: Grid, headerRow: number, extra: Record<string, string>): Mapping['constants'] {
  const out: NonNullable<Mapping['constants']> = {}
  for (const row of grid.slice(0, headerRow - 1)) {
    for (const c of row) {
      const m = typeof c === 'string' ? c.match(/^\s*([^:=]{1,40}?)\s*[:=]\s*(.+?)\s*$/) : null
      if (!m) continue
      const { name, unit } = splitHeader(m[1]!)
      const field = fieldFor(name, extra)
      if (!field) continue
      const v = m[2]!.match(/^([+-]?[\d.,]+)\s*(\S.*)?$/)
      const u = unitFor(field, unit ?? v?.[2])
      out[field]
        = v && COLUMN_BY_KEY.get(field)?.kind === 'number' ? { value: v[1]!, ...(u ? { unit: u } : {}) } : { value: m[2]! }
    }
  }
  return Object.keys(out).length ? out : undefined
}

/** The proposed reading of a sheet; `extra` are curator-maintained header synonyms (normalised name → field). */
/**
 * A column whose header says nothing known, read from its values: every value (of the first 50) one of a field's
 * allowed words (process, linkage, initial state, technique, reference electrode …), or one of the known solvents.
 */
function fieldFromValues (values: (string | number | null)[], taken: Set<string>, solvents: Set<string>): string | null {
  const words = values.filter(v => v !== null && String(v).trim() !== '').map(v => String(v).trim())
  if (words.length < 2) return null
  for (const def of COLUMN_BY_KEY.values()) {
    if (!def.values || taken.has(def.key)) continue
    const allowed = new Set(def.values.map(v => v.toLowerCase()))
    if (words.every(w => allowed.has(w.toLowerCase()))) return def.key
  }
  if (!taken.has('solvent') && solvents.size && words.every(w => solvents.has(w.toLowerCase()))) return 'solvent'
  return null
}

export function proposeMapping (grid: Grid, extra: Record<string, string> = {}, solvents: Set<string> = new Set()): Mapping {
  const layout = detectLayout(grid)
  const header = grid[layout.headerRow - 1] ?? []
  const unitsRow = layout.unitsRow ? grid[layout.unitsRow - 1] : undefined
  const seen = new Set<string>()
  const constants = constantsAbove(grid, layout.headerRow, extra) ?? {}
  const columns: ColumnMapping[] = header.map((h, i) => {
    const { name, unit, reference } = splitHeader(String(h ?? ''))
    const field = fieldFor(name, extra)
    if (!field || seen.has(field)) return { field: null }
    seen.add(field)
    const spelled
      = unit
        ?? (unitsRow?.[i]
          ? String(unitsRow[i])
              .trim()
              .replace(/^[([{]|[)\]}]$/g, '')
              .trim()
          : undefined)
    if (reference && (field === 'donor_oxidation_potential' || field === 'acceptor_reduction_potential'))
      constants[field === 'donor_oxidation_potential' ? 'donor_reference' : 'acceptor_reference'] = { value: reference }
    const u = unitFor(field, spelled)
    return { field, ...(u ? { unit: u } : {}) }
  })
  // columns the headers left unnamed: by their values
  const data = grid.slice(layout.firstDataRow - 1, layout.firstDataRow + 49)
  columns.forEach((c, i) => {
    if (c.field) return
    const f = fieldFromValues(data.map(r => r[i] ?? null), seen, solvents)
    if (f && !constants[f]) {
      seen.add(f)
      columns[i] = { field: f }
    }
  })
  return {
    ...layout,
    ...detectNumberFormat(grid.slice(layout.firstDataRow - 1)),
    columns,
    ...(Object.keys(constants).length ? { constants } : {})
  }
}

/** A stable name for a header row (lower case, spaces squeezed), to find the mapping saved for the same headers. */
export function headerSignature (header: Grid[number]): string {
  return header
    .map(h =>
      String(h ?? '')
        .trim()
        .toLowerCase()
        .replace(/\s+/g, ' ')
    )
    .join('\u001f')
}

export interface Applied {
  headers: string[]
  rows: (string | number | null)[][]
  /** For each row given: its row number in the sheet (1-based). */
  rowNumbers: number[]
  /** Template key → the file's own header (for naming problems). */
  columnNames: Record<string, string>
}

/** The sheet in the template's columns ("key (unit)"), numbers parsed in the file's format, constants filled in. */
export function applyMapping (grid: Grid, m: Mapping): Applied {
  const header = grid[m.headerRow - 1] ?? []
  const used = m.columns.map((c, i) => ({ ...c, i })).filter(c => c.field)
  const consts = Object.entries(m.constants ?? {}).filter(([k]) => !used.some(c => c.field === k))
  const headers = [
    ...used.map(c => (c.unit ? `${c.field} (${c.unit})` : c.field!)),
    ...consts.map(([k, v]) => (v.unit ? `${k} (${v.unit})` : k))
  ]
  const columnNames: Record<string, string> = {}
  for (const c of used) columnNames[c.field!] = String(header[c.i] ?? `column ${c.i + 1}`)
  for (const [k] of consts) columnNames[k] = `${k} (set for the whole file)`
  const rows: Applied['rows'] = []
  const rowNumbers: number[] = []
  for (let r = m.firstDataRow - 1; r < grid.length; r++) {
    const row = grid[r]!
    if (row.every(c => c === null || String(c).trim() === '')) continue
    rows.push([
      ...used.map((c) => {
        const v = row[c.i] ?? null
        if (COLUMN_BY_KEY.get(c.field!)?.kind !== 'number' || typeof v !== 'string') return v
        const x = parseNumber(v, m.decimal, m.thousands)
        return Number.isNaN(x) ? v : x
      }),
      ...consts.map(([k, v]) =>
        COLUMN_BY_KEY.get(k)?.kind === 'number' && typeof v.value === 'string'
          ? parseNumber(v.value, m.decimal, m.thousands)
          : v.value
      )
    ])
    rowNumbers.push(r + 1)
  }
  return { headers, rows, rowNumbers, columnNames }
}
