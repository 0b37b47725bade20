/**
 * Usage counts read back per dataset and month (COUNTER Code of Practice for Research Data):
 * - double-click: clicks of one user-session on one item within 30 s (inclusive) count once — the last of the
 *   run, each compared with the next (SQLite's LEAD window function);
 * - unique: the user-sessions with at least one such action in the month (sessions last one day at most,
 *   since their hash changes with the daily salt, so monthly uniques add up over a period);
 * - a request is also an investigation; regular and machine access are counted apart.
 */
import { sql } from 'drizzle-orm'
import type { Db } from '../storage/db'
import { httpError } from '../http/errors'

export const DOUBLE_CLICK_MS = 30_000
export interface Pair { total: number, unique: number }
export interface MonthCounts { investigations: Pair, requests: Pair }
export interface UsageRow { datasetId: number, month: string, machine: boolean, counts: MonthCounts }

const zero = (): MonthCounts => ({ investigations: { total: 0, unique: 0 }, requests: { total: 0, unique: 0 } })
function add (into: MonthCounts, c: MonthCounts) {
  into.investigations.total += c.investigations.total
  into.investigations.unique += c.investigations.unique
  into.requests.total += c.requests.total
  into.requests.unique += c.requests.unique
}

/** "YYYY-MM" → first instant of that month (UTC), ms. */
export function monthStart (month: string): number {
  return Date.UTC(Number(month.slice(0, 4)), Number(month.slice(5, 7)) - 1, 1)
}
export function addMonths (month: string, n: number): string {
  const d = new Date(monthStart(month))
  d.setUTCMonth(d.getUTCMonth() + n)
  return d.toISOString().slice(0, 7)
}
export const nextMonth = (month: string) => addMonths(month, 1)
/** Every month from `from` to `until`, both included. */
export function monthsBetween (from: string, until: string): string[] {
  const out: string[] = []
  for (let m = from; m <= until; m = nextMonth(m)) out.push(m)
  return out
}
export const MAX_MONTHS = 120
/** A checked period: both ends YYYY-MM, in order, at most ten years; named by the parameter at fault. */
export function checkPeriod (from: string, until: string, names = ['from', 'until']): void {
  if (from > until) throw httpError(422, `${names[0]} (${from}) is after ${names[1]} (${until})`)
  const span = (Number(until.slice(0, 4)) - Number(from.slice(0, 4))) * 12 + Number(until.slice(5)) - Number(from.slice(5)) + 1
  if (span > MAX_MONTHS) throw httpError(422, `The period ${from}…${until} is ${span} months; at most ${MAX_MONTHS}`)
}

/** Counts per dataset, month and access method over whole months [from, until]. */
export async function usageRows (db: Db, from: string, until: string, datasetId?: number): Promise<UsageRow[]> {
  const lo = monthStart(from)
  const hi = monthStart(nextMonth(until))
  const rows = await db.all<{
    dataset_id: number
    month: string
    machine: number
    inv_total: number
    inv_unique: number
    req_total: number
    req_unique: number
  }>(sql`
    WITH e AS (
      SELECT dataset_id, kind, machine, session, at,
        LEAD(at) OVER (PARTITION BY dataset_id, session, item ORDER BY at) AS next_at
      FROM usage_event
      WHERE at >= ${lo} AND at < ${hi} ${datasetId === undefined ? sql`` : sql`AND dataset_id = ${datasetId}`}
    ), c AS (
      SELECT *, (next_at IS NULL OR next_at - at > ${DOUBLE_CLICK_MS}) AS counted FROM e
    )
    SELECT dataset_id, strftime('%Y-%m', at / 1000, 'unixepoch') AS month, machine,
      SUM(counted) AS inv_total,
      COUNT(DISTINCT session) AS inv_unique,
      SUM(CASE WHEN kind = 'request' THEN counted ELSE 0 END) AS req_total,
      COUNT(DISTINCT CASE WHEN kind = 'request' THEN session END) AS req_unique
    FROM c GROUP BY dataset_id, month, machine ORDER BY dataset_id, month, machine`)
  return rows.map(r => ({
    datasetId: r.dataset_id,
    month: r.month,
    machine: Boolean(r.machine),
    counts: {
      investigations: { total: r.inv_total, unique: r.inv_unique },
      requests: { total: r.req_total, unique: r.req_unique }
    }
  }))
}

/** One dataset's usage: totals (both access methods), machine access on its own, and every month of the period. */
export async function datasetUsage (db: Db, datasetId: number, from: string, until: string) {
  const rows = await usageRows(db, from, until, datasetId)
  const total = zero()
  const machine = zero()
  const months = new Map(monthsBetween(from, until).map(m => [m, zero()]))
  for (const r of rows) {
    add(total, r.counts)
    if (r.machine) add(machine, r.counts)
    add(months.get(r.month)!, r.counts)
  }
  return {
    datasetId,
    from,
    until,
    ...total,
    machine,
    months: [...months].map(([month, c]) => ({ month, ...c }))
  }
}
