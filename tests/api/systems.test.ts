/**
 * Systems measured by several labs: the demo's invented round-robin (three labs, four dyads, two replicates each, one
 * lab 40× off on one dyad) must come out as four systems with consensus, exactly one of them flagged.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { api, DEMO, signIn, startServer, type TestServer } from '../helpers/server'
import { DISCREPANCY_Z, dersimonianLaird } from '../../shared/stats/consensus'

let s: TestServer
beforeAll(async () => { s = await startServer({ seed: true }) }, 90_000)
afterAll(async () => { await s?.stop() })

describe('systems', () => {
  it('lists the round-robin dyads as systems of three labs, one with a discrepancy', async () => {
    const r = await api(s.url, '/api/v1/systems?q=xylylene')
    expect(r.status).toBe(200)
    expect(r.data.total).toBe(4)
    for (const sys of r.data.items) {
      expect(sys).toMatchObject({ labCount: 3, recordCount: 6, bridge: 'xylylene', process: 'charge-separation', temperatureK: 298.2 })
      expect(sys.consensus.i2).toBeGreaterThanOrEqual(0)
    }
    const flagged = r.data.items.filter((x: any) => x.discrepant)
    expect(flagged.map((x: any) => [x.donor, x.medium])).toEqual([['H2P', 'benzonitrile']])
    expect((await api(s.url, '/api/v1/systems?q=h2p+benzonitrile+xylylene')).data.total).toBe(1)
    expect((await api(s.url, '/api/v1/systems?q=xylylene&discrepant=true')).data.total).toBe(1)
  })
  it('a system\'s records carry σ, z and the flag; the consensus is the DerSimonian–Laird mean of those records', async () => {
    const list = (await api(s.url, '/api/v1/systems?q=h2p+benzonitrile+xylylene')).data.items
    const d = (await api(s.url, `/api/v1/systems/${list[0].key}`)).data
    expect(d.records).toHaveLength(6)
    const off = d.records.filter((x: any) => x.discrepant)
    expect(off.map((x: any) => x.labName)).toEqual(['Delacombe Bio-ET Lab', 'Delacombe Bio-ET Lab'])
    for (const x of off) expect(Math.abs(x.z)).toBeGreaterThan(DISCREPANCY_Z)
    const c = dersimonianLaird(d.records.map((x: any) => ({ y: x.log10Rate, sigma: x.log10RateSigma })))
    expect(d.consensus.log10Rate).toBeCloseTo(c.mean, 12)
    expect(d.consensus.tau).toBeCloseTo(c.tau, 12)
    // about 40× (1.6 in log10) between the flagged lab and the others
    const others = d.records.filter((x: any) => !x.discrepant).map((x: any) => x.log10Rate)
    const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length
    expect(mean(off.map((x: any) => x.log10Rate)) - mean(others)).toBeGreaterThan(1.3)
    // each record links to its dataset, published with an identifier
    for (const x of d.records) expect(x.doi).toMatch(/^10\.99999\//)
  })
  it('answers 404 for an unknown key and 422 for bad parameters, by name', async () => {
    expect((await api(s.url, '/api/v1/systems/0000000000000000')).status).toBe(404)
    expect((await api(s.url, '/api/v1/systems/not-a-key')).status).toBe(404)
    const bad = await api(s.url, '/api/v1/systems?minLabs=0')
    expect(bad.status).toBe(422)
    expect(bad.data.data.issues[0].path).toBe('/minLabs')
  })
  it('a curator\'s synonym makes a differently named submission match a published system, and its z shows on review', async () => {
    const a = await signIn(s.url, DEMO.contributorA)
    const curator = await signIn(s.url, DEMO.curatorB)
    const labA = (await api(s.url, '/api/v1/me', { headers: { cookie: a } })).data.user.labIds[0]
    const id = (await api(s.url, '/api/v1/datasets', { method: 'POST', headers: { cookie: a }, json: { labId: labA, title: 'Renamed dyad (demo)' } })).data.id
    const sys = (await api(s.url, '/api/v1/systems?q=h2p+toluene+xylylene')).data.items[0]
    const ref = (await api(s.url, `/api/v1/systems/${sys.key}`)).data.records[0]
    const record = (await api(s.url, `/api/v1/records/${ref.id}`)).data.data
    record.system.donor.name = 'H₂-porphyrin (free base)' // what this lab calls H2P
    expect((await api(s.url, `/api/v1/datasets/${id}/records`, { method: 'POST', headers: { cookie: a }, json: { records: [record] } })).status).toBe(201)
    expect((await api(s.url, `/api/v1/datasets/${id}/submit`, { method: 'POST', headers: { cookie: a } })).status).toBe(200)
    const before = (await api(s.url, `/api/v1/review/${id}`, { headers: { cookie: curator } })).data.systemMatches
    expect(before).toEqual([])
    // contributors may not declare synonyms; a curator may, and the name is stored normalised
    expect((await api(s.url, '/api/v1/species-synonyms', { method: 'POST', headers: { cookie: a }, json: { alias: 'H₂-porphyrin (free base)', canonical: 'H2P' } })).status).toBe(403)
    const add = await api(s.url, '/api/v1/species-synonyms', { method: 'POST', headers: { cookie: curator }, json: { alias: 'H₂-porphyrin (free base)', canonical: 'H2P' } })
    expect(add.status).toBe(201)
    expect(add.data).toMatchObject({ alias: 'h2porphyrinfreebase', canonical: 'h2p' }) // NFKC turns ₂ into 2
    expect((await api(s.url, '/api/v1/species-synonyms', { method: 'POST', headers: { cookie: curator }, json: { alias: 'H2-porphyrin, free base', canonical: 'ZnP' } })).status).toBe(409)
    expect((await api(s.url, '/api/v1/species-synonyms', { method: 'POST', headers: { cookie: curator }, json: { alias: 'N,N-DMA', canonical: 'n n dma' } })).status).toBe(422)
    const after = (await api(s.url, `/api/v1/review/${id}`, { headers: { cookie: curator } })).data.systemMatches
    expect(after).toHaveLength(1)
    expect(after[0]).toMatchObject({ key: sys.key, discrepant: false })
    expect(Math.abs(after[0].z)).toBeLessThan(3) // the same value, so close to the consensus
    // removing it undoes the match
    await api(s.url, `/api/v1/species-synonyms/${add.data.id}`, { method: 'DELETE', headers: { cookie: curator } })
    expect((await api(s.url, `/api/v1/review/${id}`, { headers: { cookie: curator } })).data.systemMatches).toEqual([])
  })
  it('a structure string identifies the species: same SMILES under another name is the same system', async () => {
    const a = await signIn(s.url, DEMO.contributorA)
    const curator = await signIn(s.url, DEMO.curatorB)
    // a published record of another lab whose donor gives SMILES (the demo's ordinary molecules do)
    const hits = (await api(s.url, '/api/v1/records?q=triethylamine&pageSize=50')).data.items.filter((r: any) => r.labName !== 'Faulkwood Ultrafast Lab')
    expect(hits.length).toBeGreaterThan(0)
    const record = (await api(s.url, `/api/v1/records/${hits[0].id}`)).data.data
    expect(record.system.donor.smiles).toBeTruthy()
    record.system.donor.name = 'TEA (our stock)' // no name rule would merge this
    const labA = (await api(s.url, '/api/v1/me', { headers: { cookie: a } })).data.user.labIds[0]
    const id = (await api(s.url, '/api/v1/datasets', { method: 'POST', headers: { cookie: a }, json: { labId: labA, title: 'Same amine, other name (demo)' } })).data.id
    expect((await api(s.url, `/api/v1/datasets/${id}/records`, { method: 'POST', headers: { cookie: a }, json: { records: [record] } })).status).toBe(201)
    expect((await api(s.url, `/api/v1/datasets/${id}/submit`, { method: 'POST', headers: { cookie: a } })).status).toBe(200)
    const matches = (await api(s.url, `/api/v1/review/${id}`, { headers: { cookie: curator } })).data.systemMatches
    expect(matches).toHaveLength(1)
    // without the SMILES only the name is left, and it matches nothing
    const id2 = (await api(s.url, '/api/v1/datasets', { method: 'POST', headers: { cookie: a }, json: { labId: labA, title: 'Same amine, no structure (demo)' } })).data.id
    delete record.system.donor.smiles
    await api(s.url, `/api/v1/datasets/${id2}/records`, { method: 'POST', headers: { cookie: a }, json: { records: [record] } })
    await api(s.url, `/api/v1/datasets/${id2}/submit`, { method: 'POST', headers: { cookie: a } })
    expect((await api(s.url, `/api/v1/review/${id2}`, { headers: { cookie: curator } })).data.systemMatches).toEqual([])
  })
})
