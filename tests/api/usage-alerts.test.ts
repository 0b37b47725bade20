/**
 * Usage counted over real HTTP (COUNTER Code of Practice for Research Data: investigations, requests, double
 * clicks, robots, machine access), and saved-search digests: save a search, publish a matching and a
 * non-matching dataset, run the job (`npm run alerts` and the admin route), find exactly one digest listing
 * exactly the matching records; unsubscribing from the mail's link (no sign-in) stops the next one.
 */
import { execFile } from 'node:child_process'
import { promisify } from 'node:util'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { api, DEMO, ROOT, signIn, startServer, type TestServer } from '../helpers/server'

const run = promisify(execFile)
let s: TestServer
const c: Record<string, string> = {}
const FIREFOX = 'Mozilla/5.0 (X11; Linux x86_64; rv:128.0) Gecko/20100101 Firefox/128.0'
const GOOGLEBOT = 'Mozilla/5.0 (compatible; Googlebot/2.1; +http://www.google.com/bot.html)'
let template: Record<string, any>

beforeAll(async () => {
  s = await startServer({ seed: true })
  c.admin = await signIn(s.url, DEMO.admin)
  c.a = await signIn(s.url, DEMO.contributorA)
  c.b = await signIn(s.url, DEMO.contributorB)
  c.curatorB = await signIn(s.url, DEMO.curatorB)
  const first = (await api(s.url, '/api/v1/records?pageSize=1')).data.items[0].id
  template = (await api(s.url, `/api/v1/records/${first}`)).data.data
}, 90_000)
afterAll(async () => { await s?.stop() })

const usage = async (id: number) => (await api(s.url, `/api/v1/datasets/${id}/usage`)).data

/** A dataset of lab A with `n` records whose donor is `donor`, submitted and accepted by a curator of lab B. */
async function publish (title: string, donor: string, n: number): Promise<{ id: number, recordIds: number[] }> {
  const labA = (await api(s.url, '/api/v1/me', { headers: { cookie: c.a } })).data.user.labIds[0]
  const id = (await api(s.url, '/api/v1/datasets', { method: 'POST', headers: { cookie: c.a }, json: { labId: labA, title } })).data.id
  const records = Array.from({ length: n }, (_, i) => {
    const r = structuredClone(template)
    r.system.donor = { name: donor }
    r.temperatureK = 280 + i
    delete r.id
    return r
  })
  const added = await api(s.url, `/api/v1/datasets/${id}/records`, { method: 'POST', headers: { cookie: c.a }, json: { records } })
  expect(added.status, JSON.stringify(added.data).slice(0, 400)).toBe(201)
  await api(s.url, `/api/v1/datasets/${id}`, { method: 'PATCH', headers: { cookie: c.a }, json: { creators: [{ name: 'Faulkwood, Imre', nameType: 'Personal', familyName: 'Faulkwood', givenName: 'Imre' }], keywords: ['demo'] } })
  expect((await api(s.url, `/api/v1/datasets/${id}/submit`, { method: 'POST', headers: { cookie: c.a } })).status).toBe(200)
  const view = (await api(s.url, `/api/v1/review/${id}`, { headers: { cookie: c.curatorB } })).data
  const ok = await api(s.url, `/api/v1/review/${id}/accept`, { method: 'POST', headers: { cookie: c.curatorB }, json: { expectedUpdatedAt: view.version.updatedAt } })
  expect(ok.status, JSON.stringify(ok.data)).toBe(200)
  const ds = (await api(s.url, `/api/v1/datasets/${id}`, { headers: { cookie: c.a } })).data
  return { id, recordIds: ds.records.map((r: { id: number }) => r.id) }
}

describe('usage over HTTP', () => {
  it('a browser\'s double click counts once, a robot not at all, a token as machine access; a download is a request', async () => {
    const id = 2
    const before = await usage(id)
    const get = (ua: string, extra: Record<string, string> = {}) => api(s.url, `/api/v1/datasets/${id}`, { headers: { 'user-agent': ua, ...extra } })
    await get(FIREFOX)
    await get(FIREFOX) // within 30 s: the same click
    await get(GOOGLEBOT)
    await get(GOOGLEBOT)
    const token = (await api(s.url, '/api/v1/account/tokens', { method: 'POST', headers: { cookie: c.b }, json: { name: 'usage' } })).data.token
    await get('python-requests/2.31', { authorization: `Bearer ${token}` })
    const bundle = await fetch(`${s.url}/api/v1/datasets/${id}/bundle`, { headers: { 'user-agent': FIREFOX } })
    expect(bundle.status).toBe(200)
    await bundle.arrayBuffer()
    const after = await usage(id)
    // investigations: the visitor's landing (1, double click dropped) + the token's landing (1) + the bundle (1)
    expect(after.investigations.total - before.investigations.total).toBe(3)
    // unique: the visitor (one address + agent + hour) and the token
    expect(after.investigations.unique - before.investigations.unique).toBe(2)
    expect(after.requests.total - before.requests.total).toBe(1)
    expect(after.machine.investigations.total - before.machine.investigations.total).toBe(1)
    expect(after.machine.requests.total - before.machine.requests.total).toBe(0)
    const month = new Date().toISOString().slice(0, 7)
    expect(after.months.at(-1).month).toBe(month)
    expect(after.months).toHaveLength(12)
  })
  it('the admins\' COUNTER Dataset Report carries the same counts', async () => {
    const month = new Date().toISOString().slice(0, 7)
    const r = await api(s.url, `/api/v1/reports/datasets?begin=${month}&end=${month}`, { headers: { cookie: c.admin } })
    expect(r.status).toBe(200)
    const d = r.data['report-datasets'].find((x: any) => x.uri.endsWith('/datasets/2'))
    const inst = d.performance[0].instance
    // this month's regular investigations: the month's total less its machine part (from the per-month rows)
    const rows = (await api(s.url, `/api/v1/datasets/2/usage?from=${month}&until=${month}`)).data
    const regular = inst.find((i: any) => i['access-method'] === 'regular' && i['metric-type'] === 'total-dataset-investigations').count
    const machine = inst.find((i: any) => i['access-method'] === 'machine' && i['metric-type'] === 'total-dataset-investigations')?.count ?? 0
    expect(regular + machine).toBe(rows.investigations.total)
    expect(machine).toBe(rows.machine.investigations.total)
    expect(d.performance).toHaveLength(1)
  })
  it('bad periods are named', async () => {
    const r = await api(s.url, '/api/v1/datasets/2/usage?from=2026-13')
    expect(r.status).toBe(422)
    expect(JSON.stringify(r.data.data.issues)).toMatch(/from/)
    const rev = await api(s.url, '/api/v1/datasets/2/usage?from=2026-05&until=2026-01')
    expect(rev.status).toBe(422)
    expect(rev.data.message).toMatch(/from \(2026-05\) is after until \(2026-01\)/)
    expect((await api(s.url, '/api/v1/datasets/2/usage?from=1990-01&until=2026-01')).status).toBe(422)
    expect((await api(s.url, '/api/v1/reports/datasets?begin=2026-01', { headers: { cookie: c.admin } })).status).toBe(422)
  })
})

describe('saved searches and digests', () => {
  let saved: { id: number }
  it('saves a search, refuses a bad one by field and a second of the same name', async () => {
    const bad = await api(s.url, '/api/v1/account/saved-searches', { method: 'POST', headers: { cookie: c.b }, json: { name: 'x', query: { colour: 'blue' } } })
    expect(bad.status).toBe(422)
    expect(JSON.stringify(bad.data.data.issues)).toMatch(/query/)
    const r = await api(s.url, '/api/v1/account/saved-searches', { method: 'POST', headers: { cookie: c.b }, json: { name: 'Quillon dyads', query: { q: 'quillonium' } } })
    expect(r.status).toBe(201)
    saved = r.data
    const again = await api(s.url, '/api/v1/account/saved-searches', { method: 'POST', headers: { cookie: c.b }, json: { name: 'Quillon dyads', query: {} } })
    expect(again.status).toBe(409)
    const list = (await api(s.url, '/api/v1/account/saved-searches', { headers: { cookie: c.b } })).data.items
    expect(list.map((x: any) => x.name)).toEqual(['Quillon dyads'])
  })

  let digestText = ''
  let matching: number[] = []
  it('npm run alerts mails one digest listing exactly the newly published matching records', async () => {
    const yes = await publish('Quillonium dyads (alert test)', 'Quillonium', 3)
    await publish('Brassidane dyads (alert test)', 'Brassidane', 2)
    matching = yes.recordIds
    const { stdout } = await run(process.execPath, [`${ROOT}/node_modules/tsx/dist/cli.mjs`, 'scripts/alerts.ts'], {
      cwd: ROOT, env: { ...process.env, NUXT_DATABASE_URL: s.dbUrl, NUXT_PUBLIC_BASE_URL: s.url, NUXT_AUTH_SECRET: s.env.NUXT_AUTH_SECRET }
    })
    expect(stdout).toMatch(/digests mailed: 1 \(3 records\)/)
    const mails = (await api(s.url, '/api/v1/admin/outbox', { headers: { cookie: c.admin } })).data.items
      .filter((m: any) => m.to === DEMO.contributorB && m.subject.includes('Quillon dyads'))
    expect(mails).toHaveLength(1)
    expect(mails[0].subject).toBe('Crosspoint: 3 new records for "Quillon dyads"')
    digestText = mails[0].text
    const listed = [...digestText.matchAll(/\/records\/(\d+)/g)].map(m => Number(m[1]))
    expect(listed.sort()).toEqual([...matching].sort())
    expect(digestText).not.toMatch(/Brassidane/)
    // a second run finds nothing new
    const again = await api(s.url, '/api/v1/admin/alerts', { method: 'POST', headers: { cookie: c.admin } })
    expect(again.data.digests).toBe(0)
  })
  it('the unsubscribe link works without signing in; the next matching publication mails nothing', async () => {
    const link = digestText.match(/\/unsubscribe\?token=(\S+)/)!
    const token = decodeURIComponent(link[1]!)
    // a token changed by one character is refused by name
    const forged = token.slice(0, -1) + (token.endsWith('A') ? 'B' : 'A')
    const bad = await api(s.url, '/api/v1/account/saved-searches/unsubscribe', { method: 'POST', json: { token: forged } })
    expect(bad.status).toBe(422)
    expect(bad.data.data.issues[0].path).toBe('/token')
    const ok = await api(s.url, '/api/v1/account/saved-searches/unsubscribe', { method: 'POST', json: { token } })
    expect(ok.status).toBe(200)
    expect(ok.data).toEqual({ id: saved.id, name: 'Quillon dyads', alerts: false })
    await publish('More Quillonium dyads (alert test)', 'Quillonium', 1)
    const r = await api(s.url, '/api/v1/admin/alerts', { method: 'POST', headers: { cookie: c.admin } })
    expect(r.data.digests).toBe(0)
    const mails = (await api(s.url, '/api/v1/admin/outbox', { headers: { cookie: c.admin } })).data.items
      .filter((m: any) => m.subject.includes('Quillon dyads'))
    expect(mails).toHaveLength(1)
  })
  it('RFC 8058 one-click: a form POST to the List-Unsubscribe URL turns the mails off', async () => {
    const r = await api(s.url, '/api/v1/account/saved-searches', { method: 'POST', headers: { cookie: c.a }, json: { name: 'Everything new', query: {} } })
    expect((await api(s.url, '/api/v1/admin/alerts', { method: 'POST', headers: { cookie: c.admin } })).status).toBe(200)
    await publish('Quillonium once more (alert test)', 'Quillonium', 1)
    expect((await api(s.url, '/api/v1/admin/alerts', { method: 'POST', headers: { cookie: c.admin } })).data.digests).toBe(1)
    const mail = (await api(s.url, '/api/v1/admin/outbox', { headers: { cookie: c.admin } })).data.items.find((m: any) => m.subject.includes('Everything new'))
    const token = decodeURIComponent(mail.text.match(/\/unsubscribe\?token=(\S+)/)[1])
    const res = await fetch(`${s.url}/api/v1/account/saved-searches/unsubscribe?token=${encodeURIComponent(token)}`, {
      method: 'POST', headers: { 'content-type': 'application/x-www-form-urlencoded' }, body: 'List-Unsubscribe=One-Click'
    })
    expect(res.status).toBe(200)
    const list = (await api(s.url, '/api/v1/account/saved-searches', { headers: { cookie: c.a } })).data.items
    expect(list.find((x: any) => x.id === r.data.id).alerts).toBe(false)
  })
})
