/**
 * Identifiers are reserved as drafts and made findable only after the database has committed the
 * publication: a lost race leaves nothing public, and a registrar failure after the commit is finished
 * by the reconciling job. The local fake registrar keeps DataCite's states (draft, findable).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { api, DEMO, signIn, startServer, type TestServer } from '../helpers/server'

let s: TestServer
let curator: string; let admin: string
let registrarUrl = ''
const state = async (doi: string) => {
  // the local registrar starts with the first identifier request; its address is read once it runs
  if (!registrarUrl) registrarUrl = (await api(s.url, '/api/v1/admin/registrar', { headers: { cookie: admin } })).data.local.url
  const r = await fetch(`${registrarUrl}/dois/${encodeURIComponent(doi)}`)
  return r.status === 404 ? null : ((await r.json()) as { data: { attributes: { state: string } } }).data.attributes.state
}

beforeAll(async () => {
  s = await startServer({ seed: true })
  curator = await signIn(s.url, DEMO.curator)
  admin = await signIn(s.url, DEMO.admin)
}, 90_000)
afterAll(async () => { await s?.stop() })

describe('identifiers findable only after the commit', () => {
  it('an accept that loses its race (the submission changed) leaves the identifiers as drafts, not findable', async () => {
    const review = await api(s.url, '/api/v1/review/11', { headers: { cookie: curator } })
    expect(review.status).toBe(200)
    const stale = await api(s.url, '/api/v1/review/11/accept', { method: 'POST', headers: { cookie: curator }, json: { expectedUpdatedAt: review.data.version.updatedAt - 1 } })
    expect(stale.status).toBe(409)
    expect(await state('10.99999/cp.11.v1')).toBe('draft')
    expect((await api(s.url, '/api/v1/datasets/11')).status).toBe(404) // nothing published
    // the real accept then makes the same identifiers findable
    const ok = await api(s.url, '/api/v1/review/11/accept', { method: 'POST', headers: { cookie: curator }, json: { expectedUpdatedAt: review.data.version.updatedAt } })
    expect(ok.status).toBe(200)
    expect(ok.data).toMatchObject({ doi: '10.99999/cp.11.v1', identifiers: 'findable' })
    expect(await state('10.99999/cp.11.v1')).toBe('findable')
    expect(await state('10.99999/cp.11')).toBe('findable')
  })
  it('a registrar failure after the commit: published, identifiers pending, then made findable by the reconciling job', async () => {
    const review = await api(s.url, '/api/v1/review/6', { headers: { cookie: curator } })
    expect((await api(s.url, '/api/v1/admin/registrar/fail', { method: 'POST', headers: { cookie: admin }, json: { count: 1, only: 'publish' } })).status).toBe(200)
    const ok = await api(s.url, '/api/v1/review/6/accept', { method: 'POST', headers: { cookie: curator }, json: { expectedUpdatedAt: review.data.version.updatedAt } })
    expect(ok.status).toBe(200)
    expect(ok.data.identifiers).toBe('pending')
    expect(await state(ok.data.doi)).toBe('draft')
    const r = await api(s.url, '/api/v1/admin/registrar/reconcile', { method: 'POST', headers: { cookie: admin } })
    expect(r.data).toMatchObject({ madeFindable: 1 })
    expect(await state(ok.data.doi)).toBe('findable')
    expect((await api(s.url, '/api/v1/admin/registrar/reconcile', { method: 'POST', headers: { cookie: admin } })).data).toEqual({ checked: 0, madeFindable: 0 })
  })
})
