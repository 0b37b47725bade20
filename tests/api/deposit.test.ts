import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { createClient, type Client } from '@libsql/client'
import { api, DEMO, ROOT, signIn, startServer, type TestServer } from '../helpers/server'
import { rowToRecord } from '../../shared/records/ingest'

const FIX = join(ROOT, 'tests/fixtures/deposit')
let s: TestServer
let a: string; let b: string
let draftId: number
let db: Client

async function upload (datasetId: number, name: string, body: Uint8Array | string, cookie = a, type = '') {
  const form = new FormData()
  form.append('file', new Blob([body], { type }), name)
  const res = await fetch(`${s.url}/api/v1/datasets/${datasetId}/uploads/check`, { method: 'POST', body: form, headers: { cookie } })
  return { status: res.status, data: await res.json() as any }
}
async function counts () {
  const out: Record<string, unknown> = {}
  for (const t of ['rate_record', 'uploaded_file', 'dataset', 'dataset_version', 'audit_event']) out[t] = (await db.execute(`select count(*) n from ${t}`)).rows[0]!.n
  return out
}

beforeAll(async () => {
  s = await startServer({ seed: true })
  db = createClient({ url: s.dbUrl })
  a = await signIn(s.url, DEMO.contributorA)
  b = await signIn(s.url, DEMO.contributorB)
  const me = (await api(s.url, '/api/v1/me', { headers: { cookie: a } })).data.user
  const r = await api(s.url, '/api/v1/datasets', { method: 'POST', headers: { cookie: a }, json: { labId: me.labIds[0], title: 'Uploads under test' } })
  expect(r.status).toBe(201)
  draftId = r.data.id
}, 90_000)
afterAll(async () => { db?.close(); await s?.stop() })

/** [fixture, status, where the message must point: row, column or path, and a phrase of the message] */
const BAD_FILES: [string, number, { row?: number, column?: string, path?: string, message: RegExp }][] = [
  ['unknown-column.csv', 422, { row: 1, column: 'colour', message: /unknown column "colour"/ }],
  ['duplicate-header.csv', 422, { row: 1, column: 'rate (s-1)', message: /column "rate" appears twice/ }],
  ['unknown-unit.csv', 422, { row: 1, column: 'rate (furlongs)', message: /unknown unit "furlongs" for rate/ }],
  ['missing-unit.csv', 422, { row: 1, column: 'temperature', message: /needs a unit in its header/ }],
  ['empty-header-cell.csv', 422, { row: 1, column: '#12', message: /column 12 has no header/ }],
  ['empty.csv', 422, { path: '/file', message: /no header row/ }],
  ['latin1.csv', 422, { row: 2, path: '/file', message: /not UTF-8/ }],
  ['unbalanced-quotes.csv', 422, { path: '/file', message: /./ }],
  ['slides.pdf', 415, { path: '/file', message: /unsupported file type/ }],
  ['not-json.json', 422, { path: '/file', message: /not JSON/ }],
  ['json-not-array.json', 422, { path: '/records', message: /must be an array/ }],
  ['not-xlsx.xlsx', 422, { path: '/file', message: /not XLSX/ }],
  ['formula.xlsx', 422, { row: 2, column: 'rate (ns-1)', message: /cell I2 holds a formula/ }],
  ['error-cell.xlsx', 422, { row: 2, column: 'delta_g (eV)', message: /cell J2 holds the error #DIV\/0!/ }]
]
/** Files that parse but whose rows have problems: the check answers 200 with issues and keeps nothing. */
const BAD_ROWS: [string, { row: number, column: string, path: string, message: RegExp }][] = [
  ['bad-number.csv', { row: 2, column: 'rate', path: '/rate/value', message: /"fast" is not a finite number/ }],
  ['nan-rate.csv', { row: 2, column: 'rate', path: '/rate/value', message: /"NaN" is not a finite number/ }],
  ['infinite-rate.csv', { row: 2, column: 'rate', path: '/rate/value', message: /"Infinity" is not a finite number/ }],
  ['negative-rate.csv', { row: 2, column: 'rate', path: '/rate/value', message: /must be > 0/ }],
  ['missing-donor.csv', { row: 2, column: 'donor_name', path: '/system/donor/name', message: /is required/ }],
  ['bad-process.csv', { row: 2, column: 'process', path: '/process', message: /must be one of/ }],
  ['zero-kelvin.csv', { row: 2, column: 'temperature', path: '/temperatureK', message: /must be > 0/ }],
  ['no-medium.csv', { row: 2, column: 'solvent', path: '/medium', message: /needs a solvent or a matrix/ }],
  ['too-long-cell.csv', { row: 2, column: 'notes', path: '/notes', message: /longer than 2000 characters/ }],
  ['too-many-cells.csv', { row: 2, column: '', path: '/row', message: /has 12 cells but the header has 11 columns/ }],
  ['second-row-bad.csv', { row: 3, column: 'initial_state', path: '/initialState', message: /must be one of/ }],
  ['lifetime-order.csv', { row: 2, column: 'lifetime', path: '/rate/lifetimeS', message: /must be shorter than the reference lifetime/ }],
  ['one-lifetime.csv', { row: 2, column: 'reference_lifetime', path: '/rate/referenceLifetimeS', message: /give both lifetimes/ }],
  ['mixed-references.csv', { row: 2, column: 'acceptor_reference', path: '/drivingForce/redox/acceptorReference', message: /different reference electrodes \(SCE and Fc\+\/Fc\)/ }],
  ['potential-no-reference.csv', { row: 2, column: 'donor_reference', path: '/drivingForce/redox/donorReference', message: /is required when potentials are given/ }],
  ['no-rate.csv', { row: 2, column: 'rate', path: '/rate/value', message: /is required \(or give lifetime and reference_lifetime\)/ }],
  ['json-bad-record.json', { row: 1, column: 'rate', path: '/records/0/rate/value', message: /must be > 0/ }]
]

describe('upload check: every malformed file gets a 4xx or a report naming row and field, and nothing is written', () => {
  it.each(BAD_FILES)('%s → %i', async (name, status, where) => {
    const before = await counts()
    const r = await upload(draftId, name, readFileSync(join(FIX, name)))
    expect(r.status).toBe(status)
    const hit = (r.data.data.issues as any[]).find(i => where.message.test(i.message))
    expect(hit, JSON.stringify(r.data)).toBeDefined()
    if (where.row) expect(hit.row).toBe(where.row)
    if (where.column) expect(hit.column).toBe(where.column)
    if (where.path) expect(hit.path).toBe(where.path)
    expect(await counts()).toEqual(before)
  })
  it.each(BAD_ROWS)('%s → problems listed by row and column, nothing kept', async (name, where) => {
    const before = await counts()
    const r = await upload(draftId, name, readFileSync(join(FIX, name)))
    expect(r.status).toBe(200)
    expect(r.data.issueCount).toBeGreaterThan(0)
    expect(r.data.upload).toBeNull()
    const hit = (r.data.issues as any[]).find(i => where.message.test(i.message))
    expect(hit, JSON.stringify(r.data.issues)).toBeDefined()
    expect(hit.row).toBe(where.row)
    expect(hit.column ?? '').toBe(where.column)
    expect(hit.path).toBe(where.path)
    expect(await counts()).toEqual(before)
  })
  it('a file over the size limit is 413', async () => {
    const before = await counts()
    const big = new Uint8Array(26 * 1024 * 1024).fill(65)
    const r = await upload(draftId, 'big.csv', big)
    expect(r.status).toBe(413)
    expect(await counts()).toEqual(before)
  })
  it('more than 100 000 rows is 413', async () => {
    const head = readFileSync(join(FIX, 'good.csv'), 'utf8').split('\r\n')
    const body = head[0] + '\r\n' + (head[1] + '\r\n').repeat(100_001)
    const r = await upload(draftId, 'many.csv', body)
    expect(r.status).toBe(413)
    expect(r.data.message).toBe('Too many rows: 100001 (at most 100000 per upload)')
  }, 60_000)
})

describe('requests that must be refused without writing', () => {
  const cases: [string, () => Promise<{ status: number, data: any }>, number, string][] = [
    ['multipart without a file', async () => { const f = new FormData(); f.append('note', 'x'); const r = await fetch(`${s.url}/api/v1/datasets/${draftId}/uploads/check`, { method: 'POST', body: f, headers: { cookie: a } }); return { status: r.status, data: await r.json() } }, 422, '/file'],
    ['records: empty list', () => api(s.url, `/api/v1/datasets/${draftId}/records`, { method: 'POST', headers: { cookie: a }, json: { records: [] } }), 422, '/records'],
    ['records: one bad record among good ones', () => api(s.url, `/api/v1/datasets/${draftId}/records`, { method: 'POST', headers: { cookie: a }, json: { records: [JSON.parse(readFileSync(join(FIX, 'json-bad-record.json'), 'utf8')).records[0]] } }), 422, '/records/0/rate/value'],
    ['metadata: bad ORCID check character', () => api(s.url, `/api/v1/datasets/${draftId}`, { method: 'PATCH', headers: { cookie: a }, json: { creators: [{ name: 'Faulkwood, Imre', orcid: '0000-0002-1825-0098' }] } }), 422, '/creators/0/orcid'],
    ['metadata: related DOI with bad syntax', () => api(s.url, `/api/v1/datasets/${draftId}`, { method: 'PATCH', headers: { cookie: a }, json: { relatedIdentifiers: [{ identifier: '11.1/x', identifierType: 'DOI', relationType: 'IsSupplementTo' }] } }), 422, '/relatedIdentifiers/0/identifier'],
    ['metadata: licence not in the SPDX list', () => api(s.url, `/api/v1/datasets/${draftId}`, { method: 'PATCH', headers: { cookie: a }, json: { license: 'MIT-ish' } }), 422, '/license'],
    ['metadata: embargo date in the past', () => api(s.url, `/api/v1/datasets/${draftId}`, { method: 'PATCH', headers: { cookie: a }, json: { embargoUntil: '2001-01-01' } }), 422, '/embargoUntil'],
    ['submit a draft with no records', () => api(s.url, `/api/v1/datasets/${draftId}/submit`, { method: 'POST', headers: { cookie: a } }), 422, '/records'],
    ['create a dataset for another lab', async () => api(s.url, '/api/v1/datasets', { method: 'POST', headers: { cookie: b }, json: { labId: 1, title: 'Not my lab' } }), 403, '/labId'],
    ['upload into another lab\'s draft', () => upload(draftId, 'good.csv', readFileSync(join(FIX, 'good.csv')), b), 404, ''],
    ['upload into a submitted dataset', () => upload(4, 'good.csv', readFileSync(join(FIX, 'good.csv'))), 409, ''],
    ['add records to a published dataset', () => api(s.url, '/api/v1/datasets/2/records', { method: 'POST', headers: { cookie: a }, json: { records: [{}] } }), 409, '']
  ]
  it.each(cases)('%s', async (_n, run, status, path) => {
    const before = await counts()
    const r = await run()
    expect(r.status).toBe(status)
    if (path) expect((r.data.data.issues as any[]).map(i => i.path)).toContain(path)
    expect(r.data.message.length).toBeGreaterThan(5)
    expect(await counts()).toEqual(before)
  })
})

describe('good uploads, the form and the API agree', () => {
  it.each(['good.csv', 'good-bom-semicolon.csv', 'good-tab.tsv', 'good.xlsx'])('%s checks clean and commits in one go', async (name) => {
    const before = await counts()
    const r = await upload(draftId, name, readFileSync(join(FIX, name)))
    expect(r.status, JSON.stringify(r.data)).toBe(200)
    expect(r.data.issueCount).toBe(0)
    expect(r.data.upload.sha256).toMatch(/^[0-9a-f]{64}$/)
    const c = await api(s.url, `/api/v1/datasets/${draftId}/uploads/${r.data.upload.id}/commit`, { method: 'POST', headers: { cookie: a }, json: { mode: 'append' } })
    expect(c.status).toBe(200)
    expect(c.data.added).toBe(r.data.acceptedCount)
    const after = await counts()
    expect(Number(after.rate_record) - Number(before.rate_record)).toBe(r.data.acceptedCount)
    expect(Number(after.uploaded_file) - Number(before.uploaded_file)).toBe(1)
  })
  it('converts units on entry and keeps what was reported (1.2 ns⁻¹ → 1.2e9 s⁻¹)', async () => {
    const d = await api(s.url, `/api/v1/datasets/${draftId}/versions/1`, { headers: { cookie: a } })
    const rec = d.data.records[0].data
    expect(rec.rate.value).toBeCloseTo(1.2e9, 0)
    expect(rec.rate.original).toEqual({ value: 1.2, unit: 'ns-1' })
    expect(rec.medium.permittivity).toBe(25.2) // filled from the solvent table
  })
  it('the API refuses and accepts the same records as the upload check', async () => {
    const ctx = { solvents: new Map([['benzonitrile', { name: 'benzonitrile', permittivity: 25.2, refractiveIndex: 1.5289, viscosity: 1.24 }]]) }
    const good = rowToRecord({ donor_name: 'D', acceptor_name: 'A', linkage: 'covalent', process: 'charge-shift', initial_state: 'thermal', solvent: 'benzonitrile', temperature: 300, rate: 5e8, technique: 'tcspc' }, {}, ctx).record!
    const badLifetimes = { ...good, rate: { value: 1e9, kind: 'unimolecular', method: 'lifetimes', lifetimeS: 5e-9, referenceLifetimeS: 1e-9 } }
    const badPotentials = { ...good, drivingForce: { value: -0.3, method: 'redox-potentials', redox: { donorOxidationPotential: 0.85, donorReference: 'SCE', acceptorReductionPotential: -0.55, acceptorReference: 'SCE', excitationEnergy: 2.1 } } }
    const before = await counts()
    const apiBad = await api(s.url, `/api/v1/datasets/${draftId}/records`, { method: 'POST', headers: { cookie: a }, json: { records: [good, badLifetimes, badPotentials] } })
    expect(apiBad.status).toBe(422)
    const fileBad = await upload(draftId, 'same.json', JSON.stringify({ records: [good, badLifetimes, badPotentials] }))
    expect(fileBad.data.issues.map((i: any) => [i.path, i.message])).toEqual(apiBad.data.data.issues.map((i: any) => [i.path, i.message]))
    expect(apiBad.data.data.issues.map((i: any) => i.path)).toEqual(['/records/1/rate/lifetimeS', '/records/2/drivingForce/value'])
    expect(await counts()).toEqual(before)
    const apiGood = await api(s.url, `/api/v1/datasets/${draftId}/records`, { method: 'POST', headers: { cookie: a }, json: { records: [good] } })
    expect(apiGood.status).toBe(201)
  })
  it('edits, deletes and bulk-deletes records of the draft', async () => {
    const d = await api(s.url, `/api/v1/datasets/${draftId}/versions/1`, { headers: { cookie: a } })
    const [first, second, third] = d.data.records
    const edited = { ...first.data, notes: 'edited' }
    expect((await api(s.url, `/api/v1/datasets/${draftId}/records/${first.id}`, { method: 'PUT', headers: { cookie: a }, json: { record: edited } })).status).toBe(200)
    const bad = await api(s.url, `/api/v1/datasets/${draftId}/records/${first.id}`, { method: 'PUT', headers: { cookie: a }, json: { record: { ...first.data, temperatureK: -3 } } })
    expect(bad.status).toBe(422)
    expect(bad.data.data.issues[0].path).toBe('/record/temperatureK')
    expect((await api(s.url, `/api/v1/datasets/${draftId}/records/${second.id}`, { method: 'DELETE', headers: { cookie: a } })).status).toBe(200)
    const miss = await api(s.url, `/api/v1/datasets/${draftId}/records/delete`, { method: 'POST', headers: { cookie: a }, json: { ids: [third.id, 999999] } })
    expect(miss.status).toBe(404) // all or none
    const ok = await api(s.url, `/api/v1/datasets/${draftId}/records/delete`, { method: 'POST', headers: { cookie: a }, json: { ids: [third.id] } })
    expect(ok.data.recordCount).toBe(d.data.records.length - 2)
  })
  it('submits once metadata and records validate; curators of other labs are mailed (not the lab\'s own); the draft is then locked', async () => {
    const r = await api(s.url, `/api/v1/datasets/${draftId}/submit`, { method: 'POST', headers: { cookie: a } })
    expect(r.status, JSON.stringify(r.data)).toBe(200)
    expect(r.data.state).toBe('submitted')
    const admin = await signIn(s.url, DEMO.admin)
    const mail = (await api(s.url, '/api/v1/admin/outbox', { headers: { cookie: admin } })).data.items
    const sub = mail.filter((m: any) => m.subject === 'Submitted for review: Uploads under test')
    expect(sub.map((m: any) => m.to).sort()).toEqual([DEMO.curatorB, DEMO.admin].sort()) // Pia is in the submitting lab
    expect(sub[0].text).toContain(`/review/${draftId}`)
    expect((await upload(draftId, 'good.csv', readFileSync(join(FIX, 'good.csv')))).status).toBe(409)
  })
})

describe('templates', () => {
  it('the CSV template checks clean, its headers carry units, and the XLSX has a notes sheet', async () => {
    const csv = await fetch(`${s.url}/api/v1/templates/records.csv`).then(r => r.text())
    expect(csv.split('\r\n')[0]).toContain('rate (s-1)')
    const me = (await api(s.url, '/api/v1/me', { headers: { cookie: a } })).data.user
    const d = await api(s.url, '/api/v1/datasets', { method: 'POST', headers: { cookie: a }, json: { labId: me.labIds[0], title: 'Template check' } })
    const r = await upload(d.data.id, 'template.csv', csv)
    expect(r.data.issueCount).toBe(0)
    const json = await fetch(`${s.url}/api/v1/templates/records.json`).then(r => r.text())
    expect((await upload(d.data.id, 'template.json', json)).data.issueCount).toBe(0)
    const ExcelJS = (await import('exceljs')).default
    const wb = new ExcelJS.Workbook()
    await wb.xlsx.load(await fetch(`${s.url}/api/v1/templates/records.xlsx`).then(r => r.arrayBuffer()))
    expect(wb.worksheets.map(w => w.name)).toEqual(['records', 'notes'])
    expect((await upload(d.data.id, 'template.xlsx', new Uint8Array(await fetch(`${s.url}/api/v1/templates/records.xlsx`).then(r => r.arrayBuffer())))).data.issueCount).toBe(0)
  })
})
