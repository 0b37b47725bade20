import { eq } from 'drizzle-orm'
import { getViewer } from '../../../../utils/accounts/auth'
import { defaultVersion, getDataset, isUnderEmbargo } from '../../../../utils/publishing/archive'
import { sendBundle } from '../../../../utils/bundles'
import { schema } from '../../../../utils/storage/db'
import { httpError } from '../../../../utils/http/errors'
import { publicUrl } from '../../../../utils/services/mail'
import { intParam } from '../../../../utils/http/params'
import { coerceNumbers, queryValidated } from '../../../../utils/http/validation'
import { BUNDLE_QUERY } from '../../../../utils/http/query-schemas'

defineRouteMeta({
  openAPI: {
    tags: ['bundles'],
    summary:
      'Download a dataset version (default: newest published) as a BagIt ZIP with CSV, JSON, schemas, README, citations and checksums',
    responses: { 200: { description: 'application/zip' } }
  }
})

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const q = queryValidated<{ version?: number }>(
    event,
    BUNDLE_QUERY,
    coerceNumbers(['version'])
  )
  const viewer = await getViewer(event)
  const { dataset, versions } = await getDataset(viewer, id)
  const v = q.version === undefined ? defaultVersion(versions) : versions.find(x => x.versionNumber === q.version)
  if (!v) throw httpError(404, 'No such version')
  const member = !!viewer && (viewer.role === 'admin' || viewer.labIds.includes(dataset.labId))
  if (v.state === 'withdrawn') throw httpError(410, 'This dataset was withdrawn; its records are no longer offered')
  if (isUnderEmbargo(v) && !member) throw httpError(403, `Under embargo until ${v.embargoUntil}`)
  return sendBundle(
    event,
    {
      where: eq(schema.rateRecords.versionId, v.id),
      description: `dataset ${id}, version ${v.versionNumber}: ${v.title}`,
      source: publicUrl(`/datasets/${id}?version=${v.versionNumber}`)
    },
    `crosspoint-${id}-v${v.versionNumber}.zip`
  )
})
