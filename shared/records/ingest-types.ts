/** Shapes shared by every ingest path: rows, cells, issues, the solvent table, and the strict decimal parser. */
import type { ErrorObject } from 'ajv'
import type { RateRecordV1 } from './types'

export interface SolventRow {
  name: string
  permittivity: number
  refractiveIndex: number
  viscosity: number | null
}
export interface IngestContext {
  solvents: Map<string, SolventRow>
}
export interface RowIssue {
  row?: number
  column?: string
  path: string
  message: string
}
export interface Derivation {
  field: string
  formula: string
  value: number
  unit: string
}
export interface RowResult {
  record?: RateRecordV1
  issues: RowIssue[]
  warnings: RowIssue[]
  derived: Derivation[]
}
export type Cell = string | number | null | undefined
export type SchemaValidator = ((data: unknown) => boolean) & { errors?: ErrorObject[] | null }

export const MAX_CELL_LENGTH = 2000

/**
 * A plain decimal number (optional sign, digits with an optional point, optional exponent) or undefined.
 * JavaScript's Number() also takes "0x10" (16), "0b101", "0o17", "Infinity" and whitespace-only text, none
 * of which a measured value is written as.
 */
export const DECIMAL = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/
export function parseDecimal (text: string): number | undefined {
  const t = text.trim()
  return DECIMAL.test(t) ? Number(t) : undefined
}

export function isBlank (v: Cell): boolean {
  return v === null || v === undefined || (typeof v === 'string' && v.trim() === '')
}

/**
 * Builds the record from cells keyed by column key; `units` gives each dimensioned column's unit
 * (from its header or the form's unit picker).
 */
