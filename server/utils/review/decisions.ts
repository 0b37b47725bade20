/** Return with comments, and accept → identifiers (drafts, then findable after the commit) → publish. */
import { and, eq, inArray, isNull, sql } from 'drizzle-orm'
import { consola } from 'consola'
import { audit } from '../storage/audit'
import { useDb, schema } from '../storage/db'
import { httpError } from '../http/errors'
import type { Viewer } from '../accounts/auth'
import { checkRecords } from '../deposit/check'
import { ingestContext, recordValidator } from '../deposit/drafts'
import { dataciteJson, toCitable } from '../publishing/citation'
import { ensureDraftDoi, makeFindable, RegistrarError, registrarPrefix } from '../services/registrar'
import { publicUrl, sendMail } from '../services/mail'
import { afterDatasetChange } from '../search/search'
import { labEmails, transition } from './common'
import { hashData, submittedFor } from './queue'
import { countOf } from '../../../shared/vocabulary'

const { datasets, labs, recordComments, rateRecords: records, reviews, datasetVersions: versions } = schema

export async function returnVersion (
  viewer: Viewer,
  datasetId: number,
  b: { comment: string, recordComments?: { recordId: number, body: string }[], expectedUpdatedAt: number }
) {
  const { dataset, version } = await submittedFor(viewer, datasetId)
  const db = await useDb()
  const recs = await db
    .select({ id: records.id, recordKey: records.recordKey, data: records.data })
    .from(records)
    .where(eq(records.versionId, version.id))
  const ids = new Set(recs.map(r => r.id))
  const bad = (b.recordComments ?? [])
    .map((c, i) =>
      ids.has(c.recordId)
        ? null
        : { path: `/recordComments/${i}/recordId`, message: 'is not a record of this submission' }
    )
    .filter(Boolean)
  if (bad.length) throw httpError(422, 'Some comments point at records that are not in this submission', bad as never)
  await db.transaction(async (tx) => {
    await transition(tx, version, b.expectedUpdatedAt, { state: 'returned' })
    const [rev] = await tx
      .insert(reviews)
      .values({
        versionId: version.id,
        curatorId: viewer.id,
        decision: 'returned',
        comment: b.comment,
        snapshot: recs.map(r => ({ key: r.recordKey, hash: hashData(r.data) }))
      })
      .returning()
    for (const c of b.recordComments ?? [])
      await tx.insert(recordComments).values({ reviewId: rev!.id, recordId: c.recordId, body: c.body })
    await audit(
      viewer.id,
      'dataset.returned',
      'dataset_version',
      version.id,
      { comments: (b.recordComments ?? []).length },
      tx
    )
  })
  await afterDatasetChange(datasetId)
  for (const to of await labEmails(dataset.labId)) {
    await sendMail(
      to,
      `Returned with comments: ${version.title}`,
      `A curator returned "${version.title}" (v${version.versionNumber}) for `
      + `changes.\n\n${b.comment}\n\n${countOf((b.recordComments ?? []).length, 'record')} with comments. Answer them and `
      + `resubmit:\n${publicUrl(`/deposit/${datasetId}`)}\n`
    )
  }
  return { state: 'returned' }
}

/** Identifiers are derived from the dataset and version numbers, so a retry reuses them. */
export function identifiersFor (datasetId: number, versionNumber: number) {
  const concept = `${registrarPrefix()}/cp.${datasetId}`
  return { concept, version: `${concept}.v${versionNumber}` }
}

export async function acceptVersion (
  viewer: Viewer,
  datasetId: number,
  b: { comment?: string, expectedUpdatedAt: number }
) {
  const { dataset, version } = await submittedFor(viewer, datasetId)
  if (version.state !== 'submitted')
    throw httpError(
      409,
      'Another curator acted on this submission, or it changed since you opened it; reload to see its current state'
    )
  const db = await useDb()
  const problems = await checkRecords(
    (await db.select({ data: records.data }).from(records).where(eq(records.versionId, version.id))).map(r => r.data),
    recordValidator(),
    await ingestContext(),
    '/records'
  )
  if (problems.issueCount)
    throw httpError(422, `The submission has ${countOf(problems.issueCount, 'problem')}; return it instead`, problems.issues)
  const [lab] = await db.select().from(labs).where(eq(labs.id, dataset.labId))
  const ids = identifiersFor(datasetId, version.versionNumber)
  const now = new Date()
  const cv = toCitable({ ...version, doi: ids.version, publishedAt: now }, ids.concept, lab!.name)
  // 1. reserve both identifiers as drafts (not public); 2. commit; 3. make them findable. A crash or a lost
  // race between 1 and 2 leaves only drafts; a failure at 3 is finished by the reconciling job.
  try {
    await ensureDraftDoi(ids.concept, publicUrl(`/datasets/${datasetId}`), {
      ...dataciteJson({ ...cv, doi: ids.concept, conceptDoi: null }).data.attributes,
      doi: ids.concept
    })
    await ensureDraftDoi(ids.version, cv.landingUrl, dataciteJson(cv).data.attributes)
  }
  catch (e) {
    if (e instanceof RegistrarError)
      throw httpError(503, `${e.message}. Nothing was published; try again (the same identifiers will be used).`)
    throw e
  }
  await db.transaction(async (tx) => {
    await transition(tx, version, b.expectedUpdatedAt, {
      state: 'published',
      doi: ids.version,
      publishedAt: now,
      metadata: { ...version.metadata, publicationYear: now.getUTCFullYear() }
    })
    await tx.update(datasets).set({ conceptDoi: ids.concept, updatedAt: now }).where(eq(datasets.id, datasetId))
    await tx
      .insert(reviews)
      .values({ versionId: version.id, curatorId: viewer.id, decision: 'accepted', comment: b.comment ?? '' })
    await audit(
      viewer.id,
      'dataset.published',
      'dataset_version',
      version.id,
      { doi: ids.version, conceptDoi: ids.concept },
      tx
    )
  })
  const findable = await makeVersionFindable(version.id, ids)
  await afterDatasetChange(datasetId)
  for (const to of await labEmails(dataset.labId)) {
    await sendMail(
      to,
      `Published: ${version.title}`,
      `"${version.title}" (v${version.versionNumber}) was accepted and published.\nCite it as `
      + `https://doi.org/${ids.version} (all versions: `
      + `https://doi.org/${ids.concept}).\n${publicUrl(`/datasets/${datasetId}`)}\n`
    )
  }
  return {
    state: 'published',
    doi: ids.version,
    conceptDoi: ids.concept,
    identifiers: findable ? 'findable' : 'pending'
  }
}

/** Makes a committed version's identifiers findable and records when; false (and a later retry by the job) if the registrar fails. */
async function makeVersionFindable (versionId: number, ids: { concept: string, version: string }): Promise<boolean> {
  try {
    await makeFindable(ids.concept)
    await makeFindable(ids.version)
  }
  catch (e) {
    if (!(e instanceof RegistrarError)) throw e
    consola.error(
      `[crosspoint] identifiers of version ${versionId} stay reserved until the registrar answers: ${e.message}`
    )
    return false
  }
  const db = await useDb()
  await db.update(versions).set({ identifiersFindableAt: new Date() }).where(eq(versions.id, versionId))
  return true
}

/**
 * The reconciling job: published (or withdrawn) versions whose identifiers are still reserved drafts
 * are made findable now (a registrar failure after the commit, a crash in between). Bounded per run.
 */
export async function reconcileIdentifiers (limit = 50): Promise<{ checked: number, madeFindable: number }> {
  const db = await useDb()
  const pending = await db
    .select({ id: versions.id, datasetId: versions.datasetId, versionNumber: versions.versionNumber })
    .from(versions)
    .where(
      and(
        inArray(versions.state, ['published', 'withdrawn']),
        isNull(versions.identifiersFindableAt),
        sql`${versions.doi} is not null`
      )
    )
    .limit(limit)
  let made = 0
  for (const v of pending) if (await makeVersionFindable(v.id, identifiersFor(v.datasetId, v.versionNumber))) made++
  return { checked: pending.length, madeFindable: made }
}

/** A correction: a new draft version copying the newest published one (records keep their keys, for diffs). */
