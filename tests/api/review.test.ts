import { readFileSync } from 'node:fs'
import { join, resolve } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { parse as parseYaml } from 'yaml'
import AjvDraft7 from 'ajv'
import addFormats from 'ajv-formats'
import { Cite } from '@citation-js/core'
import '@citation-js/plugin-bibtex'
import '@citation-js/plugin-ris'
import { api, DEMO, ROOT, signIn, startServer, type TestServer } from '../helpers/server'

let s: TestServer
const c: Record<string, string> = {}
let id = 0
let outbox: () => Promise<{ to: string, subject: string }[]>

async function upload (datasetId: number, name: string, cookie: string) {
  const form = new FormData()
  form.append('file', new Blob([readFileSync(join(ROOT, 'tests/fixtures/deposit', name))]), name)
  const r = await fetch(`${s.url}/api/v1/datasets/${datasetId}/uploads/check`, { method: 'POST', body: form, headers: { cookie } })
  return { status: r.status, data: await r.json() as any }
}
const view = async () => (await api(s.url, `/api/v1/review/${id}`, { headers: { cookie: c.curator } })).data

beforeAll(async () => {
  s = await startServer({ seed: true })
  c.b = await signIn(s.url, DEMO.contributorB)
  c.curator = await signIn(s.url, DEMO.curator) // member of lab A, so free to review lab B
  c.admin = await signIn(s.url, DEMO.admin)
  c.a = await signIn(s.url, DEMO.contributorA)
  outbox = async () => (await api(s.url, '/api/v1/admin/outbox', { headers: { cookie: c.admin } })).data.items
  const labB = (await api(s.url, '/api/v1/me', { headers: { cookie: c.b } })).data.user.labIds[0]
  id = (await api(s.url, '/api/v1/datasets', { method: 'POST', headers: { cookie: c.b }, json: { labId: labB, title: 'Review round under test' } })).data.id
  const up = await upload(id, 'good.csv', c.b)
  await api(s.url, `/api/v1/datasets/${id}/uploads/${up.data.upload.id}/commit`, { method: 'POST', headers: { cookie: c.b }, json: { mode: 'append' } })
  await api(s.url, `/api/v1/datasets/${id}`, { method: 'PATCH', headers: { cookie: c.b }, json: { creators: [{ name: 'Orrel, Sunniva', orcid: '0000-0002-1825-0097', affiliation: 'University of Lindqvale (fictional)' }], keywords: ['demo'], relatedIdentifiers: [{ identifier: '10.99999/article.1', identifierType: 'DOI', relationType: 'IsSupplementTo' }] } })
}, 90_000)
afterAll(async () => { await s?.stop() })

describe('create → upload → submit → return → fix → resubmit → accept → publish → new version', () => {
  it('submits, and every curator and admin is mailed', async () => {
    expect((await api(s.url, `/api/v1/datasets/${id}/submit`, { method: 'POST', headers: { cookie: c.b } })).status).toBe(200)
    const mail = (await outbox()).filter(m => m.subject === 'Submitted for review: Review round under test').map(m => m.to)
    expect(mail.sort()).toEqual([DEMO.admin, DEMO.curator].sort())
    const q = await api(s.url, '/api/v1/review/queue', { headers: { cookie: c.curator } })
    expect(q.data.items.map((i: any) => i.datasetId)).toContain(id)
    expect((await api(s.url, '/api/v1/review/queue', { headers: { cookie: c.b } })).status).toBe(403)
  })
  it('a curator of the dataset\'s own lab may not act on it', async () => {
    const sunLabCurator = c.b // a contributor is not a curator at all
    expect((await api(s.url, `/api/v1/review/${id}/accept`, { method: 'POST', headers: { cookie: sunLabCurator }, json: { expectedUpdatedAt: 0 } })).status).toBe(403)
    const own = (await api(s.url, '/api/v1/review/queue', { headers: { cookie: c.curator } })).data.items.find((i: any) => i.labName === 'Faulkwood Ultrafast Lab')
    const r = await api(s.url, `/api/v1/review/${own.datasetId}/accept`, { method: 'POST', headers: { cookie: c.curator }, json: { expectedUpdatedAt: 0 } })
    expect(r.status).toBe(403)
    expect(r.data.message).toBe('A curator never reviews a dataset of their own lab')
  })
  it('returns with an overall and a per-record comment, which the lab sees beside the record', async () => {
    const v = await view()
    expect(v.report.issueCount).toBe(0)
    expect(v.diff).toBeNull()
    const rec = v.records[1]
    const r = await api(s.url, `/api/v1/review/${id}/return`, { method: 'POST', headers: { cookie: c.curator }, json: { comment: 'Please check the second rate.', expectedUpdatedAt: v.version.updatedAt, recordComments: [{ recordId: rec.id, body: 'Ten times faster than its neighbours?' }] } })
    expect(r.status).toBe(200)
    const lab = await api(s.url, `/api/v1/datasets/${id}/versions/1`, { headers: { cookie: c.b } })
    expect(lab.data.version.state).toBe('returned')
    expect(lab.data.review).toMatchObject({ decision: 'returned', comment: 'Please check the second rate.', comments: [{ recordId: rec.id, body: 'Ten times faster than its neighbours?' }] })
    expect((await outbox()).some(m => m.to === DEMO.contributorB && m.subject === 'Returned with comments: Review round under test')).toBe(true)
    // a second curator acting on the same loaded view loses
    const late = await api(s.url, `/api/v1/review/${id}/return`, { method: 'POST', headers: { cookie: c.admin }, json: { comment: 'late', expectedUpdatedAt: v.version.updatedAt } })
    expect(late.status).toBe(409)
    expect(late.data.message).toMatch(/Another curator acted on this submission/)
  })
  it('the fix is resubmitted and the curator sees what changed since the return', async () => {
    const lab = await api(s.url, `/api/v1/datasets/${id}/versions/1`, { headers: { cookie: c.b } })
    const rec = lab.data.records[1]
    const fixed = { ...rec.data, rate: { ...rec.data.rate, value: 3.4e8, original: undefined } }
    delete fixed.rate.original
    expect((await api(s.url, `/api/v1/datasets/${id}/records/${rec.id}`, { method: 'PUT', headers: { cookie: c.b }, json: { record: fixed } })).status).toBe(200)
    expect((await api(s.url, `/api/v1/datasets/${id}/submit`, { method: 'POST', headers: { cookie: c.b } })).status).toBe(200)
    const v = await view()
    expect(v.sinceReturn).toEqual({ added: [], changed: [rec.position], removed: 0 })
  })
  it('two curators accepting at once: one publishes, the other gets 409', async () => {
    const v = await view()
    const [r1, r2] = await Promise.all([
      api(s.url, `/api/v1/review/${id}/accept`, { method: 'POST', headers: { cookie: c.curator }, json: { expectedUpdatedAt: v.version.updatedAt } }),
      api(s.url, `/api/v1/review/${id}/accept`, { method: 'POST', headers: { cookie: c.admin }, json: { expectedUpdatedAt: v.version.updatedAt } })
    ])
    expect([r1.status, r2.status].sort()).toEqual([200, 409])
    const ok = r1.status === 200 ? r1 : r2
    expect(ok.data.doi).toBe(`10.99999/cp.${id}.v1`)
    expect(ok.data.conceptDoi).toBe(`10.99999/cp.${id}`)
    const reg = (await api(s.url, '/api/v1/admin/registrar', { headers: { cookie: c.admin } })).data.local.minted.map((m: any) => m.doi)
    expect(reg.filter((d: string) => d.startsWith(`10.99999/cp.${id}`)).sort()).toEqual([`10.99999/cp.${id}`, `10.99999/cp.${id}.v1`])
    expect((await outbox()).some(m => m.to === DEMO.contributorB && m.subject === 'Published: Review round under test')).toBe(true)
  })
  it('a published version is immutable: every write answers 409', async () => {
    expect((await upload(id, 'good.csv', c.b)).status).toBe(409)
    expect((await api(s.url, `/api/v1/datasets/${id}`, { method: 'PATCH', headers: { cookie: c.b }, json: { title: 'Changed after publication' } })).status).toBe(409)
    expect((await api(s.url, `/api/v1/datasets/${id}/records`, { method: 'POST', headers: { cookie: c.b }, json: { records: [{}] } })).status).toBe(409)
    expect((await api(s.url, `/api/v1/datasets/${id}/submit`, { method: 'POST', headers: { cookie: c.b } })).status).toBe(409)
  })
  it('a correction is a new version: diffed against v1, and a registrar outage publishes nothing until a retry', async () => {
    const nv = await api(s.url, `/api/v1/datasets/${id}/versions`, { method: 'POST', headers: { cookie: c.b } })
    expect(nv.status).toBe(201)
    expect(nv.data.versionNumber).toBe(2)
    const d2 = await api(s.url, `/api/v1/datasets/${id}/versions/2`, { headers: { cookie: c.b } })
    const first = d2.data.records[0]
    await api(s.url, `/api/v1/datasets/${id}/records/${first.id}`, { method: 'PUT', headers: { cookie: c.b }, json: { record: { ...first.data, temperatureK: 295 } } })
    const up = await upload(id, 'good-tab.tsv', c.b)
    await api(s.url, `/api/v1/datasets/${id}/uploads/${up.data.upload.id}/commit`, { method: 'POST', headers: { cookie: c.b }, json: { mode: 'append' } })
    expect((await api(s.url, `/api/v1/datasets/${id}/submit`, { method: 'POST', headers: { cookie: c.b } })).status).toBe(200)
    const v = await view()
    expect(v.diff.against).toBe(1)
    expect(v.diff.added).toHaveLength(1)
    expect(v.diff.removed).toHaveLength(0)
    expect(v.diff.changed).toEqual([{ recordKey: first.recordKey, position: first.position, fields: ['/temperatureK'] }])
    // the registrar fails: nothing is published
    await api(s.url, '/api/v1/admin/registrar/fail', { method: 'POST', headers: { cookie: c.admin }, json: { count: 1 } })
    const failed = await api(s.url, `/api/v1/review/${id}/accept`, { method: 'POST', headers: { cookie: c.curator }, json: { expectedUpdatedAt: v.version.updatedAt } })
    expect(failed.status).toBe(503)
    expect(failed.data.message).toMatch(/Nothing was published; try again/)
    expect((await view()).version.state).toBe('submitted')
    // the retry publishes with one identifier
    const retry = await api(s.url, `/api/v1/review/${id}/accept`, { method: 'POST', headers: { cookie: c.curator }, json: { expectedUpdatedAt: v.version.updatedAt } })
    expect(retry.status).toBe(200)
    expect(retry.data.doi).toBe(`10.99999/cp.${id}.v2`)
    const reg = (await api(s.url, '/api/v1/admin/registrar', { headers: { cookie: c.admin } })).data.local.minted.map((m: any) => m.doi)
    expect(reg.filter((d: string) => d.startsWith(`10.99999/cp.${id}`)).sort()).toEqual([`10.99999/cp.${id}`, `10.99999/cp.${id}.v1`, `10.99999/cp.${id}.v2`])
    const pub = await api(s.url, `/api/v1/datasets/${id}`)
    expect(pub.data.version.versionNumber).toBe(2)
    expect(pub.data.versions.map((x: any) => x.doi)).toEqual([`10.99999/cp.${id}.v1`, `10.99999/cp.${id}.v2`])
  })
  it('every transition is in the dataset\'s audit trail, shown to its lab and curators', async () => {
    const actions = (await api(s.url, `/api/v1/datasets/${id}/audit`, { headers: { cookie: c.b } })).data.items.map((a: any) => a.action)
    for (const a of ['dataset.created', 'dataset.submitted', 'dataset.returned', 'dataset.published', 'dataset.new-version']) expect(actions).toContain(a)
    expect((await api(s.url, `/api/v1/datasets/${id}/audit`, { headers: { cookie: c.a } })).status).toBe(404)
    expect((await api(s.url, `/api/v1/datasets/${id}/audit`)).status).toBe(401)
  })
})

describe('citations of the published version', () => {
  const get = async (format: string) => (await fetch(`${s.url}/api/v1/datasets/${id}/citation?format=${format}`)).text()
  it('BibTeX and RIS parse with citation-js and carry creators, title, year, version, identifier and licence', async () => {
    for (const format of ['bibtex', 'ris']) {
      const text = await get(format)
      const [item] = new Cite(text).data as any[]
      expect(item.title).toBe('Review round under test')
      expect(item.author[0]).toMatchObject({ family: 'Orrel', given: 'Sunniva' })
      expect(item.issued['date-parts'][0][0]).toBe(new Date().getUTCFullYear())
      expect(item.DOI).toBe(`10.99999/cp.${id}.v2`)
      expect(String(item.version ?? item.edition)).toBe('2')
      expect(text).toContain('CC-BY-4.0')
    }
  })
  it('CSL-JSON and DataCite JSON parse and carry the DataCite mandatory properties', async () => {
    const csl = JSON.parse(await get('csl-json'))
    expect(csl[0]).toMatchObject({ type: 'dataset', title: 'Review round under test', version: '2', DOI: `10.99999/cp.${id}.v2` })
    expect(csl[0].note).toContain('Licence: CC-BY-4.0') // CSL-JSON has no licence variable
    const dc = JSON.parse(await get('datacite-json')).data.attributes
    // DataCite Metadata Schema 4 mandatory: identifier, creator, title, publisher, publicationYear, resourceTypeGeneral
    expect(dc.doi).toBe(`10.99999/cp.${id}.v2`)
    expect(dc.creators[0].nameIdentifiers[0]).toEqual({ nameIdentifier: 'https://orcid.org/0000-0002-1825-0097', nameIdentifierScheme: 'ORCID', schemeUri: 'https://orcid.org' })
    expect(dc.titles[0].title).toBe('Review round under test')
    expect(dc.publisher).toBe('Crosspoint') // a string in DataCite 4.3
    expect(dc.publicationYear).toBe(String(new Date().getUTCFullYear()))
    expect(dc.types.resourceTypeGeneral).toBe('Dataset')
    expect(dc.rightsList[0].rightsIdentifier).toBe('CC-BY-4.0')
    expect(dc.relatedIdentifiers).toEqual(expect.arrayContaining([{ relatedIdentifier: `10.99999/cp.${id}`, relatedIdentifierType: 'DOI', relationType: 'IsVersionOf' }]))
  })
  it('CITATION.cff parses as YAML and validates against the official CFF 1.2.0 schema', async () => {
    const schemaPath = resolve(ROOT, 'tests/fixtures/standards/cff-1.2.0.schema.json') // the official schema, copied (see its README)
    const schema = JSON.parse(readFileSync(schemaPath, 'utf8'))
    const doc = parseYaml(await get('cff'))
    const ajv = new AjvDraft7({ allErrors: true, strict: false })
    addFormats(ajv)
    const validate = ajv.compile(schema)
    expect(validate(doc), JSON.stringify(validate.errors)).toBe(true)
    expect(doc).toMatchObject({ 'cff-version': '1.2.0', 'title': 'Review round under test', 'version': '2', 'doi': `10.99999/cp.${id}.v2`, 'license': 'CC-BY-4.0' })
    expect(doc.authors[0]).toMatchObject({ 'family-names': 'Orrel', 'given-names': 'Sunniva', 'orcid': 'https://orcid.org/0000-0002-1825-0097' })
    // the CFF schema must be able to fail: a record without authors is refused
    expect(validate({ ...doc, authors: undefined })).toBe(false)
  })
  it('422 for an unknown format; 404 for a dataset with nothing published', async () => {
    expect((await api(s.url, `/api/v1/datasets/${id}/citation?format=word`)).status).toBe(422)
    expect((await api(s.url, '/api/v1/datasets/3/citation?format=bibtex', { headers: { cookie: c.a } })).status).toBe(404)
  })
})

describe('withdrawal', () => {
  it('leaves a tombstone; the identifier keeps resolving at the registrar', async () => {
    expect((await api(s.url, `/api/v1/datasets/${id}/withdraw`, { method: 'POST', headers: { cookie: c.curator }, json: { reason: 'A calibration error was found.' } })).status).toBe(403)
    const w = await api(s.url, `/api/v1/datasets/${id}/withdraw`, { method: 'POST', headers: { cookie: c.admin }, json: { reason: 'A calibration error was found.' } })
    expect(w.status).toBe(200)
    const page = await api(s.url, `/api/v1/datasets/${id}`)
    expect(page.status).toBe(200)
    expect(page.data.version.state).toBe('withdrawn')
    expect(page.data.records).toEqual([])
    const reg = (await api(s.url, '/api/v1/admin/registrar', { headers: { cookie: c.admin } })).data.local
    const res = await fetch(`${reg.url}/dois/${encodeURIComponent(`10.99999/cp.${id}.v2`)}`)
    expect(res.status).toBe(200)
    expect((await res.json() as any).data.attributes.url).toBe(`${s.url}/datasets/${id}?version=2`)
    expect((await api(s.url, `/api/v1/records?q=Review+round+under+test&pageSize=1`)).data.total).toBe(0)
  })
})
