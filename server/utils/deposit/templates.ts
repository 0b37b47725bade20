/** Downloadable templates for the flat format: CSV (header with units), XLSX (with a notes sheet) and JSON. */
import ExcelJS from 'exceljs'
import Papa from 'papaparse'
import { COLUMNS, headerFor } from '../../../shared/records/columns'
import { rowToRecord } from '../../../shared/records/ingest'

const EXAMPLE: Record<string, string> = Object.fromEntries(COLUMNS.map(c => [c.key, c.example]))

export function csvTemplate (): string {
  // Papa.unparse quotes per RFC 4180 where needed.
  return (
    Papa.unparse({ fields: COLUMNS.map(c => headerFor(c)), data: [COLUMNS.map(c => EXAMPLE[c.key] ?? '')] }) + '\r\n'
  )
}

export async function xlsxTemplate (): Promise<Buffer> {
  const wb = new ExcelJS.Workbook()
  wb.creator = 'Crosspoint'
  const ws = wb.addWorksheet('records')
  ws.addRow(COLUMNS.map(c => headerFor(c)))
  ws.addRow(
    COLUMNS.map((c) => {
      const v = EXAMPLE[c.key] ?? ''
      return c.kind === 'number' && v !== '' ? Number(v) : v
    })
  )
  ws.getRow(1).font = { bold: true }
  ws.views = [{ state: 'frozen', ySplit: 1 }]
  const notes = wb.addWorksheet('notes')
  notes.addRow(['column', 'units (put one in the header, in brackets)', 'allowed values', 'required', 'meaning'])
  notes.getRow(1).font = { bold: true }
  for (const c of COLUMNS)
    notes.addRow([c.key, c.units?.join(', ') ?? '', c.values?.join(', ') ?? '', c.required ? 'yes' : '', c.help])
  notes.addRow([])
  notes.addRow([
    'Values only: formulas and error cells are refused. Leave a cell empty when there is no value. Give either rate or '
    + 'both lifetimes; either delta_g or the potentials with their reference electrodes.'
  ])
  return Buffer.from(await wb.xlsx.writeBuffer())
}

export function jsonTemplate (): string {
  const built = rowToRecord(
    EXAMPLE,
    {},
    {
      solvents: new Map([
        ['benzonitrile', { name: 'benzonitrile', permittivity: 25.2, refractiveIndex: 1.5289, viscosity: 1.24 }]
      ])
    }
  )
  return JSON.stringify({ records: [built.record] }, null, 2) + '\n'
}
