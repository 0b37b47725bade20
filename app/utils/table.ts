/** The column description DataTable takes, and its pure helpers (cell text, the sort cycle). */
export interface Col<R> {
  id: string
  header: string
  value?: (r: R) => unknown
  format?: (r: R) => string
  numeric?: boolean
  sortable?: boolean
  hidden?: boolean
  title?: string
  link?: (r: R) => string | undefined
  /** Long text (titles): the cell wraps instead of widening the table. */
  wrap?: boolean
}

/** What a cell shows: the column's formatter, else its value, with an em dash for nothing. */
export function cellText<R extends object> (c: Col<R>, r: R): string {
  if (c.format) return c.format(r)
  const v = c.value ? c.value(r) : (r as Record<string, unknown>)[c.id]
  if (v === null || v === undefined || v === '') return '—'
  return String(v)
}

/** aria-sort of a column header for a sort key such as "-log10Rate". */
export function ariaSortOf (sort: string, id: string): 'none' | 'ascending' | 'descending' {
  if (!sort || sort.replace(/^-/, '') !== id) return 'none'
  return sort.startsWith('-') ? 'descending' : 'ascending'
}

/** The next sort key when a header is activated: ascending → descending → none. */
export function nextSort (sort: string, id: string): string {
  const cur = sort.replace(/^-/, '') === id ? sort : ''
  return cur === '' ? id : cur === id ? `-${id}` : ''
}
