import { index, integer, primaryKey, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core'
import { timestamps } from './columns'

export const ROLES = ['contributor', 'curator', 'admin'] as const
export type Role = (typeof ROLES)[number]
// ── accounts (adapter shape + our columns) ───────────────────────────────────────────────
export const users = sqliteTable(
  'user',
  {
    id: text('id')
      .primaryKey()
      .$defaultFn(() => crypto.randomUUID()),
    name: text('name'),
    email: text('email').notNull(),
    emailVerified: integer('emailVerified', { mode: 'timestamp_ms' }),
    image: text('image'),
    passwordHash: text('password_hash'),
    role: text('role', { enum: ROLES }).notNull().default('contributor'),
    orcid: text('orcid'),
    affiliation: text('affiliation'),
    isDemo: integer('is_demo', { mode: 'boolean' }).notNull().default(false),
    /** Raised by "sign out everywhere", a password reset and a role change: sessions signed before it end. */
    sessionVersion: integer('session_version').notNull().default(0),
    ...timestamps
  },
  t => [uniqueIndex('user_email_unique').on(t.email)]
)

/** Sessions ended by signing out (their id until the session would have expired anyway). */
export const revokedSessions = sqliteTable(
  'revoked_session',
  {
    sid: text('sid').primaryKey(),
    expiresAt: integer('expires_at', { mode: 'timestamp_ms' }).notNull()
  },
  t => [index('revoked_session_expires_idx').on(t.expiresAt)]
)

export const accounts = sqliteTable(
  'account',
  {
    userId: text('userId')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    type: text('type').notNull(),
    provider: text('provider').notNull(),
    providerAccountId: text('providerAccountId').notNull(),
    refresh_token: text('refresh_token'),
    access_token: text('access_token'),
    expires_at: integer('expires_at'),
    token_type: text('token_type'),
    scope: text('scope'),
    id_token: text('id_token'),
    session_state: text('session_state')
  },
  t => [primaryKey({ name: 'account_pk', columns: [t.provider, t.providerAccountId] })]
)

export const sessions = sqliteTable('session', {
  sessionToken: text('sessionToken').primaryKey(),
  userId: text('userId')
    .notNull()
    .references(() => users.id, { onDelete: 'cascade' }),
  expires: integer('expires', { mode: 'timestamp_ms' }).notNull()
})

export const verificationTokens = sqliteTable(
  'verificationToken',
  {
    identifier: text('identifier').notNull(),
    token: text('token').notNull(),
    expires: integer('expires', { mode: 'timestamp_ms' }).notNull()
  },
  t => [primaryKey({ name: 'verification_token_pk', columns: [t.identifier, t.token] })]
)

export const apiTokens = sqliteTable(
  'api_token',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    userId: text('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    name: text('name').notNull(),
    /** sha256 of the token; the token itself is shown once and never stored. */
    tokenHash: text('token_hash').notNull(),
    /** First characters of the token, to tell tokens apart in the UI. */
    prefix: text('prefix').notNull(),
    lastUsedAt: integer('last_used_at', { mode: 'timestamp_ms' }),
    revokedAt: integer('revoked_at', { mode: 'timestamp_ms' }),
    ...timestamps
  },
  t => [uniqueIndex('api_token_hash_unique').on(t.tokenHash), index('api_token_user_idx').on(t.userId)]
)

// ── labs ────────────────────────────────────────────────────────────────────────────────
export const labs = sqliteTable(
  'lab',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    slug: text('slug').notNull(),
    name: text('name').notNull(),
    institution: text('institution'),
    rorId: text('ror_id'),
    isDemo: integer('is_demo', { mode: 'boolean' }).notNull().default(false),
    ...timestamps
  },
  t => [uniqueIndex('lab_slug_unique').on(t.slug)]
)

export const labMemberships = sqliteTable(
  'lab_membership',
  {
    labId: integer('lab_id')
      .notNull()
      .references(() => labs.id, { onDelete: 'cascade' }),
    userId: text('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    isLead: integer('is_lead', { mode: 'boolean' }).notNull().default(false),
    ...timestamps
  },
  t => [
    primaryKey({ name: 'lab_membership_pk', columns: [t.labId, t.userId] }),
    index('lab_membership_user_idx').on(t.userId)
  ]
)
