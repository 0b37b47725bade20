/**
 * Crosspoint's database schema (SQLite through libSQL). snake_case columns, camelCase keys,
 * named indexes, relations last. Auth tables keep @auth/drizzle-adapter's shape.
 */
import { sql, relations } from 'drizzle-orm'
import { index, integer, primaryKey, real, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core'

const timestamps = {
  createdAt: integer('created_at', { mode: 'timestamp_ms' })
    .notNull()
    .default(sql`(unixepoch('subsec') * 1000)`),
  updatedAt: integer('updated_at', { mode: 'timestamp_ms' })
    .notNull()
    .default(sql`(unixepoch('subsec') * 1000)`)
}

export const ROLES = ['contributor', 'curator', 'admin'] as const
export type Role = (typeof ROLES)[number]
export const VERSION_STATES = ['draft', 'submitted', 'returned', 'published', 'withdrawn'] as const
export type VersionState = (typeof VERSION_STATES)[number]

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

// ── datasets, versions, records ─────────────────────────────────────────────────────────
export const datasets = sqliteTable(
  'dataset',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    labId: integer('lab_id')
      .notNull()
      .references(() => labs.id),
    /** Concept identifier shared by every version, minted at first publication. */
    conceptDoi: text('concept_doi'),
    createdBy: text('created_by').references(() => users.id),
    /** Stable key of the demo scenario row this dataset came from (idempotent seeding). */
    seedKey: text('seed_key'),
    isDemo: integer('is_demo', { mode: 'boolean' }).notNull().default(false),
    ...timestamps
  },
  t => [index('dataset_lab_idx').on(t.labId), uniqueIndex('dataset_seed_key_unique').on(t.seedKey)]
)

export const datasetVersions = sqliteTable(
  'dataset_version',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    datasetId: integer('dataset_id')
      .notNull()
      .references(() => datasets.id, { onDelete: 'cascade' }),
    versionNumber: integer('version_number').notNull(),
    state: text('state', { enum: VERSION_STATES }).notNull().default('draft'),
    title: text('title').notNull(),
    description: text('description').notNull().default(''),
    /** DataCite-compatible citation metadata (creators, keywords, related identifiers, funding …) as JSON. */
    metadata: text('metadata', { mode: 'json' })
      .$type<Record<string, unknown>>()
      .notNull()
      .default(sql`'{}'`),
    license: text('license').notNull().default('CC-BY-4.0'),
    embargoUntil: text('embargo_until'),
    doi: text('doi'),
    recordCount: integer('record_count').notNull().default(0),
    submittedAt: integer('submitted_at', { mode: 'timestamp_ms' }),
    publishedAt: integer('published_at', { mode: 'timestamp_ms' }),
    withdrawnAt: integer('withdrawn_at', { mode: 'timestamp_ms' }),
    withdrawalReason: text('withdrawal_reason'),
    /** When the registrar made this version's identifiers findable; null while they are reserved drafts (reconciled by a job). */
    identifiersFindableAt: integer('identifiers_findable_at', { mode: 'timestamp_ms' }),
    ...timestamps
  },
  t => [
    uniqueIndex('dataset_version_number_unique').on(t.datasetId, t.versionNumber),
    index('dataset_version_state_idx').on(t.state),
    uniqueIndex('dataset_version_doi_unique').on(t.doi)
  ]
)

export const rateRecords = sqliteTable(
  'rate_record',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    versionId: integer('version_id')
      .notNull()
      .references(() => datasetVersions.id, { onDelete: 'cascade' }),
    /** Row order within the version (1-based, as in the uploaded file). */
    position: integer('position').notNull(),
    /** Stable id of the record across versions of its dataset (for diffs). */
    recordKey: text('record_key').notNull(),
    /** The full record in the open format (rate-record.v1), canonical units, originals kept inside. */
    data: text('data', { mode: 'json' }).$type<Record<string, unknown>>().notNull(),
    donorName: text('donor_name').notNull(),
    acceptorName: text('acceptor_name').notNull(),
    bridgeName: text('bridge_name'),
    linkage: text('linkage').notNull(),
    process: text('process').notNull(),
    solvent: text('solvent'),
    technique: text('technique'),
    temperatureK: real('temperature_k').notNull(),
    distanceAngstrom: real('distance_angstrom'),
    /** Canonical rate: s⁻¹ (unimolecular) or M⁻¹ s⁻¹ (bimolecular). */
    rate: real('rate').notNull(),
    rateKind: text('rate_kind', { enum: ['unimolecular', 'bimolecular'] }).notNull(),
    log10Rate: real('log10_rate').notNull(),
    /** Driving force ΔG°, eV. */
    deltaG: real('delta_g'),
    /** The record's row of a bundle's records.csv (see shared/records/csv.ts), kept so bundles need not parse the JSON. */
    csvLine: text('csv_line'),
    /** CSV_FORMAT the line was made with; other formats are recomputed before use. */
    csvFormat: integer('csv_format'),
    isDemo: integer('is_demo', { mode: 'boolean' }).notNull().default(false),
    ...timestamps
  },
  t => [
    index('rate_record_version_idx').on(t.versionId, t.position),
    index('rate_record_process_idx').on(t.process),
    index('rate_record_delta_g_idx').on(t.deltaG)
  ]
)

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

// ── files, reference data, mail ─────────────────────────────────────────────────────────
export const uploadedFiles = sqliteTable(
  'uploaded_file',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    versionId: integer('version_id').references(() => datasetVersions.id, { onDelete: 'set null' }),
    uploadedBy: text('uploaded_by').references(() => users.id),
    name: text('name').notNull(),
    size: integer('size').notNull(),
    sha256: text('sha256').notNull(),
    storageKey: text('storage_key').notNull(),
    mediaType: text('media_type'),
    /** When its rows were added to the draft: an upload is committed once (a retry after a lost answer adds nothing). */
    committedAt: integer('committed_at', { mode: 'timestamp_ms' }),
    ...timestamps
  },
  t => [
    uniqueIndex('uploaded_file_storage_key_unique').on(t.storageKey),
    index('uploaded_file_version_idx').on(t.versionId)
  ]
)

export const solvents = sqliteTable(
  'solvent',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    name: text('name').notNull(),
    /** Static relative permittivity ε_s. */
    permittivity: real('permittivity').notNull(),
    /** Refractive index n_D. */
    refractiveIndex: real('refractive_index').notNull(),
    /** Viscosity, mPa s. */
    viscosity: real('viscosity'),
    /** Temperature the values refer to, K. */
    temperatureK: real('temperature_k').notNull().default(298.15),
    /** Where the numbers come from (say "from memory" where that is the truth). */
    source: text('source').notNull(),
    ...timestamps
  },
  t => [uniqueIndex('solvent_name_unique').on(t.name)]
)

export const mailOutbox = sqliteTable(
  'mail_outbox',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    to: text('to').notNull(),
    subject: text('subject').notNull(),
    text: text('text').notNull(),
    status: text('status', { enum: ['queued', 'sent', 'failed'] })
      .notNull()
      .default('queued'),
    error: text('error'),
    sentAt: integer('sent_at', { mode: 'timestamp_ms' }),
    ...timestamps
  },
  t => [index('mail_outbox_created_idx').on(t.createdAt)]
)

/**
 * Chemical structures computed once per distinct SMILES (as written in records) by RDKit: canonical
 * SMILES, standard InChI and InChIKey, an SVG depiction and the Morgan fingerprint used for
 * similarity. A SMILES RDKit cannot read keeps its error message instead.
 */
export const structures = sqliteTable(
  'structure',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    smiles: text('smiles').notNull(),
    canonicalSmiles: text('canonical_smiles'),
    inchi: text('inchi'),
    inchiKey: text('inchi_key'),
    svg: text('svg'),
    /** Morgan fingerprint (radius 2, 2048 bits) as 512 hex digits, bit 0 first. */
    morganFp: text('morgan_fp'),
    error: text('error'),
    toolkit: text('toolkit').notNull(),
    ...timestamps
  },
  t => [uniqueIndex('structure_smiles_unique').on(t.smiles), index('structure_inchi_key_idx').on(t.inchiKey)]
)

// ── relations ───────────────────────────────────────────────────────────────────────────
export const labRelations = relations(labs, ({ many }) => ({
  memberships: many(labMemberships),
  datasets: many(datasets)
}))
export const membershipRelations = relations(labMemberships, ({ one }) => ({
  lab: one(labs, { fields: [labMemberships.labId], references: [labs.id] }),
  user: one(users, { fields: [labMemberships.userId], references: [users.id] })
}))
export const datasetRelations = relations(datasets, ({ one, many }) => ({
  lab: one(labs, { fields: [datasets.labId], references: [labs.id] }),
  versions: many(datasetVersions)
}))
export const versionRelations = relations(datasetVersions, ({ one, many }) => ({
  dataset: one(datasets, { fields: [datasetVersions.datasetId], references: [datasets.id] }),
  records: many(rateRecords),
  reviews: many(reviews)
}))
export const recordRelations = relations(rateRecords, ({ one }) => ({
  version: one(datasetVersions, { fields: [rateRecords.versionId], references: [datasetVersions.id] })
}))

// ── data migrations ─────────────────────────────────────────────────────────────────────
/** Data changes run once at start after the SQL migrations (e.g. re-deriving values by a corrected rule). */
export const dataMigrations = sqliteTable('data_migration', {
  name: text('name').primaryKey(),
  appliedAt: integer('applied_at', { mode: 'timestamp_ms' }).notNull(),
  /** What it changed, for the audit: counts and ids. */
  detail: text('detail', { mode: 'json' })
    .$type<Record<string, unknown>>()
    .notNull()
    .default(sql`'{}'`)
})
