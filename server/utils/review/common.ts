/** What every review step shares: the curator guard, the newest version, the lab's mail list, a guarded transition. */
import { and, desc, eq } from 'drizzle-orm'
import type { H3Event } from 'h3'
import { useDb, schema, type Tx } from '../storage/db'
import { httpError } from '../http/errors'
import { requireRole, type Viewer } from '../accounts/auth'

const { datasetVersions: versions, users, labMemberships } = schema
export type Version = typeof versions.$inferSelect

export const OWN_LAB = 'A curator never reviews a dataset of their own lab'

export async function requireCurator (event: H3Event): Promise<Viewer> {
  return requireRole(event, 'curator', 'admin')
}

export async function latestVersion (datasetId: number): Promise<Version | undefined> {
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
export async function labEmails (labId: number): Promise<string[]> {
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
export async function transition (tx: Tx, version: Version, expectedUpdatedAt: number, set: Partial<Version>) {
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
