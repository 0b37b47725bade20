import { createHash } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import AdmZip from 'adm-zip'
import { createClient } from '@libsql/client'
import Papa from 'papaparse'
import Ajv2020 from 'ajv/dist/2020.js'
import { api, DEMO, signIn, startServer, type TestServer } from '../helpers/server'

let s: TestServer
beforeAll(async () => { s = await startServer({ seed: true }) }, 90_000)
afterAll(async () => { await s?.stop() })

async function download (path: string, init: RequestInit = {}) {
  const r = await fetch(s.url + path, init)
  return { status: r.status, headers: r.headers, buf: Buffer.from(await r.arrayBuffer()) }
}
const sha = (b: Buffer) => createHash('sha256').update(b).digest('hex')

/** Checks a bag the way a BagIt validator does (RFC 8493 §3): both manifests and the Payload-Oxum. */
function verifyBag (buf: Buffer) {
  const zip = new AdmZip(buf)
  const entries = zip.getEntries().filter(e => !e.isDirectory)
  // one top-level folder (the bag's base directory, RFC 8493 §2), so unpacking never spills files
  const roots = new Set(entries.map(e => e.entryName.split('/')[0]))
  expect(roots.size).toBe(1)
  const root = [...roots][0]!
  expect(root).toMatch(/^crosspoint-[a-z0-9-]+$/)
  const files = new Map(entries.map(e => [e.entryName.slice(root.length + 1), e.getData()]))
  expect(files.get('bagit.txt')!.toString()).toBe('BagIt-Version: 1.0\nTag-File-Character-Encoding: UTF-8\n')
  const manifest = files.get('manifest-sha256.txt')!.toString().trim().split('\n').map(l => l.split(/\s+/))
  const payload = [...files.keys()].filter(k => k.startsWith('data/'))
  expect(manifest.map(([, p]) => p).sort()).toEqual(payload.sort())
  for (const [hash, path] of manifest) expect(sha(files.get(path!)!), path).toBe(hash)
  const tags = files.get('tagmanifest-sha256.txt')!.toString().trim().split('\n').map(l => l.split(/\s+/))
  expect(tags.map(([, p]) => p).sort()).toEqual(['bag-info.txt', 'bagit.txt', 'manifest-sha256.txt'])
  for (const [hash, path] of tags) expect(sha(files.get(path!)!), path).toBe(hash)
  const info = files.get('bag-info.txt')!.toString()
  const [octets, count] = info.match(/^Payload-Oxum: (\d+)\.(\d+)$/m)!.slice(1).map(Number)
  expect(count).toBe(payload.length)
  expect(octets).toBe(payload.reduce((n, p) => n + files.get(p)!.length, 0))
  expect(info).toMatch(/^Bagging-Date: \d{4}-\d{2}-\d{2}$/m)
  return { files, info }
}

function recordsOf (files: Map<string, Buffer>) {
  const csv = Papa.parse<Record<string, string>>(files.get('data/records.csv')!.toString(), { header: true, skipEmptyLines: true }).data
  const json = JSON.parse(files.get('data/records.json')!.toString()).records as any[]
  return { csv, json }
}

describe('dataset bundles', () => {
  it('a published dataset: a valid bag whose CSV and JSON hold the same records, valid against the schema', async () => {
    const r = await download('/api/v1/datasets/2/bundle')
    expect(r.status).toBe(200)
    expect(r.headers.get('content-type')).toBe('application/zip')
    const { files, info } = verifyBag(r.buf)
    const { csv, json } = recordsOf(files)
    expect(csv.length).toBe(json.length)
    expect(csv.length).toBe(Number(r.headers.get('x-crosspoint-records')))
    const validate = new Ajv2020({ strict: true, strictRequired: false, allowUnionTypes: true }).compile(JSON.parse(files.get('data/schemas/rate-record.v1.json')!.toString()))
    json.forEach((j, i) => {
      expect(validate(j.record), JSON.stringify(validate.errors)).toBe(true)
      expect(Number(csv[i]!.record_id)).toBe(j.id)
      expect(Number(csv[i]!['rate (s-1 or M-1 s-1)'])).toBe(j.record.rate.value)
      expect(csv[i]!['delta_g (eV)'] === '' ? undefined : Number(csv[i]!['delta_g (eV)'])).toBe(j.record.drivingForce?.value)
    })
    expect(info).toContain('Crosspoint-Dataset: 10.99999/cp-demo.2.v1 (CC-BY-4.0)')
    expect(files.get('data/CITATION.cff')!.toString()).toContain('doi: 10.99999/cp-demo.2.v1')
    expect(files.get('data/README.md')!.toString()).toContain('https://doi.org/10.99999/cp-demo.2.v1')
    expect(JSON.parse(files.get('data/datasets/2-v1.datacite.json')!.toString()).data.attributes.doi).toBe('10.99999/cp-demo.2.v1')
  })
  it('a draft is 404 for a visitor, and its lab can bundle it', async () => {
    expect((await download('/api/v1/datasets/3/bundle')).status).toBe(404)
    const cookie = await signIn(s.url, DEMO.contributorA)
    const r = await download('/api/v1/datasets/3/bundle', { headers: { cookie } })
    expect(r.status).toBe(200)
    verifyBag(r.buf)
  })
  it('records whose stored CSV line is missing (written before it existed) are bundled the same', async () => {
    const before = recordsOf(verifyBag((await download('/api/v1/datasets/5/bundle')).buf).files)
    const c = createClient({ url: s.dbUrl })
    await c.execute('update rate_record set csv_line = null, csv_format = null where version_id in (select id from dataset_version where dataset_id = 5)')
    c.close()
    const after = recordsOf(verifyBag((await download('/api/v1/datasets/5/bundle')).buf).files)
    expect(after.csv.length).toBeGreaterThan(0)
    expect(after.csv).toEqual(before.csv)
    expect(after.json).toEqual(before.json)
  })
  it('a withdrawn dataset offers no bundle (410)', async () => {
    expect((await download('/api/v1/datasets/10/bundle')).status).toBe(410)
  })
})

describe('selection bundles', () => {
  it('a search selection holds exactly the published records the search finds, citing each dataset and its licence', async () => {
    const q = { solvent: 'water' }
    const total = (await api(s.url, '/api/v1/records?solvent=water&pageSize=1')).data.total
    const r = await download('/api/v1/bundles', { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ query: q }) })
    expect(r.status).toBe(200)
    const { files } = verifyBag(r.buf)
    const { csv, json } = recordsOf(files)
    expect(json.length).toBe(total)
    expect(csv.every(row => row.solvent === 'water')).toBe(true)
    // the redox inputs travel with the ΔG° derived from them
    expect(Object.keys(csv[0]!)).toEqual(expect.arrayContaining(['donor_oxidation_potential (V)', 'donor_reference',
      'acceptor_reduction_potential (V)', 'acceptor_reference', 'reference_offset (V)', 'excitation_energy (eV)']))
    const datasetsInBag = [...files.keys()].filter(k => k.startsWith('data/datasets/')).length
    expect(datasetsInBag).toBe(new Set(json.map(j => `${j.datasetId}-${j.datasetVersion}`)).size)
    const readme = files.get('data/README.md')!.toString()
    expect(readme).toMatch(/mixes licences: (CC-BY-4.0, CC0-1.0|CC0-1.0, CC-BY-4.0)/)
    expect(files.get('data/CITATION.cff')!.toString()).toContain('references:')
    // named after what it holds and described in words, not as raw JSON
    expect(r.headers.get('content-disposition')).toMatch(/^attachment; filename="crosspoint-search-\d{4}-\d{2}-\d{2}\.zip"$/)
    const info = files.get('bag-info.txt')!.toString()
    expect(info).toContain('External-Description: search: solvent water')
    expect(info).not.toMatch(/[{}]/)
  })
  it('a search with words is named after them', async () => {
    const r = await download('/api/v1/bundles', { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ query: { q: 'Zinc porphyrin!' } }) })
    expect(r.headers.get('content-disposition')).toMatch(/filename="crosspoint-zinc-porphyrin-\d{4}-\d{2}-\d{2}\.zip"/)
  })
  it('a visitor\'s selection by ids holds no unpublished record, even when draft ids are asked for', async () => {
    const cookie = await signIn(s.url, DEMO.contributorA)
    const draft = await api(s.url, '/api/v1/datasets/3', { headers: { cookie } })
    const draftIds = draft.data.records.slice(0, 5).map((x: any) => x.id)
    const pub = (await api(s.url, '/api/v1/records?pageSize=5')).data.items.map((x: any) => x.id)
    const r = await download('/api/v1/bundles', { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ recordIds: [...draftIds, ...pub] }) })
    expect(r.status).toBe(200)
    const { json } = recordsOf(verifyBag(r.buf).files)
    expect(json.map(j => j.id).sort()).toEqual(pub.sort())
    const only = await download('/api/v1/bundles', { method: 'POST', headers: { 'content-type': 'application/json', cookie }, body: JSON.stringify({ recordIds: draftIds }) })
    expect(only.status).toBe(404) // not even for their own lab: selection bundles are for published data
  })
  it('limits answer clearly', async () => {
    const big = await api(s.url, '/api/v1/bundles', { method: 'POST', json: { recordIds: Array.from({ length: 200_001 }, (_, i) => i + 1) } })
    expect(big.status).toBe(422)
    expect(big.data.data.issues[0].path).toBe('/recordIds')
    const both = await api(s.url, '/api/v1/bundles', { method: 'POST', json: { query: {}, recordIds: [1] } })
    expect(both.status).toBe(422)
    const bad = await api(s.url, '/api/v1/bundles', { method: 'POST', json: { query: { deltaGMin: 'low' } } })
    expect(bad.data.data.issues[0].path).toBe('/query/deltaGMin')
  })
})
