/**
 * Review and publication: the curator queue, the review view (report, diff against the previous
 * published version, changes since a return), return with comments, accept → identifiers → publish,
 * new versions and withdrawal. Every transition is one transaction, audited, and mailed.
 */
import { createHash } from 'node:crypto'
import { and, desc, eq, inArray, isNull, ne, sql } from 'drizzle-orm'
import type { H3Event } from 'h3'
import { audit } from './audit'
import { useDb, schema, type Tx } from './db'
import { httpError, MESSAGES } from './errors'
import { requireRole, type Viewer } from './auth'
import { checkRecords } from './deposit/check'
import { ingestContext, recordValidator } from './deposit/drafts'
import { dataciteJson, toCitable } from './citation'
import { ensureDraftDoi, makeFindable, RegistrarError, registrarPrefix } from './registrar'
import { publicUrl, sendMail } from './mail'
import { afterDatasetChange } from './search'
import { rederiveVersions } from './derivations'

const {
  datasets,
  datasetVersions: versions,
  rateRecords: records,
  labs,
  reviews,
  recordComments,
  users,
  labMemberships
} = schema
type Version = typeof versions.$inferSelect

export const OWN_LAB = 'A curator never reviews a dataset of their own lab'

export async function requireCurator (event: H3Event): Promise<Viewer> {
  return requireRole(event, 'curator', 'admin')
}

async function latestVersion (datasetId: number): Promise<Version | undefined> {
  const db = await useDb()
  const [v] = await db
    .select()
    .from(versions)
    .where(eq(versions.datasetId, datasetId))
    .orderBy(desc(versions.versionNumber))
    .limit(1)
  return v
}

/**
 * The dataset's newest version as a curator sees it: 404 when it is not under review (unless the
 * curator's own lab or an admin), 403 when acting on their own lab's dataset.
 */
export async function submittedFor (viewer: Viewer, datasetId: number, opts: { allowOwnLab?: boolean } = {}) {
  const db = await useDb()
  const [d] = await db.select().from(datasets).where(eq(datasets.id, datasetId))
  const v = d && (await latestVersion(datasetId))
  if (!d || !v) throw httpError(404, MESSAGES.notFound)
  const member = viewer.labIds.includes(d.labId)
  if (v.state !== 'submitted' && !member && viewer.role !== 'admin') throw httpError(404, MESSAGES.notFound)
  if (!opts.allowOwnLab && member) throw httpError(403, OWN_LAB)
  return { dataset: d, version: v }
}

export async function reviewQueue (viewer: Viewer, f: { lab?: number, q?: string }) {
  const db = await useDb()
  const rows = await db
    .select({
      datasetId: datasets.id,
      labId: datasets.labId,
      labName: labs.name,
      title: versions.title,
      versionNumber: versions.versionNumber,
      recordCount: versions.recordCount,
      submittedAt: versions.submittedAt,
      updatedAt: versions.updatedAt,
      returns: sql<number>`(select count(*) from review r where r.version_id = ${versions.id} and r.decision = 'returned')`
    })
    .from(versions)
    .innerJoin(datasets, eq(datasets.id, versions.datasetId))
    .innerJoin(labs, eq(labs.id, datasets.labId))
    .where(
      and(
        eq(versions.state, 'submitted'),
        f.lab ? eq(datasets.labId, f.lab) : undefined,
        f.q ? sql`lower(${versions.title}) like ${'%' + f.q.toLowerCase() + '%'}` : undefined
      )
    )
    .orderBy(versions.submittedAt)
  const ctx = await ingestContext()
  const validate = recordValidator()
  const out = []
  for (const r of rows) {
    const recs = await db
      .select({ data: records.data })
      .from(records)
      .innerJoin(versions, eq(versions.id, records.versionId))
      .where(and(eq(versions.datasetId, r.datasetId), eq(versions.versionNumber, r.versionNumber)))
    const check = await checkRecords(
      recs.map(x => x.data),
      validate,
      ctx,
      '/records'
    )
    out.push({
      ...r,
      ownLab: viewer.labIds.includes(r.labId),
      warnings: check.warningCount,
      problems: check.issueCount,
      ageDays: r.submittedAt ? Math.floor((Date.now() - r.submittedAt.getTime()) / 86400e3) : null
    })
  }
  return out
}

function hashData (d: unknown): string {
  return createHash('sha256').update(JSON.stringify(d)).digest('hex').slice(0, 16)
}

/** Field-level changes between two records (JSON pointers of the leaves that differ). */
function changedFields (a: unknown, b: unknown, path = ''): string[] {
  if (typeof a !== 'object' || typeof b !== 'object' || a === null || b === null)
    return JSON.stringify(a) === JSON.stringify(b) ? [] : [path || '/']
  const keys = new Set([...Object.keys(a), ...Object.keys(b)])
  return [...keys].flatMap(k =>
    changedFields((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], `${path}/${k}`)
  )
}

export function diffRecords (
  before: { recordKey: string, data: unknown, position: number }[],
  after: { recordKey: string, data: unknown, position: number }[]
) {
  const old = new Map(before.map(r => [r.recordKey, r]))
  const now = new Map(after.map(r => [r.recordKey, r]))
  return {
    added: after.filter(r => !old.has(r.recordKey)).map(r => ({ recordKey: r.recordKey, position: r.position })),
    removed: before.filter(r => !now.has(r.recordKey)).map(r => ({ recordKey: r.recordKey, position: r.position })),
    changed: after
      .filter(r => old.has(r.recordKey))
      .map(r => ({
        recordKey: r.recordKey,
        position: r.position,
        fields: changedFields(old.get(r.recordKey)!.data, r.data)
      }))
      .filter(c => c.fields.length)
  }
}

export async function reviewView (viewer: Viewer, datasetId: number) {
  const db = await useDb()
  const { dataset, version } = await submittedFor(viewer, datasetId, { allowOwnLab: true })
  const [lab] = await db.select().from(labs).where(eq(labs.id, dataset.labId))
  const recs = await db.select().from(records).where(eq(records.versionId, version.id)).orderBy(records.position)
  const report = await checkRecords(
    recs.map(r => r.data),
    recordValidator(),
    await ingestContext(),
    '/records'
  )
  const [prev] = await db
    .select()
    .from(versions)
    .where(and(eq(versions.datasetId, datasetId), eq(versions.state, 'published'), ne(versions.id, version.id)))
    .orderBy(desc(versions.versionNumber))
    .limit(1)
  const prevRecs = prev ? await db.select().from(records).where(eq(records.versionId, prev.id)) : []
  const history = await db
    .select({
      id: reviews.id,
      decision: reviews.decision,
      comment: reviews.comment,
      createdAt: reviews.createdAt,
      snapshot: reviews.snapshot,
      curator: users.name
    })
    .from(reviews)
    .leftJoin(users, eq(users.id, reviews.curatorId))
    .where(eq(reviews.versionId, version.id))
    .orderBy(desc(reviews.id))
  const comments = history.length
    ? await db
        .select({ reviewId: recordComments.reviewId, recordId: recordComments.recordId, body: recordComments.body })
        .from(recordComments)
        .where(
          inArray(
            recordComments.reviewId,
            history.map(h => h.id)
          )
        )
    : []
  const lastReturn = history.find(h => h.decision === 'returned' && h.snapshot)
  let sinceReturn = null
  if (lastReturn?.snapshot) {
    const snap = new Map(lastReturn.snapshot.map(s => [s.key, s.hash]))
    sinceReturn = {
      added: recs.filter(r => !snap.has(r.recordKey)).map(r => r.position),
      changed: recs
        .filter(r => snap.has(r.recordKey) && snap.get(r.recordKey) !== hashData(r.data))
        .map(r => r.position),
      removed: [...snap.keys()].filter(k => !recs.some(r => r.recordKey === k)).length
    }
  }
  return {
    datasetId,
    ownLab: viewer.labIds.includes(dataset.labId),
    lab: { id: lab!.id, name: lab!.name },
    version: {
      id: version.id,
      versionNumber: version.versionNumber,
      state: version.state,
      title: version.title,
      description: version.description,
      metadata: version.metadata,
      license: version.license,
      recordCount: version.recordCount,
      submittedAt: version.submittedAt,
      updatedAt: version.updatedAt.getTime()
    },
    records: recs.map(r => ({
      id: r.id,
      position: r.position,
      recordKey: r.recordKey,
      data: r.data,
      deltaG: r.deltaG,
      log10Rate: r.log10Rate,
      donorName: r.donorName,
      acceptorName: r.acceptorName,
      solvent: r.solvent,
      process: r.process,
      temperatureK: r.temperatureK
    })),
    report: {
      issues: report.issues,
      issueCount: report.issueCount,
      warnings: report.warnings,
      warningCount: report.warningCount
    },
    diff: prev ? { against: prev.versionNumber, ...diffRecords(prevRecs, recs) } : null,
    sinceReturn,
    history: history.map(h => ({ ...h, snapshot: undefined, comments: comments.filter(c => c.reviewId === h.id) }))
  }
}

async function labEmails (labId: number): Promise<string[]> {
  const db = await useDb()
  return (
    await db
      .select({ email: users.email })
      .from(labMemberships)
      .innerJoin(users, eq(users.id, labMemberships.userId))
      .where(eq(labMemberships.labId, labId))
  ).map(r => r.email)
}

/** Moves a version out of "submitted" only if nobody else did since the curator loaded it. */
async function transition (tx: Tx, version: Version, expectedUpdatedAt: number, set: Partial<Version>) {
  const rows = await tx
    .update(versions)
    .set({ ...set, updatedAt: new Date() })
    .where(
      and(
        eq(versions.id, version.id),
        eq(versions.state, 'submitted'),
        eq(versions.updatedAt, new Date(expectedUpdatedAt))
      )
    )
    .returning({ id: versions.id })
  if (!rows.length)
    throw httpError(
      409,
      'Another curator acted on this submission, or it changed since you opened it; reload to see its current state'
    )
}

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
      + `changes.\n\n${b.comment}\n\n${(b.recordComments ?? []).length} record(s) have comments. Answer them and `
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
    throw httpError(422, `The submission has ${problems.issueCount} problem(s); return it instead`, problems.issues)
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
      metadata: { ...(version.metadata as object), publicationYear: now.getUTCFullYear() } as never
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
    console.error(
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
      metadata: { ...(latest.metadata as object), publicationYear: undefined } as never,
      license: latest.license,
      embargoUntil: latest.embargoUntil,
      recordCount: latest.recordCount
    })
    .returning()
  await tx.run(sql`insert into rate_record (version_id, position, record_key, data, donor_name, acceptor_name, bridge_name,
      linkage, process, solvent, technique, temperature_k, distance_angstrom, rate, rate_kind, log10_rate, delta_g, is_demo)
    select ${nv!.id}, position, record_key, data, donor_name, acceptor_name, bridge_name,
      linkage, process, solvent, technique, temperature_k, distance_angstrom, rate, rate_kind, log10_rate, delta_g, is_demo
    from rate_record where version_id = ${latest.id}`)
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
