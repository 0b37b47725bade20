/**
 * Loads the invented demo scenario into NUXT_DATABASE_URL (migrating first). Idempotent: every
 * row is found by a natural key (e-mail, lab slug, solvent name, dataset seed key) and skipped
 * when it is already there, so running it twice leaves the same counts.
 */
import { and, eq } from 'drizzle-orm'
import { hash } from '@node-rs/argon2'
import { openDatabase, schema } from '../server/utils/storage/db'
import { recordColumns } from '../shared/records/record-columns'
import { DATASETS, DEMO_PASSWORD, LABS, PEOPLE, SOLVENTS, demoMetadata, demoRecords, rng } from './lib/scenario'

const prefix = process.env.NUXT_REGISTRAR_PREFIX ?? '10.99999'
const DAY = 86400e3
const BASE_TIME = Date.parse('2026-06-01T09:00:00Z')

export async function seed (url = process.env.NUXT_DATABASE_URL ?? 'file:./data/crosspoint.db'): Promise<Record<string, number>> {
  const { db, client } = await openDatabase(url, process.env.NUXT_DATABASE_AUTH_TOKEN)
  try {
    for (const s of SOLVENTS) {
      await db.insert(schema.solvents).values(s).onConflictDoNothing({ target: schema.solvents.name })
    }
    const labIds: Record<string, number> = {}
    for (const l of LABS) {
      await db.insert(schema.labs).values({ ...l, isDemo: true }).onConflictDoNothing({ target: schema.labs.slug })
      labIds[l.slug] = (await db.select({ id: schema.labs.id }).from(schema.labs).where(eq(schema.labs.slug, l.slug)))[0]!.id
    }
    const passwordHash = await hash(DEMO_PASSWORD)
    const userIds: Record<string, string> = {}
    for (const p of PEOPLE) {
      const lab = p.lab ? LABS.find(l => l.slug === p.lab) : undefined
      await db.insert(schema.users).values({
        email: p.email, name: p.name, role: p.role, orcid: p.orcid, affiliation: lab?.institution ?? 'Crosspoint operations (fictional)',
        passwordHash, emailVerified: new Date(BASE_TIME), isDemo: true
      }).onConflictDoNothing({ target: schema.users.email })
      const id = (await db.select({ id: schema.users.id }).from(schema.users).where(eq(schema.users.email, p.email)))[0]!.id
      userIds[p.email] = id
      if (p.lab) {
        await db.insert(schema.labMemberships).values({ labId: labIds[p.lab]!, userId: id, isLead: p.lead }).onConflictDoNothing()
      }
    }
    for (const [n, ds] of DATASETS.entries()) {
      // a curator never reviews their own lab's work, in the demo history too
      const curator = PEOPLE.find(p => p.role === 'curator' && p.lab !== ds.lab)!
      const existing = await db.select({ id: schema.datasets.id }).from(schema.datasets).where(eq(schema.datasets.seedKey, ds.key))
      if (existing.length) continue
      const owner = PEOPLE.find(p => p.lab === ds.lab && p.role === 'contributor')!
      const lab = LABS.find(l => l.slug === ds.lab)!
      const meta = demoMetadata(ds, [{ name: owner.name, orcid: owner.orcid, affiliation: lab.institution }])
      const created = new Date(BASE_TIME + n * 9 * DAY)
      await db.transaction(async (tx) => {
        const [d] = await tx.insert(schema.datasets).values({ labId: labIds[ds.lab]!, createdBy: userIds[owner.email], seedKey: ds.key, isDemo: true, createdAt: created, updatedAt: created }).returning()
        const datasetId = d!.id
        const everPublished = ds.versions.some(s => s === 'published' || s === 'withdrawn')
        const conceptDoi = everPublished ? `${prefix}/cp-demo.${datasetId}` : null
        if (conceptDoi) await tx.update(schema.datasets).set({ conceptDoi }).where(eq(schema.datasets.id, datasetId))
        for (const [vi, state] of ds.versions.entries()) {
          const at = new Date(created.getTime() + (vi + 1) * 20 * DAY)
          const records = demoRecords(ds, vi)
          const published = state === 'published' || state === 'withdrawn'
          const [v] = await tx.insert(schema.datasetVersions).values({
            datasetId, versionNumber: vi + 1, state, title: ds.title, description: ds.description,
            metadata: { ...meta, ...(published ? { publicationYear: at.getUTCFullYear() } : {}) }, license: ds.license,
            doi: published ? `${conceptDoi}.v${vi + 1}` : null, recordCount: records.length,
            submittedAt: state === 'draft' ? null : new Date(at.getTime() - 5 * DAY),
            publishedAt: published ? at : null, identifiersFindableAt: published ? at : null,
            withdrawnAt: state === 'withdrawn' ? new Date(at.getTime() + 30 * DAY) : null,
            withdrawalReason: state === 'withdrawn' ? 'A calibration error in the demo instrument was found after publication (demo).' : null,
            createdAt: new Date(at.getTime() - 10 * DAY), updatedAt: at
          }).returning()
          const versionId = v!.id
          const rows = records.map((data, i) => ({ versionId, position: i + 1, recordKey: `${ds.key}-r${i + 1}`, data: data as unknown as Record<string, unknown>, isDemo: true, ...recordColumns(data) }))
          for (let i = 0; i < rows.length; i += 200) await tx.insert(schema.rateRecords).values(rows.slice(i, i + 200))
          if (published || state === 'returned') {
            const [rev] = await tx.insert(schema.reviews).values({
              versionId, curatorId: userIds[curator.email]!, decision: state === 'returned' ? 'returned' : 'accepted',
              comment: state === 'returned' ? (ds.returnComment ?? 'Please revise.') : 'Checked units, references and plots; accepted (demo).', createdAt: at
            }).returning()
            if (state === 'returned') {
              const firstIds = await tx.select({ id: schema.rateRecords.id }).from(schema.rateRecords).where(eq(schema.rateRecords.versionId, versionId)).orderBy(schema.rateRecords.position).limit(2)
              for (const [ci, rec] of firstIds.entries()) {
                await tx.insert(schema.recordComments).values({ reviewId: rev!.id, recordId: rec.id, body: ci === 0 ? 'This rate is ten times faster than its neighbours; please check the unit.' : 'Which reference electrode were these potentials measured against?' })
              }
            }
          }
          await tx.insert(schema.auditEvents).values({ actorId: userIds[owner.email], action: 'version.created', targetType: 'dataset_version', targetId: String(versionId), detail: { demo: true, state }, createdAt: at })
        }
      })
    }
    await seedUsage(db)
    const counts: Record<string, number> = {}
    for (const t of ['user', 'lab', 'lab_membership', 'dataset', 'dataset_version', 'rate_record', 'review', 'record_comment', 'solvent']) {
      counts[t] = (await client.execute(`select count(*) as n from "${t}"`)).rows[0]!.n as number
    }
    return counts
  }
  finally {
    client.close()
  }
}

/**
 * Invented views and downloads (demo data) for each published demo dataset without any: visits from its
 * publication to now, each a made-up user-session that opens the landing page and a few records and sometimes
 * downloads the bundle. Written as usage events, so the counting rules apply to them as to real ones.
 */
async function seedUsage (db: Awaited<ReturnType<typeof openDatabase>>['db']) {
  const published = await db
    .select({ datasetId: schema.datasetVersions.datasetId, at: schema.datasetVersions.publishedAt })
    .from(schema.datasetVersions)
    .innerJoin(schema.datasets, eq(schema.datasets.id, schema.datasetVersions.datasetId))
    .where(and(eq(schema.datasetVersions.state, 'published'), eq(schema.datasets.isDemo, true)))
  const now = Date.now()
  for (const p of published) {
    if (!p.at) continue
    const [any] = await db.select({ id: schema.usageEvents.id }).from(schema.usageEvents).where(eq(schema.usageEvents.datasetId, p.datasetId)).limit(1)
    if (any) continue
    const r = rng(9100 + p.datasetId).next
    const events: (typeof schema.usageEvents.$inferInsert)[] = []
    const popularity = 0.5 + 2 * r()
    for (let t = Math.max(p.at.getTime(), now - 400 * DAY); t < now; t += DAY) {
      const visits = Math.floor(r() * 3 * popularity)
      for (let v = 0; v < visits; v++) {
        const session = `demo-${p.datasetId}-${t}-${v}`
        const machine = r() < 0.05
        let at = t + Math.floor(r() * DAY * 0.9)
        if (at > now) break
        events.push({ datasetId: p.datasetId, kind: 'investigation', item: 'landing', session, machine, at: new Date(at) })
        for (let k = Math.floor(r() * 3); k > 0; k--) {
          at += 40e3 + Math.floor(r() * 120e3)
          events.push({ datasetId: p.datasetId, kind: 'investigation', item: `record:${k}`, session, machine, at: new Date(at) })
        }
        if (r() < 0.15) events.push({ datasetId: p.datasetId, kind: 'request', item: 'bundle', session, machine, at: new Date(at + 60e3) })
      }
    }
    for (let i = 0; i < events.length; i += 500) await db.insert(schema.usageEvents).values(events.slice(i, i + 500))
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const url = process.env.NUXT_DATABASE_URL ?? 'file:./data/crosspoint.db'
  seed(url).then((counts) => {
    process.stdout.write(`Seeded the demo scenario into ${url}: ${JSON.stringify(counts)}\n`)
  }).catch((e) => { process.stderr.write(`Seeding failed: ${(e as Error).message}\n`); process.exit(1) })
}
