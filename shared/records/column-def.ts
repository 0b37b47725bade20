/** One column of the flat, spreadsheet-shaped view of a record (see columns.ts). */
export type ColumnKind = 'text' | 'number' | 'enum'
export interface ColumnDef {
  key: string
  kind: ColumnKind
  /** Allowed units (first is the default offered in templates); absent for unitless columns. */
  units?: readonly string[]
  values?: readonly string[]
  required?: boolean
  /** JSON pointer of the field in the built record, for mapping schema errors back to a column. */
  pointer: string
  help: string
  example: string
}
