/**
 * Crash safety: the server is killed (SIGKILL) at random moments during upload commits and
 * publications, 20 times; after each restart the database is intact, no draft holds half an
 * upload, and every published record is unchanged.
 */
import { spawn, type ChildProcess } from 'node:child_process'
import { mkdtempSync, readFileSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { createClient } from '@libsql/client'
import { api, DEMO, ROOT, SERVER_ENTRY, freePort, signIn } from '../helpers/server'

const dir = mkdtempSync(join(tmpdir(), 'crosspoint-crash-'))
const dbUrl = `file:${join(dir, 'crash.db')}`
let proc: ChildProcess | undefined
let base = ''

async function start () {
  const port = await freePort()
  base = `http://127.0.0.1:${port}`
  proc = spawn(process.execPath, [SERVER_ENTRY], { cwd: dir, stdio: 'ignore', env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', NUXT_DATABASE_URL: dbUrl, NUXT_DATA_DIR: join(dir, 'files'), AUTH_ORIGIN: `${base}/api/auth`, NUXT_PUBLIC_BASE_URL: base, NUXT_AUTH_SECRET: 'crash-test' } })
  for (let i = 0; i < 300; i++) {
    try { if ((await fetch(`${base}/api/v1/health`)).ok) return }
    catch { /* starting */ } await new Promise(r => setTimeout(r, 100))
  }
  throw new Error('server did not start')
}
function kill () { proc?.kill('SIGKILL'); return new Promise(r => proc!.once('exit', r)) }

async function publishedState () {
  const c = createClient({ url: dbUrl })
  const rows = (await c.execute('select r.id, r.data, v.doi from rate_record r join dataset_version v on v.id = r.version_id where v.state = \'published\' order by r.id')).rows
  c.close()
  return rows.map(r => `${r.id}|${r.doi}|${r.data}`)
}

beforeAll(async () => {
  const { seed } = await import('../../scripts/seed')
  await seed(dbUrl)
  await start()
}, 90_000)
afterAll(async () => { if (proc && proc.exitCode === null) await kill(); rmSync(dir, { recursive: true, force: true }) })

describe('SIGKILL during commits and publications', () => {
  it('20 kills leave an intact database, whole uploads only, and unchanged published records', async () => {
    const good = readFileSync(join(ROOT, 'tests/fixtures/deposit/good.csv'), 'utf8').split('\r\n')
    const bigCsv = good[0] + '\r\n' + (good[1] + '\r\n').repeat(3000)
    const published = await publishedState()
    let seed = 7
    const rand = () => { seed = (seed * 16807) % 2147483647; return seed / 2147483647 }
    for (let round = 0; round < 20; round++) {
      const b = await signIn(base, DEMO.contributorB)
      const labB = (await api(base, '/api/v1/me', { headers: { cookie: b } })).data.user.labIds[0]
      const id = (await api(base, '/api/v1/datasets', { method: 'POST', headers: { cookie: b }, json: { labId: labB, title: `Crash round ${round}` } })).data.id
      const form = new FormData()
      form.append('file', new Blob([bigCsv]), 'big.csv')
      const up = await (await fetch(`${base}/api/v1/datasets/${id}/uploads/check`, { method: 'POST', body: form, headers: { cookie: b } })).json() as any
      let action: Promise<unknown>
      if (round % 2 === 0) {
        action = api(base, `/api/v1/datasets/${id}/uploads/${up.upload.id}/commit`, { method: 'POST', headers: { cookie: b }, json: { mode: 'append' } }).catch(() => null)
      }
      else {
        await api(base, `/api/v1/datasets/${id}/uploads/${up.upload.id}/commit`, { method: 'POST', headers: { cookie: b }, json: { mode: 'append' } })
        await api(base, `/api/v1/datasets/${id}/submit`, { method: 'POST', headers: { cookie: b } })
        const cur = await signIn(base, DEMO.curator)
        const v = (await api(base, `/api/v1/review/${id}`, { headers: { cookie: cur } })).data
        action = api(base, `/api/v1/review/${id}/accept`, { method: 'POST', headers: { cookie: cur }, json: { expectedUpdatedAt: v.version.updatedAt } }).catch(() => null)
      }
      await new Promise(r => setTimeout(r, 5 + rand() * 150))
      await kill()
      await action
      await start() // runs the integrity check; a damaged file would stop it here
      const c = createClient({ url: dbUrl })
      const [{ n, rc, state, doi }] = (await c.execute({ sql: 'select (select count(*) from rate_record r where r.version_id = v.id) n, v.record_count rc, v.state, v.doi from dataset_version v where v.dataset_id = ?', args: [id] })).rows as any
      c.close()
      expect([0, 3000], `round ${round}`).toContain(Number(n))
      expect(Number(rc), `round ${round}: recorded count matches the rows`).toBe(Number(n))
      if (state === 'published') { expect(doi).toMatch(/^10\.\d+\//); expect(Number(n)).toBe(3000); published.push(...(await publishedState()).filter(x => x.includes(`|${doi}|`))) }
      else expect(doi).toBeNull()
      const now = await publishedState()
      expect(now.filter(x => published.includes(x)).length, `round ${round}: published records unchanged`).toBe(published.length)
      expect(now.length).toBe(new Set(published).size)
    }
  }, 300_000)
})
