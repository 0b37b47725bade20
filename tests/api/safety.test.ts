import { spawn } from 'node:child_process'
import { readFileSync, readdirSync, writeFileSync, openSync, writeSync, closeSync, statSync, mkdtempSync, existsSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import AdmZip from 'adm-zip'
import { api, DEMO, ROOT, SERVER_ENTRY, freePort, signIn, startServer, type TestServer } from '../helpers/server'
import { restore, verifyBackup } from '../../server/utils/storage/backup'
import { createClient } from '@libsql/client'

let s: TestServer
let a = ''; let admin = ''
beforeAll(async () => {
  s = await startServer({ seed: true, env: { NUXT_BACKUP_DIR: join(tmpdir(), `cp-backups-${Date.now()}`) } })
  a = await signIn(s.url, DEMO.contributorA)
  admin = await signIn(s.url, DEMO.admin)
}, 90_000)
afterAll(async () => { await s?.stop() })

async function uploadFile (datasetId: number, name: string, body: string | Buffer) {
  const form = new FormData()
  form.append('file', new Blob([body]), name)
  return (await fetch(`${s.url}/api/v1/datasets/${datasetId}/uploads/check`, { method: 'POST', body: form, headers: { cookie: a } })).json() as Promise<any>
}
async function publishedSnapshot (base: string) {
  const list = (await api(base, '/api/v1/datasets?state=published&pageSize=200')).data.items.map((d: any) => d.id).sort()
  const out: Record<number, unknown> = {}
  for (const id of list) { const d = (await api(base, `/api/v1/datasets/${id}`)).data; out[id] = { doi: d.version.doi, records: d.records.map((r: any) => r.data) } }
  return out
}

describe('crash safety and start-up checks', () => {
  it('a damaged database file is refused at start with a clear message', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'crosspoint-corrupt-'))
    const { seed } = await import('../../scripts/seed')
    const db = join(dir, 'bad.db')
    await seed(`file:${db}`)
    // overwrite a stretch of pages in the middle of the file with garbage
    const fd = openSync(db, 'r+')
    const size = statSync(db).size
    writeSync(fd, Buffer.alloc(64 * 1024, 0x5a), 0, 64 * 1024, Math.floor(size / 2 / 4096) * 4096)
    closeSync(fd)
    const port = await freePort()
    const proc = spawn(process.execPath, [SERVER_ENTRY], { cwd: dir, env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', NUXT_DATABASE_URL: `file:${db}`, AUTH_ORIGIN: `http://127.0.0.1:${port}/api/auth`, NUXT_AUTH_SECRET: 'safety-test-secret' } })
    let out = ''
    proc.stdout.on('data', (d) => { out += d }); proc.stderr.on('data', (d) => { out += d })
    const code = await new Promise<number | null>(r => proc.on('exit', r))
    rmSync(dir, { recursive: true, force: true }) // the damaged copy is not kept in the machine's temp folder
    expect(code).toBe(1)
    expect(out).toMatch(/\[crosspoint\] start-up failed: The database file:.*bad\.db is damaged \(integrity check: .+\)\. Crosspoint will not serve it; restore the newest backup with npm run restore/)
  })
})

describe('backups', () => {
  it('a backup taken while writes go on restores to a working archive with identical published data', async () => {
    const labA = (await api(s.url, '/api/v1/me', { headers: { cookie: a } })).data.user.labIds[0]
    const draft = (await api(s.url, '/api/v1/datasets', { method: 'POST', headers: { cookie: a }, json: { labId: labA, title: 'Busy draft during backup' } })).data.id
    const rec = (await (await fetch(`${s.url}/api/v1/templates/records.json`)).json() as any).records[0]
    let writing = true; let writes = 0
    const writer = (async () => { while (writing) { const r = await api(s.url, `/api/v1/datasets/${draft}/records`, { method: 'POST', headers: { cookie: a }, json: { records: [rec] } }); if (r.status === 201) writes++ } })()
    await new Promise(r => setTimeout(r, 200))
    const b = await api(s.url, '/api/v1/admin/backups', { method: 'POST', headers: { cookie: admin } })
    writing = false; await writer
    expect(b.status).toBe(200)
    expect(writes).toBeGreaterThan(0)
    await verifyBackup(b.data.folder)
    const before = await publishedSnapshot(s.url)
    // restore into a fresh location and serve it
    const dir = mkdtempSync(join(tmpdir(), 'crosspoint-restored-'))
    const url = `file:${join(dir, 'restored.db')}`
    await restore({ folder: b.data.folder, databaseUrl: url, dataDir: join(dir, 'files') })
    const restored = await startServer({ env: { NUXT_DATABASE_URL: url } })
    try {
      expect(await publishedSnapshot(restored.url)).toEqual(before)
      expect((await api(restored.url, '/api/v1/health')).data.status).toBe('ok')
    }
    finally { await restored.stop() }
  }, 120_000)
  it('restore refuses while a server uses the database; counts in backup.json come from the copy', async () => {
    const b = await api(s.url, '/api/v1/admin/backups', { method: 'POST', headers: { cookie: admin } })
    const meta = JSON.parse(readFileSync(join(b.data.folder, 'backup.json'), 'utf8'))
    const copy = createClient({ url: `file:${join(b.data.folder, 'crosspoint.db')}` })
    expect(meta.records).toBe(Number((await copy.execute('select count(*) n from rate_record')).rows[0]!.n))
    copy.close()
    // the live server of this file has marked it
    await expect(restore({ folder: b.data.folder, databaseUrl: s.dbUrl, dataDir: join(s.dir, 'files') })).rejects.toThrow(/a Crosspoint server \(process \d+\) is using .*; stop it, then restore/)
    expect((await api(s.url, '/api/v1/health')).data.status).toBe('ok')
  }, 120_000)
  it('restore keeps every committed row of the replaced database: checkpointed, with its -wal and -shm beside it', async () => {
    const b = await api(s.url, '/api/v1/admin/backups', { method: 'POST', headers: { cookie: admin } })
    const dir = mkdtempSync(join(tmpdir(), 'crosspoint-kept-'))
    const target = join(dir, 'live.db')
    // a database in WAL mode with committed rows still in its -wal (a connection kept open, no checkpoint)
    const live = createClient({ url: `file:${target}` })
    await live.execute('PRAGMA journal_mode = WAL')
    await live.execute('PRAGMA wal_autocheckpoint = 0')
    await live.execute('create table t (x integer)')
    for (let i = 0; i < 50; i++) await live.execute({ sql: 'insert into t values (?)', args: [i] })
    expect(existsSync(`${target}-wal`)).toBe(true)
    const res = await restore({ folder: b.data.folder, databaseUrl: `file:${target}`, dataDir: join(dir, 'files') })
    live.close()
    const kept = createClient({ url: `file:${res.kept}` })
    expect(Number((await kept.execute('select count(*) n from t')).rows[0]!.n)).toBe(50)
    kept.close()
  }, 120_000)
  it('a tampered backup is refused before anything is replaced', async () => {
    const b = await api(s.url, '/api/v1/admin/backups', { method: 'POST', headers: { cookie: admin } })
    writeFileSync(join(b.data.folder, 'backup.json'), '{"tampered": true}')
    const target = join(mkdtempSync(join(tmpdir(), 'crosspoint-target-')), 'x.db')
    await expect(restore({ folder: b.data.folder, databaseUrl: `file:${target}`, dataDir: tmpdir() })).rejects.toThrow('Checksum mismatch for backup.json (content changed); this backup cannot be trusted')
    expect(existsSync(target)).toBe(false)
  }, 60_000)
})

describe('fixity of stored uploads', () => {
  it('reports a stored file whose content changed', async () => {
    const labA = (await api(s.url, '/api/v1/me', { headers: { cookie: a } })).data.user.labIds[0]
    const id = (await api(s.url, '/api/v1/datasets', { method: 'POST', headers: { cookie: a }, json: { labId: labA, title: 'Fixity probe' } })).data.id
    const up = await uploadFile(id, 'good.csv', readFileSync(join(ROOT, 'tests/fixtures/deposit/good.csv')))
    expect((await api(s.url, '/api/v1/admin/fixity', { headers: { cookie: admin } })).data.problems).toEqual([])
    const dir = join(s.dir, 'files', 'uploads')
    const versionDir = readdirSync(dir).map(d => join(dir, d)).find(d => readdirSync(d).length)!
    const file = join(versionDir, readdirSync(versionDir)[0]!)
    writeFileSync(file, readFileSync(file, 'utf8').replace('ZnP', 'ZnQ'))
    const r = await api(s.url, '/api/v1/admin/fixity', { headers: { cookie: admin } })
    expect(r.data.problems).toHaveLength(1)
    expect(r.data.problems[0].problem).toMatch(/^changed: sha256/)
    expect(up.upload.sha256).toMatch(/^[0-9a-f]{64}$/)
  })
})

describe('hostile input', () => {
  it('script tags in user text are rendered inert', async () => {
    const labA = (await api(s.url, '/api/v1/me', { headers: { cookie: a } })).data.user.labIds[0]
    const id = (await api(s.url, '/api/v1/datasets', { method: 'POST', headers: { cookie: a }, json: { labId: labA, title: '<script>alert("x")</script> <img src=x onerror=alert(1)>' } })).data.id
    const html = await (await fetch(`${s.url}/deposit/${id}`, { headers: { cookie: a } })).text()
    expect(html).not.toContain('<script>alert("x")</script>')
    expect(html).not.toContain('<img src=x onerror')
    expect(html).toContain('&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt;')
  })
  it('oversized and deeply nested bodies are refused with 413', async () => {
    const big = await fetch(`${s.url}/api/v1/model/curve`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: '[' + '0,'.repeat(9_000_000) + '0]' })
    expect(big.status).toBe(413)
    const deep = await api(s.url, '/api/v1/model/fit', { method: 'POST', body: '{"a":' + '['.repeat(100) + ']'.repeat(100) + '}', headers: { 'content-type': 'application/json' } })
    expect(deep.status).toBe(413)
    expect(deep.data.message).toBe('JSON nested deeper than 32 levels is refused')
  })
  it('a file name with path traversal is stored under a key of ours, inside the data folder', async () => {
    const labA = (await api(s.url, '/api/v1/me', { headers: { cookie: a } })).data.user.labIds[0]
    const id = (await api(s.url, '/api/v1/datasets', { method: 'POST', headers: { cookie: a }, json: { labId: labA, title: 'Traversal probe' } })).data.id
    const up = await uploadFile(id, '../../../../tmp/evil.csv', readFileSync(join(ROOT, 'tests/fixtures/deposit/good.csv')))
    expect(up.upload.name).toBe('../../../../tmp/evil.csv') // kept as a label only
    expect(existsSync('/tmp/evil.csv')).toBe(false)
  })
  it('spreadsheet formulas in text cells are neutralised in exported CSV', async () => {
    const labA = (await api(s.url, '/api/v1/me', { headers: { cookie: a } })).data.user.labIds[0]
    const id = (await api(s.url, '/api/v1/datasets', { method: 'POST', headers: { cookie: a }, json: { labId: labA, title: 'Formula probe' } })).data.id
    const csv = readFileSync(join(ROOT, 'tests/fixtures/deposit/good.csv'), 'utf8').split('\r\n')
    const body = csv[0] + ',notes\r\n' + csv[1] + ',"=HYPERLINK(""http://x"")"\r\n'
    const up = await uploadFile(id, 'f.csv', body)
    await api(s.url, `/api/v1/datasets/${id}/uploads/${up.upload.id}/commit`, { method: 'POST', headers: { cookie: a }, json: { mode: 'append' } })
    const zip = new AdmZip(Buffer.from(await (await fetch(`${s.url}/api/v1/datasets/${id}/bundle`, { headers: { cookie: a } })).arrayBuffer()))
    const entry = (name: string) => zip.getEntries().find(e => e.entryName.endsWith(`/${name}`))!
    const out = entry('data/records.csv').getData().toString()
    expect(out).toContain('"\'=HYPERLINK(""http://x"")"')
    expect(out).not.toMatch(/,=HYPERLINK/)
    const json = JSON.parse(entry('data/records.json').getData().toString())
    expect(json.records[0].record.notes).toBe('=HYPERLINK("http://x")') // the data itself is kept as given
  })
})
