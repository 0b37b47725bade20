/**
 * The file store's contract, run against both drivers: the local folder and S3-compatible object storage through
 * the AWS SDK (against s3rver, a fake S3 server, on a loopback port). Backups and restores through each.
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { LocalStore, S3Store, startFakeS3, type FileStore } from '../../../../../server/utils/storage/files'
import { backup, restore } from '../../../../../server/utils/storage/backup'
import { openDatabase } from '../../../../../server/utils/storage/db'

const dir = mkdtempSync(join(tmpdir(), 'crosspoint-files-'))
let fake: { endpoint: string, close: () => Promise<void> }
beforeAll(async () => {
  fake = await startFakeS3(join(dir, 's3'))
})
afterAll(async () => {
  await fake?.close()
  rmSync(dir, { recursive: true, force: true })
})
const s3 = (bucket: string, prefix = '') => new S3Store({ endpoint: fake.endpoint, region: 'us-east-1', bucket, accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER', prefix })
const drivers: [string, () => FileStore][] = [
  ['local folder', () => new LocalStore(mkdtempSync(join(dir, 'local-')))],
  ['S3 (fake server)', () => s3(`bucket-${Math.random().toString(36).slice(2, 8)}`)]
]

describe.each(drivers)('%s', (_name, make) => {
  it('stores bytes as given, answers null for a missing key, lists by prefix', async () => {
    const store = make()
    const bytes = new Uint8Array(4096).map((_, i) => (i * 37) % 256)
    await store.put('uploads/1/a.bin', bytes)
    await store.put('uploads/2/b.csv', new TextEncoder().encode('t,y\n0,1\n'), 'text/csv')
    await store.put('other/3/c.txt', new TextEncoder().encode('x'))
    expect(await store.get('uploads/1/a.bin')).toEqual(bytes)
    expect(await store.get('uploads/9/missing.csv')).toBeNull()
    const listed: { key: string, size: number }[] = []
    for await (const f of store.list('uploads/')) listed.push(f)
    expect(listed.sort((a, b) => a.key.localeCompare(b.key))).toEqual([{ key: 'uploads/1/a.bin', size: 4096 }, { key: 'uploads/2/b.csv', size: 8 }])
  })
  it('a backup holds the stored files with their checksums; a restore puts them back into an empty store', async () => {
    const store = make()
    const dbUrl = `file:${mkdtempSync(join(dir, 'db-'))}/c.db`
    const { client } = await openDatabase(dbUrl)
    client.close()
    await store.put('uploads/5/x.csv', new TextEncoder().encode('time,signal\n0,1\n'))
    const b = await backup({ databaseUrl: dbUrl, dataDir: dir, backupDir: join(dir, 'backups'), store })
    const sums = readFileSync(join(b.folder, 'SHA256SUMS'), 'utf8')
    expect(sums).toMatch(/^[0-9a-f]{64} {2}files\/uploads\/5\/x\.csv$/m)
    const empty = make()
    await restore({ folder: b.folder, databaseUrl: `file:${mkdtempSync(join(dir, 'restored-'))}/c.db`, dataDir: dir, store: empty })
    expect(new TextDecoder().decode((await empty.get('uploads/5/x.csv'))!)).toBe('time,signal\n0,1\n')
  })
})

describe('S3 key prefix', () => {
  it('keeps two deployments apart in one bucket', async () => {
    const a = s3('shared', 'site-a/')
    const b = s3('shared', 'site-b/')
    await a.put('uploads/1/a.csv', new Uint8Array([1]))
    expect(await b.get('uploads/1/a.csv')).toBeNull()
    const keys: string[] = []
    for await (const f of a.list('uploads/')) keys.push(f.key)
    expect(keys).toEqual(['uploads/1/a.csv'])
  })
})
