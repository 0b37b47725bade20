/** Draft datasets: creation, citation metadata (dataset.v1) and submission for review. */
import { and, eq, inArray, sql } from 'drizzle-orm'
import datasetSchema from '../../../schemas/dataset.v1.json'
import { isValidDoi, isValidOrcid } from '../../../shared/identifiers'
import { hasControlChars, hasOtherControlChars } from '../../../shared/text'
import { useDb, schema } from '../storage/db'
import { httpError, type Issue } from '../http/errors'
import { audit } from '../storage/audit'
import { ajvIssues, compile } from '../http/validation'
import { sendMail, publicUrl } from '../services/mail'
import { checkRecords } from './check'
import { ingestContext, recordValidator } from './drafts'
import type { Viewer } from '../accounts/auth'
import type { DatasetMetadataV1 } from '../../../shared/records/types'
import { afterDatasetChange } from '../search/search'
import { countOf } from '../../../shared/vocabulary'
import { creatorName } from '../../../shared/records/creators'

/** The dataset schema's own properties, so that the API and the schema can never disagree. */
export const datasetMetaSchema = {
  ...(datasetSchema as { properties: Record<string, any> }),
  $id: undefined,
  $schema: undefined
} as unknown as { type: 'object', properties: Record<string, any>, required: string[] }
export type DatasetMetaInput = Partial<DatasetMetadataV1>
type Version = typeof schema.datasetVersions.$inferSelect

export async function createDraft (viewer: Viewer, labId: number, title: string, description: string) {
  const db = await useDb()
  const [u] = await db.select().from(schema.users).where(eq(schema.users.id, viewer.id))
  const metadata: DatasetMetadataV1 = {
    title,
    description,
    creators: [
      {
        // the account holds one name; the draft's metadata form asks for family and given names
        name: u?.name ?? viewer.email,
        ...(u?.orcid ? { orcid: u.orcid } : {}),
        ...(u?.affiliation ? { affiliation: u.affiliation } : {})
      }
    ],
    license: 'CC-BY-4.0',
    keywords: []
  }
  return db
    .transaction(async (tx) => {
      const [d] = await tx.insert(schema.datasets).values({ labId, createdBy: viewer.id }).returning()
      await tx
        .insert(schema.datasetVersions)
        .values({
          datasetId: d!.id,
          versionNumber: 1,
          state: 'draft',
          title,
          description,
          metadata: metadata as never,
          license: metadata.license
        })
      await audit(viewer.id, 'dataset.created', 'dataset', d!.id, { labId }, tx)
      return { id: d!.id, versionNumber: 1, state: 'draft' }
    })
    .then(async (r) => {
      await afterDatasetChange(r.id)
      return r
    })
}

/** Rules the schema cannot state: ORCID check characters, DOI syntax, a sensible embargo date. */
export function metadataIssues (m: DatasetMetaInput): Issue[] {
  const issues: Issue[] = []
  // one-line fields refuse control characters (a line break would forge a line of RIS or bag-info.txt)
  const oneLineField = (v: unknown, path: string) => {
    if (typeof v === 'string' && hasControlChars(v))
      issues.push({ path, message: 'must be one line without control characters (line breaks, tabs, NUL…)' })
  }
  oneLineField(m.title, '/title')
  if (typeof m.description === 'string' && hasOtherControlChars(m.description))
    issues.push({ path: '/description', message: 'holds control characters other than tabs and line breaks' })
  m.creators?.forEach((c, i) => {
    oneLineField(c.name, `/creators/${i}/name`)
    oneLineField(c.affiliation, `/creators/${i}/affiliation`)
  })
  m.keywords?.forEach((k, i) => oneLineField(k, `/keywords/${i}`))
  m.relatedIdentifiers?.forEach((r, i) => oneLineField(r.identifier, `/relatedIdentifiers/${i}/identifier`))
  m.funding?.forEach((f, i) => {
    oneLineField(f.funderName, `/funding/${i}/funderName`)
    oneLineField(f.awardNumber, `/funding/${i}/awardNumber`)
  })
  m.creators?.forEach((c, i) => {
    if (c.nameType === 'Organizational') {
      for (const k of ['familyName', 'givenName', 'orcid'] as const)
        if (c[k]) issues.push({ path: `/creators/${i}/${k}`, message: 'belongs to a person; an organisation has one name' })
    }
    else if (c.givenName?.trim() && !c.familyName?.trim())
      issues.push({ path: `/creators/${i}/familyName`, message: 'is needed with a given name (cited "Family, Given")' })
    oneLineField(c.familyName, `/creators/${i}/familyName`)
    oneLineField(c.givenName, `/creators/${i}/givenName`)
    if (c.orcid && !isValidOrcid(c.orcid))
      issues.push({
        path: `/creators/${i}/orcid`,
        message: 'is not a valid ORCID iD (ISO 7064 MOD 11-2 check character)'
      })
  })
  m.relatedIdentifiers?.forEach((r, i) => {
    if (r.identifierType === 'DOI' && !isValidDoi(r.identifier))
      issues.push({ path: `/relatedIdentifiers/${i}/identifier`, message: 'is not a DOI (10.<registrant>/<suffix>)' })
  })
  if (m.embargoUntil) {
    const today = new Date().toISOString().slice(0, 10)
    const max = new Date(Date.now() + 3 * 365 * 86400e3).toISOString().slice(0, 10)
    if (m.embargoUntil > max)
      issues.push({ path: '/embargoUntil', message: 'embargoes longer than three years are not accepted' })
    if (m.embargoUntil < today) issues.push({ path: '/embargoUntil', message: 'is in the past' })
  }
  return issues
}

export async function updateMetadata (viewer: Viewer, version: Version, patch: DatasetMetaInput) {
  const issues = metadataIssues(patch)
  if (issues.length) throw httpError(422, 'The metadata has problems; nothing was changed', issues)
  const merged = { ...(version.metadata as DatasetMetaInput), ...patch }
  // a person's cited name follows the parts given ("Family, Given")
  if (merged.creators) merged.creators = merged.creators.map(c => (c.familyName ? { ...c, name: creatorName(c) } : c))
  for (const k of Object.keys(merged) as (keyof DatasetMetaInput)[]) if (merged[k] === null) delete merged[k]
  const db = await useDb()
  await db
    .update(schema.datasetVersions)
    .set({
      metadata: merged as never,
      title: merged.title ?? version.title,
      description: merged.description ?? '',
      license: merged.license ?? version.license,
      embargoUntil: merged.embargoUntil ?? null,
      updatedAt: new Date()
    })
    .where(eq(schema.datasetVersions.id, version.id))
  await audit(viewer.id, 'dataset.metadata-changed', 'dataset_version', version.id, { fields: Object.keys(patch) })
  await afterDatasetChange(version.datasetId)
  return { metadata: merged }
}

/** Everything that must hold before review: valid metadata and at least one record, every record valid. */
export async function submissionProblems (version: Version): Promise<Issue[]> {
  const validate = compile(datasetSchema as object)
  const meta = version.metadata
  const issues: Issue[] = validate(meta) ? [] : ajvIssues(validate.errors, '/metadata')
  issues.push(...metadataIssues(meta as DatasetMetaInput).map(i => ({ ...i, path: '/metadata' + i.path })))
  const db = await useDb()
  const rows = await db
    .select({ data: schema.rateRecords.data, position: schema.rateRecords.position })
    .from(schema.rateRecords)
    .where(eq(schema.rateRecords.versionId, version.id))
    .orderBy(schema.rateRecords.position)
  if (!rows.length) issues.push({ path: '/records', message: 'A dataset needs at least one record' })
  const res = await checkRecords(
    rows.map(r => r.data),
    recordValidator(),
    await ingestContext(),
    '/records'
  )
  issues.push(...res.issues)
  return issues
}

export async function submitDraft (viewer: Viewer, version: Version) {
  const problems = await submissionProblems(version)
  if (problems.length) {
    const verb = problems.length === 1 ? 'stands' : 'stand'
    throw httpError(422, `${countOf(problems.length, 'problem')} ${verb} in the way of review`, problems)
  }
  const db = await useDb()
  await db
    .update(schema.datasetVersions)
    .set({ state: 'submitted', submittedAt: new Date(), updatedAt: new Date() })
    .where(eq(schema.datasetVersions.id, version.id))
  await audit(viewer.id, 'dataset.submitted', 'dataset_version', version.id, { from: version.state })
  await afterDatasetChange(version.datasetId)
  // curators and admins who may review it: not the members of the dataset's own lab
  const lab = await db.select({ labId: schema.datasets.labId }).from(schema.datasets).where(eq(schema.datasets.id, version.datasetId))
  const curators = await db
    .select({ email: schema.users.email })
    .from(schema.users)
    .where(and(
      inArray(schema.users.role, ['curator', 'admin']),
      sql`${schema.users.id} not in (select user_id from lab_membership where lab_id = ${lab[0]!.labId})`
    ))
  for (const c of curators) {
    await sendMail(
      c.email,
      `Submitted for review: ${version.title}`,
      `${viewer.name ?? viewer.email} submitted "${version.title}" (${version.recordCount} records) for `
      + `review.\nReview it: ${publicUrl(`/review/${version.datasetId}`)}\n`
    )
  }
  return { state: 'submitted' }
}
