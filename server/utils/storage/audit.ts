/** The audit trail: who changed what, when. Every audit row is written here (inside the caller's transaction when given one). */
import { desc, eq, sql } from 'drizzle-orm'
import { useDb, schema, type Db, type Tx } from './db'

const { auditEvents, datasetVersions: versions, users } = schema

export async function audit (
  actorId: string | null,
  action: string,
  targetType: string,
  targetId: string | number,
  detail?: Record<string, unknown>,
  via?: Db | Tx
): Promise<void> {
  const db = via ?? (await useDb())
  await db
    .insert(schema.auditEvents)
    .values({ actorId, action, targetType, targetId: String(targetId), detail: detail ?? null })
}

/** The audit trail of one dataset, for its lab, curators and admins. */
export async function datasetAudit (datasetId: number) {
  const db = await useDb()
  const vIds = (await db.select({ id: versions.id }).from(versions).where(eq(versions.datasetId, datasetId))).map(v =>
    String(v.id)
  )
  return db
    .select({ at: auditEvents.createdAt, action: auditEvents.action, actor: users.name, detail: auditEvents.detail })
    .from(auditEvents)
    .leftJoin(users, eq(users.id, auditEvents.actorId))
    .where(
      sql`(${auditEvents.targetType} = 'dataset' and ${auditEvents.targetId} = ${String(datasetId)})
        or (${auditEvents.targetType} = 'dataset_version' and ${auditEvents.targetId} in ${vIds.length ? vIds : ['-']})`
    )
    .orderBy(desc(auditEvents.id))
}
