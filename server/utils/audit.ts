/** The audit trail: who changed what, when. Written for every role, membership and review change. */
import { useDb, schema } from './db'

export async function audit (actorId: string | null, action: string, targetType: string, targetId: string | number, detail?: Record<string, unknown>): Promise<void> {
  const db = await useDb()
  await db.insert(schema.auditEvents).values({ actorId, action, targetType, targetId: String(targetId), detail: detail ?? null })
}
