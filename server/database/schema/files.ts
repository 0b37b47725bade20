import { sql } from 'drizzle-orm'
import { index, integer, real, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core'
import { timestamps } from './columns'
import { users } from './accounts'
import { datasets, datasetVersions } from './archive'

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
    /** How a spreadsheet was read (the mapping confirmed at upload), kept as provenance beside the original. */
    mapping: text('mapping', { mode: 'json' }).$type<Record<string, unknown>>(),
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

/** Other names of species that curators declare the same (system identity); both sides stored normalised. */
export const speciesSynonyms = sqliteTable(
  'species_synonym',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    alias: text('alias').notNull(),
    canonical: text('canonical').notNull(),
    createdBy: text('created_by').references(() => users.id),
    ...timestamps
  },
  t => [uniqueIndex('species_synonym_alias_unique').on(t.alias)]
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

/**
 * A time-resolved decay trace attached to a dataset (a record's rate may be fitted from it). The file as
 * uploaded is an uploaded_file (sha256, fixity, backups); the parsed points are kept here for fitting.
 */
export const traces = sqliteTable(
  'trace',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    datasetId: integer('dataset_id')
      .notNull()
      .references(() => datasets.id, { onDelete: 'cascade' }),
    fileId: integer('file_id')
      .notNull()
      .references(() => uploadedFiles.id),
    sha256: text('sha256').notNull(),
    name: text('name').notNull(),
    timeUnit: text('time_unit', { enum: ['fs', 'ps', 'ns', 'us', 'ms', 's'] }).notNull(),
    signalKind: text('signal_kind', { enum: ['transient-absorption', 'emission', 'other'] }).notNull(),
    wavelengthNm: real('wavelength_nm'),
    pointCount: integer('point_count').notNull(),
    hasSigma: integer('has_sigma', { mode: 'boolean' }).notNull(),
    /** { times, signal, sigma? } as numbers, in the trace's time unit. */
    points: text('points', { mode: 'json' }).notNull().$type<{ times: number[], signal: number[], sigma?: number[] }>(),
    uploadedBy: text('uploaded_by').references(() => users.id),
    ...timestamps
  },
  t => [uniqueIndex('trace_dataset_sha_unique').on(t.datasetId, t.sha256)]
)

/** A lab's saved ways of reading its own spreadsheets (shared/records/mapping.ts), found again by the header row. */
export const columnMappings = sqliteTable(
  'column_mapping',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    labId: integer('lab_id').notNull(),
    name: text('name').notNull(),
    /** The header row it was made for (headerSignature). */
    signature: text('signature').notNull(),
    mapping: text('mapping', { mode: 'json' }).notNull().$type<Record<string, unknown>>(),
    createdBy: text('created_by').references(() => users.id),
    ...timestamps
  },
  t => [uniqueIndex('column_mapping_lab_name_unique').on(t.labId, t.name), index('column_mapping_signature_idx').on(t.labId, t.signature)]
)

/** Spreadsheet header words curators declare to mean a field of the open format (the mapping step proposes them). */
export const headerSynonyms = sqliteTable(
  'header_synonym',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    /** Normalised as the mapping step compares headers (shared/records/mapping.ts normaliseHeader). */
    alias: text('alias').notNull(),
    field: text('field').notNull(),
    createdBy: text('created_by').references(() => users.id),
    ...timestamps
  },
  t => [uniqueIndex('header_synonym_alias_unique').on(t.alias)]
)
