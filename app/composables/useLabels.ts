import { countOf, PROCESS_LABELS, TECHNIQUE_LABELS } from '#shared/vocabulary'

export { PROCESS_LABELS, TECHNIQUE_LABELS }

export function label (value: string | null | undefined): string {
  if (!value) return '—'
  return PROCESS_LABELS[value] ?? TECHNIQUE_LABELS[value] ?? value
}
export function fmt (v: number | null | undefined, digits = 3): string {
  return v === null || v === undefined || !Number.isFinite(v) ? '—' : v.toFixed(digits)
}
export function fmtRate (v: number | null | undefined): string {
  return v === null || v === undefined ? '—' : v.toExponential(2)
}
/** A number in scientific notation as people write it: 3.99 × 10⁸ (significant digits as asked). */
export function fmtSci (v: number | null | undefined, digits = 3): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return '–'
  if (v === 0) return '0'
  const e = Math.floor(Math.log10(Math.abs(v)))
  if (e >= -2 && e <= 3) return Number(v.toPrecision(digits)).toString()
  const m = Number((v / 10 ** e).toPrecision(digits))
  const sup = String(e).replace(/-/g, '⁻').replace(/\d/g, d => '⁰¹²³⁴⁵⁶⁷⁸⁹'[Number(d)]!)
  return `${m} × 10${sup}`
}
export function fmtDate (d: string | Date | null | undefined): string {
  return d ? new Date(d).toISOString().slice(0, 10) : '—'
}
/** Date and time in UTC to the second ("2026-12-03 14:05:09"), for logs people read. */
export function fmtDateTime (d: string | Date | null | undefined): string {
  return d ? new Date(d).toISOString().replace('T', ' ').slice(0, 19) : '—'
}
/** "1 record", "2 records", "1 372 records": a count with its noun in the right number. */
export const plural = countOf
