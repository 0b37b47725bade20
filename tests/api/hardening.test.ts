/**
 * One test per hole found by trying the archive as an attacker would (each failed on the code before
 * the fix): control characters in one-line metadata, route parameters used before they were checked,
 * repeated upload commits, record lists cut without a word, hexadecimal numbers, audit trails of unseen
 * datasets, who edits the solvent table, published datasets vanishing from the public list, validation
 * before sign-in, and static files without nosniff.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { createClient, type Client } from '@libsql/client'
import { api, DEMO, signIn, startServer, type TestServer } from '../helpers/server'

let s: TestServer
let db: Client
let a: string; let curator: string; let admin: string
let draftId: number
const ids = { draftA: 3, publishedWithSubmittedNext: 6, returnedB: 7 }

async function upload (datasetId: number, name: string, body: string, cookie = a) {
  const form = new FormData()
  form.append('file', new Blob([body]), name)
  const res = await fetch(`${s.url}/api/v1/datasets/${datasetId}/uploads/check`, { method: 'POST', body: form, headers: { cookie } })
  return { status: res.status, data: await res.json() as any }
}
const HEADER = 'donor_name,acceptor_name,linkage,process,initial_state,solvent,temperature (K),rate (s-1),delta_g (eV),technique'
const ROW = 'ZnP,C60,covalent,charge-separation,singlet,benzonitrile,298.15,1.2e9,-0.74,transient-absorption'

beforeAll(async () => {
  s = await startServer({ seed: true })
  db = createClient({ url: s.dbUrl })
  a = await signIn(s.url, DEMO.contributorA)
  curator = await signIn(s.url, DEMO.curator)
  admin = await signIn(s.url, DEMO.admin)
  const me = (await api(s.url, '/api/v1/me', { headers: { cookie: a } })).data.user
  draftId = (await api(s.url, '/api/v1/datasets', { method: 'POST', headers: { cookie: a }, json: { labId: me.labIds[0], title: 'Hardening' } })).data.id
}, 90_000)
afterAll(async () => { db?.close(); await s?.stop() })

describe('control characters in one-line metadata', () => {
  it('a CR/LF in a title or keyword is refused, naming the field; a multi-line description is fine', async () => {
    const r = await api(s.url, `/api/v1/datasets/${draftId}`, { method: 'PATCH', headers: { cookie: a }, json: { title: 'Fine\r\nER  - \r\nTY  - DATA', keywords: ['ok', 'bad\nPayload-Oxum: 1.1'] } })
    expect(r.status).toBe(422)
    expect(r.data.data.issues.map((i: { path: string }) => i.path)).toEqual(['/title', '/keywords/1'])
    expect((await api(s.url, `/api/v1/datasets/${draftId}`, { method: 'PATCH', headers: { cookie: a }, json: { description: 'Line one.\nLine two.' } })).status).toBe(200)
    const c = await api(s.url, '/api/v1/datasets', { method: 'POST', headers: { cookie: a }, json: { labId: 1, title: 'x\u0000y' } })
    expect(c.status).toBe(422)
  })
  it('values stored before the check still give one RIS record and one Payload-Oxum line', async () => {
    const v = (await db.execute(`select id, metadata from dataset_version where dataset_id = 2 and state = 'published' order by version_number desc limit 1`)).rows[0]!
    const meta = JSON.parse(String(v.metadata))
    meta.keywords = ['kinetics\r\nER  - \r\nTY  - JOUR\r\nTI  - Forged']
    await db.execute({ sql: 'update dataset_version set metadata = ?, title = ? where id = ?', args: [JSON.stringify(meta), 'Title\nPayload-Oxum: 1.1', v.id] })
    const ris = (await api(s.url, '/api/v1/datasets/2/citation?format=ris')).data as string
    expect(ris.match(/^TY {2}- /gm)).toHaveLength(1)
    expect(ris.match(/^ER {2}- /gm)).toHaveLength(1)
    const zip = Buffer.from(await (await fetch(`${s.url}/api/v1/datasets/2/bundle`)).arrayBuffer())
    const AdmZip = (await import('adm-zip')).default
    const entry = new AdmZip(zip).getEntries().find(e => e.entryName.endsWith('bag-info.txt'))!
    expect(entry.getData().toString('utf8').match(/^Payload-Oxum:/gm)).toHaveLength(1)
  })
})

describe('route parameters checked before use', () => {
  it.each([
    ['/api/v1/templates/records.csv%00.json', 404], ['/api/v1/templates/__proto__', 404], ['/api/v1/templates/records.csv', 200],
    ['/schemas/__proto__', 404], ['/schemas/constructor', 404], ['/schemas/toString', 404], ['/schemas/dataset.v1.json', 200]
  ])('%s → %i', async (path, status) => {
    expect((await fetch(s.url + path)).status).toBe(status)
  })
})

describe('deposits', () => {
  it('an upload is committed once: a retry after a lost answer adds nothing (409)', async () => {
    const r = await upload(draftId, 'once.csv', `${HEADER}\r\n${ROW}\r\n${ROW}\r\n`)
    expect(r.status).toBe(200)
    const commit = () => api(s.url, `/api/v1/datasets/${draftId}/uploads/${r.data.upload.id}/commit`, { method: 'POST', headers: { cookie: a }, json: { mode: 'append' } })
    const [first, second] = await Promise.all([commit(), commit()])
    expect([first.status, second.status].sort()).toEqual([200, 409])
    expect((await commit()).status).toBe(409)
    const n = (await db.execute({ sql: `select count(*) n from rate_record r join dataset_version v on v.id = r.version_id where v.dataset_id = ?`, args: [draftId] })).rows[0]!.n
    expect(Number(n)).toBe(2)
  })
  it('a rate written "0x10" is not sixteen per second: the cell is named as not a number', async () => {
    const r = await upload(draftId, 'hex.csv', `${HEADER}\r\n${ROW.replace('1.2e9', '0x10')}\r\n`)
    expect(r.status).toBe(200)
    expect(r.data.issues[0]).toMatchObject({ row: 2, column: 'rate', message: '"0x10" is not a finite number' })
  })
  it('record lists come in pages with their total, never silently cut', async () => {
    const r = await api(s.url, '/api/v1/datasets/2?records=summary&pageSize=100&page=2')
    expect(r.status).toBe(200)
    expect(r.data.recordPage).toEqual({ page: 2, pageSize: 100, total: r.data.version.recordCount })
    expect(r.data.records).toHaveLength(100)
    expect(r.data.records[0].position).toBe(101)
    expect((await api(s.url, '/api/v1/datasets/2?pageSize=100000')).status).toBe(422)
  })
})

describe('who sees and edits what', () => {
  it('a curator cannot read the audit trail of another lab\'s unsubmitted dataset (it is 404 like the dataset)', async () => {
    expect((await api(s.url, `/api/v1/datasets/${ids.returnedB}`, { headers: { cookie: curator } })).status).toBe(404)
    expect((await api(s.url, `/api/v1/datasets/${ids.returnedB}/audit`, { headers: { cookie: curator } })).status).toBe(404)
    expect((await api(s.url, `/api/v1/datasets/${ids.returnedB}/audit`, { headers: { cookie: admin } })).status).toBe(200)
  })
  it('the solvent table is the admins\' (README permission table): a curator is refused', async () => {
    expect((await api(s.url, '/api/v1/solvents/1', { method: 'PATCH', headers: { cookie: curator }, json: { source: 'x' } })).status).toBe(403)
    expect((await api(s.url, '/api/v1/solvents/1', { method: 'PATCH', headers: { cookie: admin }, json: { source: 'handbook value, from memory' } })).status).toBe(200)
  })
  it('a published dataset stays in the public list while its next version is in review', async () => {
    const list = (await api(s.url, '/api/v1/datasets?pageSize=100')).data
    const d = list.items.find((x: { id: number }) => x.id === ids.publishedWithSubmittedNext)
    expect(d).toMatchObject({ state: 'published', versionNumber: 1 })
    const forCurator = (await api(s.url, '/api/v1/datasets?pageSize=100', { headers: { cookie: curator } })).data
    expect(forCurator.items.find((x: { id: number }) => x.id === ids.publishedWithSubmittedNext)).toMatchObject({ state: 'submitted', versionNumber: 2 })
  })
  it.each([
    ['PATCH', () => `/api/v1/datasets/${ids.draftA}`], ['POST', () => `/api/v1/datasets/${ids.draftA}/records`], ['POST', () => '/api/v1/account/tokens'],
    ['POST', () => '/api/v1/labs'], ['POST', () => `/api/v1/review/${ids.draftA}/accept`], ['PATCH', () => '/api/v1/solvents/1']
  ])('a visitor\'s %s %s with a malformed body is 401, not 422', async (method, path) => {
    expect((await api(s.url, path(), { method, json: { nonsense: true } })).status).toBe(401)
  })
})

describe('headers on static files', () => {
  it('built assets and public files carry nosniff', async () => {
    const home = await (await fetch(`${s.url}/`)).text()
    const asset = home.match(/\/_nuxt\/[\w.-]+\.js/)![0]
    for (const path of [asset, '/favicon.svg']) {
      const r = await fetch(s.url + path)
      expect(r.status).toBe(200)
      expect(r.headers.get('x-content-type-options')).toBe('nosniff')
    }
  })
})
