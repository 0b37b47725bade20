/** The landing-page shape of a dataset version, shared by the dataset and version routes. */
import { defaultVersion, getDataset, isUnderEmbargo, versionPoints, versionRecords, RECORD_SORTS, type RecordDetail } from './archive'
import { httpError, MESSAGES } from '../http/errors'
import type { Viewer } from '../accounts/auth'
import { desc, eq } from 'drizzle-orm'
import { useDb, schema } from '../storage/db'
import { toCitable, type CitableVersion } from './citation'
import { jsonLd } from './citation-formats'
import { TECHNIQUE_LABELS } from '../../../shared/vocabulary'
import { coerceNumbers, queryValidated } from '../http/validation'
import type { H3Event } from 'h3'

/** Records per page of the dataset and version routes: pages, with the total, never a silent cut. */
export const MAX_RECORD_PAGE = 10_000
const DETAIL_QUERY = {
  type: 'object',
  additionalProperties: false,
  properties: {
    records: { enum: ['full', 'summary', 'points'] },
    sort: { enum: RECORD_SORTS.flatMap(k => [k, `-${k}`]) },
    page: { type: 'integer', minimum: 1, maximum: 1_000_000 },
    pageSize: { type: 'integer', minimum: 1, maximum: MAX_RECORD_PAGE }
  }
}
/**
 * The same four parameters as OpenAPI query parameters (the route meta is read at build time and takes literals
 * only, so the OpenAPI handler adds these to both dataset routes): one source for the document and the validator.
 */
export const RECORD_QUERY_PARAMETERS = [
  {
    in: 'query', name: 'records', schema: { type: 'string', ...DETAIL_QUERY.properties.records },
    description: 'full (default): each record with its JSON; summary: the table columns only; '
      + 'points: id, ΔG°, log10 k and medium only (for plots)'
  },
  {
    in: 'query', name: 'sort', schema: { type: 'string', ...DETAIL_QUERY.properties.sort },
    description: 'Order of the records: a column, with a leading - for descending; ties keep the deposit order'
  },
  {
    in: 'query', name: 'page', schema: DETAIL_QUERY.properties.page,
    description: 'Page of records (1-based); recordPage.total says how many there are'
  },
  {
    in: 'query', name: 'pageSize', schema: DETAIL_QUERY.properties.pageSize,
    description: `Records per page, at most ${MAX_RECORD_PAGE} (the default)`
  }
]
export interface RecordQuery {
  detail?: RecordDetail | 'points'
  sort?: string
  page: number
  pageSize: number
}
/** The `records`, `page` and `pageSize` query parameters of the dataset and version routes (422 naming a bad one). */
export function recordDetailOf (event: H3Event): RecordQuery {
  const q = queryValidated<{ records?: RecordDetail | 'points', sort?: string, page?: number, pageSize?: number }>(
    event,
    DETAIL_QUERY,
    coerceNumbers(['page', 'pageSize'])
  )
  return { detail: q.records, sort: q.sort, page: q.page ?? 1, pageSize: q.pageSize ?? MAX_RECORD_PAGE }
}

/** A published (or withdrawn) version in the shape the citation formats take. */
export async function citableVersion (
  viewer: Viewer | null,
  id: number,
  versionNumber?: number
): Promise<CitableVersion> {
  const { dataset, lab, versions } = await getDataset(viewer, id)
  const citable = versions.filter(v => v.doi && (v.state === 'published' || v.state === 'withdrawn'))
  const v
    = versionNumber === undefined ? citable[citable.length - 1] : citable.find(x => x.versionNumber === versionNumber)
  if (!v) throw httpError(404, 'No published version to cite')
  return toCitable(v, dataset.conceptDoi, lab.name)
}

/** The newest review's comments, for the lab that must answer them. */
async function reviewNotes (versionId: number) {
  const db = await useDb()
  const [rev] = await db
    .select()
    .from(schema.reviews)
    .where(eq(schema.reviews.versionId, versionId))
    .orderBy(desc(schema.reviews.id))
    .limit(1)
  if (!rev) return null
  const comments = await db
    .select({ recordId: schema.recordComments.recordId, body: schema.recordComments.body })
    .from(schema.recordComments)
    .where(eq(schema.recordComments.reviewId, rev.id))
  return { decision: rev.decision, comment: rev.comment, at: rev.createdAt, comments }
}

/** The measurement techniques a version's records name, in words (schema.org measurementTechnique). */
async function versionTechniques (versionId: number): Promise<string[]> {
  const db = await useDb()
  const rows = await db
    .selectDistinct({ t: schema.rateRecords.technique })
    .from(schema.rateRecords)
    .where(eq(schema.rateRecords.versionId, versionId))
  return rows.map(r => r.t).filter((t): t is string => !!t).map(t => TECHNIQUE_LABELS[t] ?? t).sort()
}

export async function datasetView (
  viewer: Viewer | null,
  id: number,
  versionNumber?: number,
  rq: RecordQuery = { page: 1, pageSize: MAX_RECORD_PAGE }
) {
  const { dataset, lab, versions } = await getDataset(viewer, id)
  const version
    = versionNumber === undefined ? defaultVersion(versions) : versions.find(v => v.versionNumber === versionNumber)
  if (!version) throw httpError(404, MESSAGES.notFound)
  const isMember = !!viewer && (viewer.role === 'admin' || viewer.labIds.includes(dataset.labId))
  const embargoed = isUnderEmbargo(version) && !isMember
  const hideRecords = version.state === 'withdrawn' || embargoed
  return {
    id: dataset.id,
    conceptDoi: dataset.conceptDoi,
    isDemo: dataset.isDemo,
    lab: { id: lab.id, name: lab.name, institution: lab.institution },
    canEdit:
      isMember
      && ['draft', 'returned'].includes(version.state)
      && version.versionNumber === Math.max(...versions.map(v => v.versionNumber)),
    canStartVersion: isMember && versions[versions.length - 1]!.state === 'published',
    canSeeAudit: !!viewer && (isMember || viewer.role !== 'contributor'),
    version: {
      versionNumber: version.versionNumber,
      state: version.state,
      title: version.title,
      description: version.description,
      metadata: version.metadata,
      license: version.license,
      doi: version.doi,
      embargoUntil: version.embargoUntil,
      recordCount: version.recordCount,
      submittedAt: version.submittedAt,
      publishedAt: version.publishedAt,
      withdrawnAt: version.withdrawnAt,
      withdrawalReason: version.withdrawalReason,
      updatedAt: version.updatedAt
    },
    versions: versions.map(v => ({
      versionNumber: v.versionNumber,
      state: v.state,
      doi: v.doi,
      publishedAt: v.publishedAt,
      recordCount: v.recordCount
    })),
    records:
      hideRecords || rq.detail === 'points'
        ? []
        : await versionRecords(
            version.id,
            { offset: (rq.page - 1) * rq.pageSize, limit: rq.pageSize },
            rq.detail ?? 'full',
            rq.sort
          ),
    points: rq.detail === 'points' && !hideRecords ? await versionPoints(version.id, rq.pageSize) : undefined,
    recordPage: { page: rq.page, pageSize: rq.pageSize, total: hideRecords ? 0 : version.recordCount },
    review: isMember ? await reviewNotes(version.id) : null,
    jsonLd:
      version.doi && ['published', 'withdrawn'].includes(version.state)
        ? jsonLd(toCitable(version, dataset.conceptDoi, lab.name), await versionTechniques(version.id))
        : null,
    recordsHidden: hideRecords ? (version.state === 'withdrawn' ? 'withdrawn' : 'embargo') : null
  }
}
