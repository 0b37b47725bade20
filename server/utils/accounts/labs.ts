/** Labs and memberships: creation, invitations by e-mail, removal; every change is audited. */
import { and, eq } from 'drizzle-orm'
import { useDb, schema } from '../storage/db'
import { httpError, MESSAGES } from '../http/errors'
import { audit } from '../storage/audit'
import { createOneTimeToken, consumeOneTimeToken } from './one-time-tokens'
import { publicUrl, sendMail } from '../services/mail'
import { normalizeEmail, type Viewer } from './auth'

export async function getLabOr404 (id: number) {
  const db = await useDb()
  const [lab] = await db.select().from(schema.labs).where(eq(schema.labs.id, id))
  if (!lab) throw httpError(404, MESSAGES.notFound)
  return lab
}

export async function labMembers (labId: number) {
  const db = await useDb()
  return db
    .select({
      userId: schema.users.id,
      name: schema.users.name,
      email: schema.users.email,
      orcid: schema.users.orcid,
      role: schema.users.role,
      isLead: schema.labMemberships.isLead,
      since: schema.labMemberships.createdAt
    })
    .from(schema.labMemberships)
    .innerJoin(schema.users, eq(schema.users.id, schema.labMemberships.userId))
    .where(eq(schema.labMemberships.labId, labId))
    .orderBy(schema.users.name)
}

export async function createLab (actor: Viewer, input: { slug: string, name: string, institution?: string }) {
  const db = await useDb()
  const [exists] = await db.select().from(schema.labs).where(eq(schema.labs.slug, input.slug))
  if (exists) throw httpError(409, 'A lab with this short name exists', [{ path: '/slug', message: 'is taken' }])
  const [lab] = await db.insert(schema.labs).values(input).returning()
  await audit(actor.id, 'lab.created', 'lab', lab!.id, { slug: input.slug })
  return lab!
}

export async function inviteToLab (actor: Viewer, labId: number, email: string) {
  const lab = await getLabOr404(labId)
  const token = await createOneTimeToken(`invite:${labId}`, normalizeEmail(email), 7 * 24 * 60)
  await sendMail(
    email,
    `Invitation to join ${lab.name} on Crosspoint`,
    `${actor.name ?? actor.email} invites you to join ${lab.name} on Crosspoint, the shared archive of `
    + `electron-transfer rates.\n\nSign in (or create an account with this address), then `
    + `open:\n${publicUrl(`/invite?token=${token}`)}\n\nThe invitation is valid for 7 days.\n`
  )
  await audit(actor.id, 'lab.invited', 'lab', labId, { email: normalizeEmail(email) })
}

export async function acceptInvitation (viewer: Viewer, token: string) {
  const t = await consumeOneTimeToken(token, 'invite:', (inv) => {
    if (inv.email !== normalizeEmail(viewer.email))
      throw httpError(403, `This invitation was sent to ${inv.email}; sign in with that address to accept it`)
  })
  if (!t)
    throw httpError(410, 'This invitation is not valid any more; ask the lab lead for a new one', [
      { path: '/token', message: 'unknown, used or expired' }
    ])
  const labId = Number(t.purpose.split(':')[1])
  const db = await useDb()
  await db.insert(schema.labMemberships).values({ labId, userId: viewer.id }).onConflictDoNothing()
  await audit(viewer.id, 'lab.member-added', 'lab', labId, { userId: viewer.id, via: 'invitation' })
  return getLabOr404(labId)
}

export async function removeMember (actor: Viewer, labId: number, userId: string) {
  const db = await useDb()
  const rows = await db
    .delete(schema.labMemberships)
    .where(and(eq(schema.labMemberships.labId, labId), eq(schema.labMemberships.userId, userId)))
    .returning()
  if (!rows.length) throw httpError(404, 'That person is not a member of this lab')
  await audit(actor.id, 'lab.member-removed', 'lab', labId, { userId })
}
