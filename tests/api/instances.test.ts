/**
 * Two built servers on one database file (libSQL, WAL) and one object store (a fake S3 server): a dataset
 * written and published through one is found by the other's search within 5 s, its uploaded file is read
 * through the other (fixity, bundle), and a session signed in at one works at the other and ends at both
 * when it is signed out at one.
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { api, DEMO, ROOT, signIn, signOutOf, startServer, type TestServer } from '../helpers/server'
import { startFakeS3 } from '../../server/utils/storage/files'

const dir = mkdtempSync(join(tmpdir(), 'crosspoint-two-'))
let fake: { endpoint: string, close: () => Promise<void> }
let a: TestServer
let b: TestServer

beforeAll(async () => {
  fake = await startFakeS3(join(dir, 's3'))
  const shared = {
    NUXT_STORAGE_DRIVER: 's3', NUXT_S3_ENDPOINT: fake.endpoint, NUXT_S3_ACCESS_KEY_ID: 'S3RVER', NUXT_S3_SECRET_ACCESS_KEY: 'S3RVER',
    NUXT_S3_BUCKET: 'two-instances', NUXT_AUTH_SECRET: 'one-secret-for-both-instances'
  }
  a = await startServer({ seed: true, env: shared })
  b = await startServer({ env: { ...shared, NUXT_DATABASE_URL: a.dbUrl } })
}, 120_000)
afterAll(async () => {
  await b?.stop()
  await a?.stop()
  await fake?.close()
  rmSync(dir, { recursive: true, force: true })
})

describe('two instances, one database, one object store', () => {
  it('a dataset published through A is found by B\'s search within 5 s; its file is read through B', async () => {
    const lead = await signIn(a.url, DEMO.contributorA)
    const labA = (await api(a.url, '/api/v1/me', { headers: { cookie: lead } })).data.user.labIds[0]
    const id = (await api(a.url, '/api/v1/datasets', { method: 'POST', headers: { cookie: lead }, json: { labId: labA, title: 'Zebrafinch dyads (two-instance test)' } })).data.id
    const form = new FormData()
    const csv = readFileSync(join(ROOT, 'tests/fixtures/deposit/good.csv'), 'utf8').replace(/ZnP/g, 'Zebrafinchoporphyrin')
    form.append('file', new Blob([csv]), 'zebra.csv')
    const up = await (await fetch(`${a.url}/api/v1/datasets/${id}/uploads/check`, { method: 'POST', body: form, headers: { cookie: lead } })).json() as any
    expect(up.upload?.sha256).toMatch(/^[0-9a-f]{64}$/)
    expect((await api(a.url, `/api/v1/datasets/${id}/uploads/${up.upload.id}/commit`, { method: 'POST', headers: { cookie: lead }, json: { mode: 'append' } })).status).toBe(200)
    await api(a.url, `/api/v1/datasets/${id}`, { method: 'PATCH', headers: { cookie: lead }, json: { creators: [{ name: 'Faulkwood, Imre', nameType: 'Personal', familyName: 'Faulkwood', givenName: 'Imre' }], keywords: ['demo'] } })
    expect((await api(a.url, `/api/v1/datasets/${id}/submit`, { method: 'POST', headers: { cookie: lead } })).status).toBe(200)
    const curator = await signIn(a.url, DEMO.curatorB)
    const view = (await api(a.url, `/api/v1/review/${id}`, { headers: { cookie: curator } })).data
    const accepted = await api(a.url, `/api/v1/review/${id}/accept`, { method: 'POST', headers: { cookie: curator }, json: { expectedUpdatedAt: view.version.updatedAt } })
    expect(accepted.status).toBe(200)
    const published = Date.now()
    let found = 0
    while (Date.now() - published < 5000) {
      found = (await api(b.url, '/api/v1/records?q=zebrafinchoporphyrin')).data.total
      if (found) break
      await new Promise(r => setTimeout(r, 200))
    }
    expect(found, 'B finds the records A published').toBeGreaterThan(0)
    // the uploaded file lives in the object store: B's fixity check reads and verifies it
    const admin = await signIn(b.url, DEMO.admin)
    const fixity = (await api(b.url, '/api/v1/admin/fixity', { headers: { cookie: admin } })).data
    expect(fixity.store).toMatch(/^S3 bucket two-instances/)
    expect(fixity.problems).toEqual([])
    expect(fixity.files).toBeGreaterThan(0)
    const bundle = await fetch(`${b.url}/api/v1/datasets/${id}/bundle`)
    expect(bundle.status).toBe(200)
    expect(Number(bundle.headers.get('x-crosspoint-records'))).toBe(found)
    await bundle.arrayBuffer()
  })
  it('a session signed in at A works at B, and signing out at A ends it at B too', async () => {
    const cookie = await signIn(a.url, DEMO.contributorB)
    expect((await api(b.url, '/api/v1/me', { headers: { cookie } })).data.user.email).toBe(DEMO.contributorB)
    await signOutOf(a.url, cookie)
    expect((await api(b.url, '/api/v1/me', { headers: { cookie } })).data.user).toBeNull()
  })
})

describe('object storage without an endpoint', () => {
  it('starts its own fake S3 under the data folder, as the demo does, and keeps uploads there', async () => {
    const c = await startServer({ seed: true, env: { NUXT_STORAGE_DRIVER: 's3' } })
    try {
      const lead = await signIn(c.url, DEMO.contributorA)
      const drafts = (await api(c.url, '/api/v1/datasets?state=draft', { headers: { cookie: lead } })).data.items
      const form = new FormData()
      form.append('file', new Blob([readFileSync(join(ROOT, 'tests/fixtures/deposit/good.csv'))]), 'good.csv')
      const up = await (await fetch(`${c.url}/api/v1/datasets/${drafts[0].id}/uploads/check`, { method: 'POST', body: form, headers: { cookie: lead } })).json() as any
      expect(up.upload?.id).toBeGreaterThan(0)
      const admin = await signIn(c.url, DEMO.admin)
      const fixity = (await api(c.url, '/api/v1/admin/fixity', { headers: { cookie: admin } })).data
      expect(fixity.store).toMatch(/^S3 bucket crosspoint at http:\/\/127\.0\.0\.1:\d+$/)
      expect(fixity.problems).toEqual([])
    }
    finally {
      await c.stop()
    }
  })
})
