import { sql } from 'drizzle-orm'
import { index, integer, real, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core'
import { timestamps } from './columns'
import type { DatasetMetadataV1, RateRecordV1 } from '../../../shared/records/types'
import { labs, users } from './accounts'

export const VERSION_STATES = ['draft', 'submitted', 'returned', 'published', 'withdrawn'] as const
export type VersionState = (typeof VERSION_STATES)[number]

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
      .$type<Partial<DatasetMetadataV1>>()
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
    // every instance asks "what changed since" every few seconds (search sync)
    index('dataset_version_updated_idx').on(t.updatedAt),
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
    data: text('data', { mode: 'json' }).$type<RateRecordV1>().notNull(),
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
    /**
     * Copies of record fields search reads at start (with the names above): reading them from the JSON cost a parse per
     * record, most of the start-up at a million records. Written by recordColumns with the record, like the rest.
     */
    donorClass: text('donor_class'),
    acceptorClass: text('acceptor_class'),
    donorSmiles: text('donor_smiles'),
    acceptorSmiles: text('acceptor_smiles'),
    notes: text('notes'),
    /** Solvent polarity 1/n² − 1/ε_s when the record gives both (the similarity score's polarity). */
    solventPolarity: real('solvent_polarity'),
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
    index('rate_record_delta_g_idx').on(t.deltaG),
    // bundles ask "is any stored CSV line stale?" before every bundle: an index lookup, not a scan of every record
    index('rate_record_csv_format_idx').on(t.csvFormat)
  ]
)
