/** After publication: new versions, correction versions with re-derived ΔG°, and withdrawal with a tombstone. */
import { and, eq } from 'drizzle-orm'
import { audit } from '../storage/audit'
import { useDb, schema, type Tx } from '../storage/db'
import { httpError, MESSAGES } from '../http/errors'
import type { Viewer } from '../accounts/auth'
import { publicUrl, sendMail } from '../services/mail'
import { afterDatasetChange } from '../search/search'
import { rederiveVersions } from './derivations'
import { copyRecords } from './copy-records'
import { OWN_LAB, type Version, labEmails, latestVersion } from './common'

const { datasets, datasetVersions: versions } = schema

export async function newVersion (viewer: Viewer, datasetId: number) {
  const db = await useDb()
  const [d] = await db.select().from(datasets).where(eq(datasets.id, datasetId))
  if (!d || !viewer.labIds.includes(d.labId)) throw httpError(404, MESSAGES.notFound)
  const latest = await publishedForNewVersion(datasetId)
  return db
    .transaction(async (tx) => {
      const nv = await copyToDraft(tx, latest)
      await audit(viewer.id, 'dataset.new-version', 'dataset', datasetId, { versionNumber: nv.versionNumber }, tx)
      return { versionNumber: nv.versionNumber, state: 'draft' }
    })
    .then(async (r) => {
      await afterDatasetChange(datasetId)
      return r
    })
}

async function publishedForNewVersion (datasetId: number): Promise<Version> {
  const latest = await latestVersion(datasetId)
  if (!latest || latest.state !== 'published')
    throw httpError(
      409,
      latest?.state === 'withdrawn'
        ? 'A withdrawn dataset cannot get new versions'
        : 'The newest version is not published yet; change that one instead'
    )
  return latest
}

async function copyToDraft (tx: Tx, latest: Version): Promise<Version> {
  const [nv] = await tx
    .insert(versions)
    .values({
      datasetId: latest.datasetId,
      versionNumber: latest.versionNumber + 1,
      state: 'draft',
      title: latest.title,
      description: latest.description,
      metadata: { ...latest.metadata, publicationYear: undefined },
      license: latest.license,
      embargoUntil: latest.embargoUntil,
      recordCount: latest.recordCount
    })
    .returning()
  await copyRecords(tx, latest.id, nv!.id)
  return nv!
}

/**
 * From the curators' derivation report: a new draft version of another lab's published dataset in which
 * every ΔG° derived from potentials is re-derived by process. The published version does not change;
 * the lab is mailed, checks the draft and submits it, and another review follows (the diff shows each change).
 */
export async function startDerivationCorrection (viewer: Viewer, datasetId: number) {
  const db = await useDb()
  const [d] = await db.select().from(datasets).where(eq(datasets.id, datasetId))
  if (!d) throw httpError(404, MESSAGES.notFound)
  if (viewer.labIds.includes(d.labId)) throw httpError(403, OWN_LAB)
  const latest = await publishedForNewVersion(datasetId)
  const res = await db.transaction(async (tx) => {
    const nv = await copyToDraft(tx, latest)
    const { changed } = await rederiveVersions(tx, [nv.id])
    if (!changed)
      throw httpError(
        409,
        'No record of the newest published version differs from the derivation by process; nothing to correct'
      )
    await audit(
      viewer.id,
      'dataset.correction-started',
      'dataset',
      datasetId,
      { versionNumber: nv.versionNumber, rederived: changed, rule: 'ΔG° from potentials by process' },
      tx
    )
    return { versionNumber: nv.versionNumber, state: 'draft' as const, rederived: changed }
  })
  await afterDatasetChange(datasetId)
  for (const to of await labEmails(d.labId)) {
    await sendMail(
      to,
      `Correction started: dataset ${datasetId}`,
      `A curator started version ${res.versionNumber} of "${latest.title}" as a draft: ${res.rederived} driving `
      + `force(s) derived from redox potentials were re-derived by the rule for their process (charge recombination: `
      + `−(ΔG°_CS + E₀₀); charge shift: no ion-pair term). The published version is unchanged. Check the draft and `
      + `submit it for review: ${publicUrl(`/deposit/${datasetId}`)}\n`
    )
  }
  return res
}

export async function withdrawDataset (viewer: Viewer, datasetId: number, reason: string) {
  const db = await useDb()
  const [d] = await db.select().from(datasets).where(eq(datasets.id, datasetId))
  if (!d) throw httpError(404, MESSAGES.notFound)
  const pub = await db
    .select()
    .from(versions)
    .where(and(eq(versions.datasetId, datasetId), eq(versions.state, 'published')))
  if (!pub.length) throw httpError(409, 'Only published datasets can be withdrawn')
  const now = new Date()
  await db.transaction(async (tx) => {
    await tx
      .update(versions)
      .set({ state: 'withdrawn', withdrawnAt: now, withdrawalReason: reason, updatedAt: now })
      .where(and(eq(versions.datasetId, datasetId), eq(versions.state, 'published')))
    await audit(viewer.id, 'dataset.withdrawn', 'dataset', datasetId, { reason }, tx)
  })
  await afterDatasetChange(datasetId)
  for (const to of await labEmails(d.labId))
    await sendMail(
      to,
      `Withdrawn: dataset ${datasetId}`,
      `The dataset was withdrawn: ${reason}\nIts identifiers keep resolving to a tombstone page: ${publicUrl(`/datasets/${datasetId}`)}\n`
    )
  return { state: 'withdrawn' }
}
