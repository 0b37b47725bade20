import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { api, DEMO, ROOT, signIn, startServer, type TestServer } from '../helpers/server'

let s: TestServer
beforeAll(async () => { s = await startServer({ seed: true }) }, 90_000)
afterAll(async () => { await s?.stop() })
const search = async (qs: string, cookie?: string) => (await api(s.url, `/api/v1/records?${qs}`, { headers: cookie ? { cookie } : {} })).data

describe('full-text search', () => {
  it.each([
    ['a typo in a class name', 'q=porphirin', (r: any) => r.datasetTitle.toLowerCase().includes('porphyrin')],
    ['a prefix of a donor name', 'q=dimethoxynaph', (r: any) => r.donorName === 'dimethoxynaphthalene'],
    ['a typo in a solvent', 'q=benzonitril', (r: any) => r.solvent === 'benzonitrile'],
    ['an acceptor with punctuation', 'q=viologen', (r: any) => ['MV2+', 'BV2+'].includes(r.acceptorName)],
    ['swapped letters in a solvent', 'q=toleune', (r: any) => r.solvent === 'toluene'],
    ['the common name of an abbreviation', 'q=zinc%20porphyrin', (r: any) => r.donorName.startsWith('ZnP')],
    ['a parent compound inside a systematic name', 'q=aniline', (r: any) => /aniline/i.test(r.donorName)]
  ])('finds the right records for %s', async (_n, qs, ok) => {
    const r = await search(`${qs}&pageSize=100`)
    expect(r.total).toBeGreaterThan(0)
    for (const item of r.items) expect(ok(item), JSON.stringify(item)).toBe(true)
  })
  it('facets and ranges combine: every hit satisfies every filter, and facet counts add up', async () => {
    const r = await search('q=porphyrin&solvent=toluene&deltaGMin=-1.2&deltaGMax=-0.4&temperatureMin=290&pageSize=500')
    expect(r.total).toBeGreaterThan(0)
    for (const i of r.items) {
      expect(i.solvent).toBe('toluene')
      expect(i.deltaG).toBeGreaterThanOrEqual(-1.2); expect(i.deltaG).toBeLessThanOrEqual(-0.4)
      expect(i.temperatureK).toBeGreaterThanOrEqual(290)
    }
    expect(Object.values(r.facets.solvent as Record<string, number>).reduce((a, b) => a + b, 0)).toBe(r.total)
    expect(r.ranges.deltaG.min).toBeGreaterThanOrEqual(-1.2)
    expect(Object.keys(r.facets)).toEqual(['process', 'solvent', 'technique', 'linkage', 'lab', 'year'])
  })
  it('sorts by a column', async () => {
    const r = await search('sort=-log10Rate&pageSize=50')
    const ks = r.items.map((i: any) => i.log10Rate)
    expect([...ks].sort((a, b) => b - a)).toEqual(ks)
  })
  it('/records/ids answers every match\'s id in the order of the pages (to add them all to a comparison)', async () => {
    const all = (await api(s.url, '/api/v1/records/ids?q=porphyrin&sort=deltaG')).data
    const pages = [await search('q=porphyrin&sort=deltaG&pageSize=500'), await search('q=porphyrin&sort=deltaG&pageSize=500&page=2')]
    const paged = pages.flatMap(p => p.items.map((i: any) => i.id))
    expect(all.total).toBe(pages[0].total)
    expect(all.ids).toEqual(paged.slice(0, all.total))
    expect(all.truncated).toBe(false)
    expect((await api(s.url, '/api/v1/records/ids?sort=everything')).status).toBe(422)
  })
  it('says "did you mean" with the nearest indexed word, and not for a word it knows', async () => {
    expect((await search('q=benzonitirle')).didYouMean).toBe('benzonitrile')
    expect((await search('q=benzonitrile')).didYouMean).toBeUndefined()
  })
})

describe('drafts never leak; publishing makes records findable at once', () => {
  it('a lab finds its own draft, nobody else does, and publication makes it public without a restart', async () => {
    const b = await signIn(s.url, DEMO.contributorB)
    const labB = (await api(s.url, '/api/v1/me', { headers: { cookie: b } })).data.user.labIds[0]
    const id = (await api(s.url, '/api/v1/datasets', { method: 'POST', headers: { cookie: b }, json: { labId: labB, title: 'Zyxquartz search probe' } })).data.id
    const form = new FormData()
    form.append('file', new Blob([readFileSync(join(ROOT, 'tests/fixtures/deposit/good.csv'))]), 'good.csv')
    const up = await (await fetch(`${s.url}/api/v1/datasets/${id}/uploads/check`, { method: 'POST', body: form, headers: { cookie: b } })).json() as any
    await api(s.url, `/api/v1/datasets/${id}/uploads/${up.upload.id}/commit`, { method: 'POST', headers: { cookie: b }, json: { mode: 'append' } })
    expect((await search('q=zyxquartz', b)).total).toBe(3)
    expect((await search('q=zyxquartz')).total).toBe(0)
    expect((await search('q=zyxquartz', await signIn(s.url, DEMO.contributorA))).total).toBe(0)
    await api(s.url, `/api/v1/datasets/${id}/submit`, { method: 'POST', headers: { cookie: b } })
    const cur = await signIn(s.url, DEMO.curator)
    const v = (await api(s.url, `/api/v1/review/${id}`, { headers: { cookie: cur } })).data
    expect((await search('q=zyxquartz', cur)).total).toBe(0) // curators review submissions on the review desk, not in search
    expect((await api(s.url, `/api/v1/review/${id}/accept`, { method: 'POST', headers: { cookie: cur }, json: { expectedUpdatedAt: v.version.updatedAt } })).status).toBe(200)
    expect((await search('q=zyxquartz')).total).toBe(3)
    const admin = await signIn(s.url, DEMO.admin)
    await api(s.url, `/api/v1/datasets/${id}/withdraw`, { method: 'POST', headers: { cookie: admin }, json: { reason: 'Probe finished, withdrawing.' } })
    expect((await search('q=zyxquartz')).total).toBe(0)
  })
})

describe('similar systems', () => {
  it('ranks records by the documented score and says why', async () => {
    const first = (await search('q=dimethoxynaphthalene&pageSize=1')).items[0]
    const r = await api(s.url, `/api/v1/records/${first.id}/similar?limit=5`)
    expect(r.status).toBe(200)
    expect(r.data.items).toHaveLength(5)
    const scores = r.data.items.map((i: any) => i.score)
    expect([...scores].sort((a, b) => b - a)).toEqual(scores)
    for (const i of r.data.items) {
      expect(i.record.id).not.toBe(first.id)
      const sum = i.why.reduce((a: number, w: any) => a + w.contribution, 0)
      expect(sum).toBeCloseTo(i.score, 2)
      // both records give donor and acceptor SMILES (demo data), so structures are compared, not names
      expect(i.why.map((w: any) => w.feature)).toEqual(expect.arrayContaining(['deltaG', 'temperature', 'process', 'linkage', 'structure']))
      expect(i.why.map((w: any) => w.feature)).not.toContain('names')
    }
    // the nearest systems of a record in a temperature series are its own series
    expect(r.data.items[0].record.donorName).toBe('dimethoxynaphthalene')
    expect(r.data.items[0].why.find((w: any) => w.feature === 'structure').closeness).toBe(1)
    expect((await api(s.url, '/api/v1/records/999999/similar')).status).toBe(404)
  })
  it('falls back to name resemblance where a record has no structures, and says so', async () => {
    const first = (await search('q=porphyrin&pageSize=1')).items[0]
    const r = await api(s.url, `/api/v1/records/${first.id}/similar?limit=3`)
    for (const i of r.data.items) expect(i.why.find((w: any) => w.feature === 'names').detail).toMatch(/no structures/)
  })
})

describe('structures', () => {
  it('a record with SMILES carries canonical SMILES, InChIKey and a depiction, computed by RDKit and cached', async () => {
    const hit = (await search('q=triethylamine&pageSize=1')).items[0]
    const r = (await api(s.url, `/api/v1/records/${hit.id}`)).data
    // InChIKey of triethylamine as listed in PubChem (from memory)
    expect(r.structures.donor).toMatchObject({ smiles: 'CCN(CC)CC', canonicalSmiles: 'CCN(CC)CC', inchiKey: 'ZMANZCXQSJIPKH-UHFFFAOYSA-N', error: null })
    expect(Buffer.from(r.structures.donor.depiction.replace(/^data:image\/svg\+xml;base64,/, ''), 'base64').toString()).toMatch(/<svg[\s\S]*<\/svg>/)
    expect(r.structures.acceptor).toBeUndefined() // the iridium complexes carry no SMILES in the demo
  })
  it('a SMILES RDKit cannot read is an error at its row and column, and nothing is kept', async () => {
    const b = await signIn(s.url, DEMO.contributorB)
    const labB = (await api(s.url, '/api/v1/me', { headers: { cookie: b } })).data.user.labIds[0]
    const id = (await api(s.url, '/api/v1/datasets', { method: 'POST', headers: { cookie: b }, json: { labId: labB, title: 'SMILES probe' } })).data.id
    const csv = readFileSync(join(ROOT, 'tests/fixtures/deposit/good.csv'), 'utf8').split(/\r?\n/).filter(Boolean)
    const header = csv[0]!.split(',')
    const rows = csv.slice(1).map(l => l.split(','))
    const withSmiles = [[...header, 'donor_smiles'].join(','), ...rows.map((r, i) => [...r, i === 1 ? 'C1CC(' : 'CCO'].join(','))].join('\n')
    const form = new FormData()
    form.append('file', new Blob([withSmiles]), 'smiles.csv')
    const up = await (await fetch(`${s.url}/api/v1/datasets/${id}/uploads/check`, { method: 'POST', body: form, headers: { cookie: b } })).json() as any
    expect(up.upload).toBeNull()
    expect(up.issues).toEqual([expect.objectContaining({ row: 3, column: 'donor_smiles', path: '/system/donor/smiles', message: expect.stringMatching(/^donor SMILES "C1CC\(" is not a valid structure/) })])
    expect(up.acceptedCount).toBe(rows.length - 1)
    const good = (await api(s.url, `/api/v1/records/${(await search('q=triethylamine&pageSize=1')).items[0].id}`)).data.data
    const bad = await api(s.url, `/api/v1/datasets/${id}/records`, { method: 'POST', headers: { cookie: b }, json: { records: [good, { ...good, system: { ...good.system, acceptor: { name: 'x', smiles: 'not a smiles' } } }] } })
    expect(bad.status).toBe(422)
    expect(bad.data.data.issues).toEqual([expect.objectContaining({ path: '/records/1/system/acceptor/smiles', message: expect.stringMatching(/acceptor SMILES "not a smiles" is not a valid structure/) })])
    expect((await search('q=smiles probe', b)).total).toBe(0) // neither request wrote a record
  })
})
