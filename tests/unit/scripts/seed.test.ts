import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, describe, expect, it } from 'vitest'
import { createClient } from '@libsql/client'
import { seed } from '../../../scripts/seed'
import { DATASETS } from '../../../scripts/lib/scenario'

const dir = mkdtempSync(join(tmpdir(), 'crosspoint-seed-'))
afterAll(() => rmSync(dir, { recursive: true, force: true }))

describe('demo seed', () => {
  it('loads the scenario and is idempotent: a second run leaves the same counts', async () => {
    const url = `file:${join(dir, 'seed.db')}`
    const first = await seed(url)
    const second = await seed(url)
    expect(second).toEqual(first)
    expect(first.lab).toBe(3)
    expect(first.dataset).toBe(DATASETS.length)
    expect(first.rate_record).toBeGreaterThan(2000)
    const c = createClient({ url })
    const states = (await c.execute('select state, count(*) n from dataset_version group by state')).rows.map(r => r.state)
    expect(new Set(states)).toEqual(new Set(['draft', 'submitted', 'returned', 'published', 'withdrawn']))
    const nonDemo = (await c.execute('select count(*) n from rate_record where is_demo = 0')).rows[0]!.n
    expect(nonDemo).toBe(0)
    const fk = (await c.execute('pragma foreign_key_check')).rows
    expect(fk).toEqual([])
    const journal = (await c.execute('pragma journal_mode')).rows[0]!.journal_mode
    expect(journal).toBe('wal')
    c.close()
  })
  it('gives a clear error for a database path that cannot be created', async () => {
    // A regular file where a folder should be: no folder can be made below it (tests run as root, so modes would not stop them).
    writeFileSync(join(dir, 'not-a-folder'), 'x')
    const bad = join(dir, 'not-a-folder', 'x.db')
    await expect(seed(`file:${bad}`)).rejects.toThrow(`Crosspoint cannot use the database file ${bad} (EEXIST): make its folder exist and be writable, or set NUXT_DATABASE_URL`)
  })
})
