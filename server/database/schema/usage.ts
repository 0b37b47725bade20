import { index, integer, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core'
import { timestamps } from './columns'
import { users } from './accounts'
import { datasets } from './archive'

// ── usage counts (COUNTER Code of Practice for Research Data) and saved-search alerts ─────

/**
 * One row per counted event (robots are never written). `session` is a hash made with that day's salt
 * (usage_salt), so nothing in it links to a person once the salt is gone; no IP address is stored.
 * Totals, uniques and the 30-second double-click rule are worked out when counts are read.
 */
export const usageEvents = sqliteTable(
  'usage_event',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    datasetId: integer('dataset_id')
      .notNull()
      .references(() => datasets.id, { onDelete: 'cascade' }),
    /** 'investigation' (landing, record, metadata, citation) or 'request' (bundle download). */
    kind: text('kind', { enum: ['investigation', 'request'] }).notNull(),
    /** What was asked for ("landing", "record:12", "citation:bibtex", "bundle"): the double-click rule's URL. */
    item: text('item').notNull(),
    session: text('session').notNull(),
    /** COUNTER access method: 1 = machine (a script with an API token), 0 = regular. */
    machine: integer('machine', { mode: 'boolean' }).notNull(),
    at: integer('at', { mode: 'timestamp_ms' }).notNull()
  },
  t => [index('usage_event_dataset_at_idx').on(t.datasetId, t.at), index('usage_event_at_idx').on(t.at)]
)

/** The salt of the day's session hashes; only today's is kept. */
export const usageSalts = sqliteTable('usage_salt', {
  day: text('day').primaryKey(),
  salt: text('salt').notNull()
})

/** A search a signed-in person keeps, with a digest of newly published matching records by e-mail. */
export const savedSearches = sqliteTable(
  'saved_search',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    userId: text('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    name: text('name').notNull(),
    /** The search's parameters as Explore and GET /api/v1/records take them (validated JSON object). */
    query: text('query', { mode: 'json' }).notNull().$type<Partial<Record<string, string | number>>>(),
    alerts: integer('alerts', { mode: 'boolean' }).notNull().default(true),
    /** Records that became public up to this moment have been considered for a digest. */
    checkedUntil: integer('checked_until', { mode: 'timestamp_ms' }).notNull(),
    lastDigestAt: integer('last_digest_at', { mode: 'timestamp_ms' }),
    ...timestamps
  },
  t => [uniqueIndex('saved_search_user_name_unique').on(t.userId, t.name)]
)
