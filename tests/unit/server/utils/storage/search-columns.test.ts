/**
 * The columns search reads at start (migration 0015): the SQL that fills them for records written before the migration
 * gives exactly what recordColumns writes for new records, over every demo record (names, classes, SMILES, notes, and
 * the solvent polarity 1/n² − 1/ε to the last bit); and a new version's copy of its records keeps every derived column.
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { sql } from 'drizzle-orm'
import { openDatabase, schema, type Db } from '../../../../../server/utils/storage/db'
import { recordColumns } from '../../../../../shared/records/record-columns'
import { DATASETS, demoRecords } from '../../../../../scripts/lib/scenario'

const dir = mkdtempSync(join(tmpdir(), 'crosspoint-columns-'))
let db: Db
let close: () => void
const records = DATASETS.flatMap(ds => demoRecords(ds, 0))
const COLUMNS = ['donor_class', 'acceptor_class', 'donor_smiles', 'acceptor_smiles', 'notes', 'solvent_polarity'] as const

beforeAll(async () => {
  const opened = await openDatabase(`file:${join(dir, 'c.db')}`)
  db = opened.db
  close = () => opened.client.close()
  const [lab] = await db.insert(schema.labs).values({ slug: 'columns', name: 'Columns lab (invented)' }).returning()
  const [ds] = await db.insert(schema.datasets).values({ labId: lab!.id }).returning()
  const [v] = await db.insert(schema.datasetVersions)
    .values({ datasetId: ds!.id, versionNumber: 1, state: 'draft', title: 'Columns' }).returning()
  for (let i = 0; i < records.length; i += 200) {
    await db.insert(schema.rateRecords).values(records.slice(i, i + 200).map((data, j) => ({
      versionId: v!.id, position: i + j + 1, recordKey: `c${i + j}`, data: data as never, ...recordColumns(data)
    })))
  }
})
afterAll(() => {
  close()
  rmSync(dir, { recursive: true, force: true })
})

type Row = Record<(typeof COLUMNS)[number] | 'id', unknown>
const read = async () => db.all<Row>(sql.raw(`select id, ${COLUMNS.join(', ')} from rate_record order by id`))

describe('search columns', () => {
  it('the migration fills old records exactly as recordColumns fills new ones', async () => {
    const written = await read()
    expect(written.length).toBe(records.length)
    // every column is filled somewhere, and the demo has records without SMILES or solvent constants
    for (const c of COLUMNS) expect(written.some(r => r[c] !== null), c).toBe(true)
    for (const c of ['donor_smiles', 'acceptor_smiles', 'solvent_polarity'] as const) expect(written.some(r => r[c] === null), c).toBe(true)
    await db.run(sql.raw(`update rate_record set ${COLUMNS.map(c => `${c} = null`).join(', ')}`))
    const update = readFileSync(join(import.meta.dirname, '../../../../../drizzle/0015_search_columns.sql'), 'utf8')
      .split('--> statement-breakpoint').map(s => s.trim()).find(s => s.startsWith('UPDATE'))!
    await db.run(sql.raw(update))
    expect(await read()).toEqual(written)
  })

  it('a new version copies its records with every derived column', async () => {
    const { copyRecords } = await import('../../../../../server/utils/review/copy-records')
    const [v1] = await db.select().from(schema.datasetVersions)
    const [v2] = await db.insert(schema.datasetVersions)
      .values({ datasetId: v1!.datasetId, versionNumber: 2, state: 'draft', title: 'Columns' }).returning()
    await db.transaction(tx => copyRecords(tx, v1!.id, v2!.id))
    const cols = (await db.all<{ name: string }>(sql`select name from pragma_table_info('rate_record')`)).map(c => c.name)
      .filter(c => !['id', 'version_id', 'created_at', 'updated_at'].includes(c))
    expect(cols).toEqual(expect.arrayContaining([...COLUMNS, 'csv_line', 'csv_format', 'delta_g']))
    const rows = (versionId: number) => db.all<Record<string, unknown>>(
      sql.raw(`select ${cols.join(', ')} from rate_record where version_id = ${versionId} order by position`))
    const copied = await rows(v2!.id)
    expect(copied.length).toBe(records.length)
    expect(copied).toEqual(await rows(v1!.id))
    expect(copied.every(r => r.csv_line !== null)).toBe(true)
  })
})
