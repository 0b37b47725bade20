/** The audit trail: who changed what, when. Every audit row is written here (inside the caller's transaction when given one). */
import { useDb, schema, type Db, type Tx } from './db'

export async function audit (actorId: string | null, action: string, targetType: string, targetId: string | number, detail?: Record<string, unknown>, via?: Db | Tx): Promise<void> {
  const db = via ?? await useDb()
  await db.insert(schema.auditEvents).values({ actorId, action, targetType, targetId: String(targetId), detail: detail ?? null })
}
