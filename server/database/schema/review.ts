import { index, integer, sqliteTable, text } from 'drizzle-orm/sqlite-core'
import { timestamps } from './columns'
import { users } from './accounts'
import { datasetVersions, rateRecords } from './archive'

// ── review ──────────────────────────────────────────────────────────────────────────────
export const reviews = sqliteTable(
  'review',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    versionId: integer('version_id')
      .notNull()
      .references(() => datasetVersions.id, { onDelete: 'cascade' }),
    curatorId: text('curator_id')
      .notNull()
      .references(() => users.id),
    decision: text('decision', { enum: ['accepted', 'returned'] }).notNull(),
    comment: text('comment').notNull().default(''),
    /** At a return: each record's key and a hash of its data, so a resubmission can show what changed. */
    snapshot: text('snapshot', { mode: 'json' }).$type<{ key: string, hash: string }[]>(),
    ...timestamps
  },
  t => [index('review_version_idx').on(t.versionId)]
)

export const recordComments = sqliteTable(
  'record_comment',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    reviewId: integer('review_id')
      .notNull()
      .references(() => reviews.id, { onDelete: 'cascade' }),
    recordId: integer('record_id')
      .notNull()
      .references(() => rateRecords.id, { onDelete: 'cascade' }),
    body: text('body').notNull(),
    ...timestamps
  },
  t => [index('record_comment_review_idx').on(t.reviewId), index('record_comment_record_idx').on(t.recordId)]
)

export const auditEvents = sqliteTable(
  'audit_event',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    actorId: text('actor_id').references(() => users.id),
    action: text('action').notNull(),
    targetType: text('target_type').notNull(),
    targetId: text('target_id').notNull(),
    detail: text('detail', { mode: 'json' }).$type<Record<string, unknown>>(),
    ...timestamps
  },
  t => [index('audit_event_target_idx').on(t.targetType, t.targetId), index('audit_event_created_idx').on(t.createdAt)]
)
