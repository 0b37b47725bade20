/** Reusable route parameter and query schemas. */
import { getRouterParam, type H3Event } from 'h3'
import { httpError } from './errors'

/** A positive integer route parameter, or 404 (an id that cannot exist is simply not found). */
export function intParam (event: H3Event, name: string): number {
  const raw = getRouterParam(event, name) ?? ''
  const n = Number(raw)
  if (!/^\d+$/.test(raw) || !Number.isSafeInteger(n) || n < 1) throw httpError(404, `No ${name} ${JSON.stringify(raw)}`)
  return n
}

export const pagingProperties = {
  page: { type: 'integer', minimum: 1, maximum: 100000 },
  pageSize: { type: 'integer', minimum: 1, maximum: 500 }
} as const
