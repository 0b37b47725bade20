/** The landing-page shape of a dataset version, shared by the dataset and version routes. */
import { defaultVersion, getDataset, isUnderEmbargo, versionRecords } from './archive'
import { httpError, MESSAGES } from './errors'
import type { Viewer } from './auth'

export async function datasetView (viewer: Viewer | null, id: number, versionNumber?: number) {
  const { dataset, lab, versions } = await getDataset(viewer, id)
  const version = versionNumber === undefined ? defaultVersion(versions) : versions.find(v => v.versionNumber === versionNumber)
  if (!version) throw httpError(404, MESSAGES.notFound)
  const isMember = !!viewer && (viewer.role === 'admin' || viewer.labIds.includes(dataset.labId))
  const embargoed = isUnderEmbargo(version) && !isMember
  const hideRecords = version.state === 'withdrawn' || embargoed
  return {
    id: dataset.id,
    conceptDoi: dataset.conceptDoi,
    isDemo: dataset.isDemo,
    lab: { id: lab.id, name: lab.name, institution: lab.institution },
    canEdit: isMember && ['draft', 'returned'].includes(version.state),
    version: {
      versionNumber: version.versionNumber, state: version.state, title: version.title, description: version.description,
      metadata: version.metadata, license: version.license, doi: version.doi, embargoUntil: version.embargoUntil,
      recordCount: version.recordCount, submittedAt: version.submittedAt, publishedAt: version.publishedAt,
      withdrawnAt: version.withdrawnAt, withdrawalReason: version.withdrawalReason, updatedAt: version.updatedAt
    },
    versions: versions.map(v => ({ versionNumber: v.versionNumber, state: v.state, doi: v.doi, publishedAt: v.publishedAt, recordCount: v.recordCount })),
    records: hideRecords ? [] : await versionRecords(version.id),
    recordsHidden: hideRecords ? (version.state === 'withdrawn' ? 'withdrawn' : 'embargo') : null
  }
}
