/**
 * The dataset usage report over a period in the shape of the COUNTER research-data Dataset Report (DSR,
 * release "rd1", the JSON form used by SUSHI for research data): a header with the reporting period and,
 * per dataset, its identifiers and one `performance` entry per month with an `instance` per access method
 * and metric type. Months and instances with no use are left out, as the report does.
 */
import { and, desc, eq, inArray } from 'drizzle-orm'
import { schema, type Db } from '../storage/db'
import { creatorName } from '../../../shared/records/creators'
import { PUBLISHER } from '../publishing/citation'
import { monthStart, nextMonth, usageRows, type MonthCounts } from './report'

const METRICS: [string, (c: MonthCounts) => number][] = [
  ['total-dataset-investigations', c => c.investigations.total],
  ['unique-dataset-investigations', c => c.investigations.unique],
  ['total-dataset-requests', c => c.requests.total],
  ['unique-dataset-requests', c => c.requests.unique]
]
const lastDay = (month: string) => new Date(monthStart(nextMonth(month)) - 86400e3).toISOString().slice(0, 10)

export async function datasetReport (db: Db, begin: string, end: string, baseUrl: string, now = new Date()) {
  const rows = await usageRows(db, begin, end)
  const ids = [...new Set(rows.map(r => r.datasetId))]
  const versions = ids.length
    ? await db
        .select({
          datasetId: schema.datasetVersions.datasetId,
          title: schema.datasetVersions.title,
          metadata: schema.datasetVersions.metadata,
          doi: schema.datasetVersions.doi,
          publishedAt: schema.datasetVersions.publishedAt,
          conceptDoi: schema.datasets.conceptDoi
        })
        .from(schema.datasetVersions)
        .innerJoin(schema.datasets, eq(schema.datasets.id, schema.datasetVersions.datasetId))
        .where(and(inArray(schema.datasetVersions.datasetId, ids), inArray(schema.datasetVersions.state, ['published', 'withdrawn'])))
        .orderBy(desc(schema.datasetVersions.versionNumber))
    : []
  const newest = new Map<number, (typeof versions)[number]>()
  const first = new Map<number, Date>()
  for (const v of versions) {
    if (!newest.has(v.datasetId)) newest.set(v.datasetId, v)
    if (v.publishedAt && (!first.has(v.datasetId) || v.publishedAt < first.get(v.datasetId)!)) first.set(v.datasetId, v.publishedAt)
  }
  const datasets = ids.filter(id => newest.has(id)).map((id) => {
    const v = newest.get(id)!
    const published = first.get(id)
    const mine = rows.filter(r => r.datasetId === id)
    const months = [...new Set(mine.map(r => r.month))].sort()
    return {
      'dataset-title': v.title,
      'dataset-id': [{ type: 'doi', value: v.conceptDoi ?? v.doi }],
      'dataset-contributors': (v.metadata.creators ?? []).map(c => ({ type: 'name', value: creatorName(c) })),
      'dataset-dates': published ? [{ type: 'pub-date', value: published.toISOString().slice(0, 10) }] : [],
      'publisher': PUBLISHER,
      'publisher-id': [{ type: 'url', value: baseUrl }],
      'platform': PUBLISHER,
      'yop': published ? String(published.getUTCFullYear()) : '',
      'data-type': 'dataset',
      'uri': `${baseUrl}/datasets/${id}`,
      'performance': months.map(month => ({
        period: { 'begin-date': `${month}-01`, 'end-date': lastDay(month) },
        instance: mine
          .filter(r => r.month === month)
          .flatMap(r => METRICS.map(([metric, of]) => ({
            'access-method': r.machine ? 'machine' : 'regular',
            'metric-type': metric,
            'count': of(r.counts)
          })))
          .filter(i => i.count > 0)
      }))
    }
  })
  return {
    'report-header': {
      'report-name': 'dataset report',
      'report-id': 'DSR',
      'release': 'rd1',
      'created': now.toISOString(),
      'created-by': PUBLISHER,
      'reporting-period': { 'begin-date': `${begin}-01`, 'end-date': lastDay(end) },
      'report-filters': [],
      'report-attributes': [],
      'exceptions': []
    },
    'report-datasets': datasets
  }
}
