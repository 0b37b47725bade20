/**
 * Decay traces over HTTP: attach (every bad row named, nothing kept), fit (the same numbers as SciPy on the same
 * trace, tests/fixtures/kinetics/decay-scipy.json), take a record's rate from the fit with a reference trace
 * (k_ET = 1/τ − 1/τ_ref, first-order error propagation), see a stated rate that disagrees flagged, submit, the
 * curator's view, and the published bundle carrying the trace files under their checksums.
 */
import { createHash } from 'node:crypto'
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import AdmZip from 'adm-zip'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { api, DEMO, ROOT, signIn, startServer, type TestServer } from '../helpers/server'

const ref = JSON.parse(readFileSync(join(ROOT, 'tests/fixtures/kinetics/decay-scipy.json'), 'utf8'))
const irfCase = ref.cases.find((c: any) => c.name === 'mono, Gaussian IRF fitted')
const refCase = ref.cases.find((c: any) => c.name === 'mono, counts, no IRF')
const csv = (c: { times: number[], signal: number[] }) =>
  'time (ns),counts\n' + c.times.map((t, i) => `${t},${c.signal[i]}`).join('\n') + '\n'
const sha = (s: string) => createHash('sha256').update(s).digest('hex')

let s: TestServer
const c: Record<string, string> = {}
let id = 0
let recordId = 0
const traceIds: Record<string, number> = {}

async function attach (name: string, body: string, query = 'timeUnit=ns&signal=emission&wavelengthNm=650', cookie = c.a!) {
  const form = new FormData()
  form.append('file', new Blob([body]), name)
  const r = await fetch(`${s.url}/api/v1/datasets/${id}/traces?${query}`, { method: 'POST', body: form, headers: { cookie } })
  return { status: r.status, data: (await r.json()) as any }
}

beforeAll(async () => {
  s = await startServer({ seed: true })
  c.a = await signIn(s.url, DEMO.contributorA)
  c.curatorB = await signIn(s.url, DEMO.curatorB)
  const labA = (await api(s.url, '/api/v1/me', { headers: { cookie: c.a } })).data.user.labIds[0]
  id = (
    await api(s.url, '/api/v1/datasets', {
      method: 'POST',
      headers: { cookie: c.a },
      json: { labId: labA, title: 'Traces under test' }
    })
  ).data.id
  const first = (await api(s.url, '/api/v1/records?pageSize=1')).data.items[0].id
  const record = (await api(s.url, `/api/v1/records/${first}`)).data.data
  const added = await api(s.url, `/api/v1/datasets/${id}/records`, {
    method: 'POST',
    headers: { cookie: c.a },
    json: { records: [record] }
  })
  expect(added.status).toBe(201)
  recordId = (await api(s.url, `/api/v1/datasets/${id}/versions/1`, { headers: { cookie: c.a } })).data.records[0].id
  await api(s.url, `/api/v1/datasets/${id}`, {
    method: 'PATCH',
    headers: { cookie: c.a },
    json: {
      creators: [{ name: 'Faulkwood, Imre', nameType: 'Personal', familyName: 'Faulkwood', givenName: 'Imre' }],
      keywords: ['demo']
    }
  })
}, 90_000)
afterAll(async () => {
  await s?.stop()
})

describe('attaching traces', () => {
  it('keeps a trace with its sha256; the same file again is the same trace', async () => {
    const body = csv(irfCase)
    const r = await attach('donor-acceptor.csv', body)
    expect(r.status).toBe(201)
    expect(r.data.trace).toMatchObject({
      name: 'donor-acceptor.csv',
      sha256: sha(body),
      points: irfCase.times.length,
      timeUnit: 'ns',
      signal: 'emission',
      wavelengthNm: 650,
      hasSigma: false
    })
    traceIds.main = r.data.trace.id
    const again = await attach('copy.csv', body)
    expect(again.status).toBe(200)
    expect(again.data).toMatchObject({ existing: true, trace: { id: traceIds.main } })
    traceIds.ref = (await attach('donor-only.csv', csv(refCase))).data.trace.id
  })
  it('names every bad row and keeps nothing', async () => {
    const before = (await api(s.url, `/api/v1/datasets/${id}/traces`, { headers: { cookie: c.a } })).data.items.length
    const rows = Array.from({ length: 20 }, (_, i) => `${i * 0.5},${1000 - i}`)
    rows[7] = '3.5,abc'
    ;[rows[12], rows[13]] = [rows[13]!, rows[12]!]
    const bad = await attach('bad.csv', 'time,signal\n' + rows.join('\n'))
    expect(bad.status).toBe(422)
    const issues = bad.data.data.issues
    expect(issues).toEqual(
      expect.arrayContaining([
        expect.objectContaining({ row: 9, column: 'signal', message: expect.stringContaining('"abc" is not a finite number') }),
        expect.objectContaining({ row: 15, column: 'time', message: expect.stringContaining('sort the trace') })
      ])
    )
    const huge = await attach('huge.csv', Array.from({ length: 100_001 }, (_, i) => `${i},${i % 7}`).join('\n'))
    expect(huge.status).toBe(413)
    expect(huge.data.message).toMatch(/at most 100,000/)
    const noUnit = await attach('x.csv', csv(refCase), 'signal=emission')
    expect(noUnit.status).toBe(422)
    expect(JSON.stringify(noUnit.data.data.issues)).toMatch(/timeUnit/)
    expect((await attach('x.json', '[]')).status).toBe(415)
    expect((await api(s.url, `/api/v1/datasets/${id}/traces`, { headers: { cookie: c.a } })).data.items.length).toBe(before)
  })
  it('a draft\'s trace is its lab\'s: a visitor gets 404', async () => {
    expect((await api(s.url, `/api/v1/traces/${traceIds.main}`)).status).toBe(404)
    const mine = await api(s.url, `/api/v1/traces/${traceIds.main}`, { headers: { cookie: c.a } })
    expect(mine.data.data.times).toHaveLength(irfCase.times.length)
    expect(mine.data.signal).toBe('emission')
  })
})

describe('fitting', () => {
  it('a stored trace fits to SciPy\'s lifetime and error', async () => {
    const r = await api(s.url, `/api/v1/traces/${traceIds.main}/fit`, {
      method: 'POST',
      headers: { cookie: c.a },
      json: { model: 'mono', irf: { kind: 'gaussian' } }
    })
    expect(r.status).toBe(200)
    expect(r.data.weighting).toBe('poisson') // emission counts without σ
    expect(r.data.status).toBe('converged')
    expect(Math.abs(r.data.parameters.tau1.value / irfCase.scipy.tau1.value - 1)).toBeLessThan(0.01)
    expect(Math.abs(r.data.parameters.tau1.stderr / irfCase.scipy.tau1.stderr - 1)).toBeLessThan(0.1)
  })
  it('the stateless route takes the data in the body; hostile bodies get 4xx by name', async () => {
    const ok = await api(s.url, '/api/v1/model/decay-fit', {
      method: 'POST',
      json: { model: 'mono', times: refCase.times, signal: refCase.signal, timeUnit: 'ns', weighting: 'poisson' }
    })
    expect(ok.status).toBe(200)
    expect(Math.abs(ok.data.lifetimes[0].value / refCase.scipy.tau1.value - 1)).toBeLessThan(0.01)
    const t = refCase.times.slice()
    t[30] = t[29] - 1
    const unsorted = await api(s.url, '/api/v1/model/decay-fit', {
      method: 'POST',
      json: { model: 'mono', times: t, signal: refCase.signal, timeUnit: 'ns' }
    })
    expect(unsorted.status).toBe(422)
    expect(unsorted.data.data.issues[0].path).toBe('/times/30')
    const flat = await api(s.url, '/api/v1/model/decay-fit', {
      method: 'POST',
      json: { model: 'mono', times: refCase.times, signal: refCase.times.map(() => 7), timeUnit: 'ns' }
    })
    expect(flat.status).toBe(422)
    expect(flat.data.message).toMatch(/constant/)
    const nan = await fetch(`${s.url}/api/v1/model/decay-fit`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: `{"model":"mono","timeUnit":"ns","times":[${refCase.times.join(',')}],"signal":[NaN${',1'.repeat(refCase.times.length - 1)}]}`
    })
    expect(nan.status).toBe(400)
    // ten million points: refused while the body arrives (16 MB cap), never parsed
    const big = `{"model":"mono","timeUnit":"ns","times":[${'1,'.repeat(10_000_000)}1]}`
    const huge = await fetch(`${s.url}/api/v1/model/decay-fit`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: big
    })
    expect(huge.status).toBe(413)
    expect((await api(s.url, '/api/v1/health')).status).toBe(200)
  })
})

describe('a record\'s rate from its traces', () => {
  it('k_ET = 1/τ − 1/τ_ref with propagated error, the traces and fits kept as provenance', async () => {
    const r = await api(s.url, `/api/v1/datasets/${id}/records/${recordId}/rate-from-trace`, {
      method: 'POST',
      headers: { cookie: c.a },
      json: {
        traceId: traceIds.main,
        fit: { model: 'mono', irf: { kind: 'gaussian' } },
        reference: { traceId: traceIds.ref, fit: { model: 'mono' } }
      }
    })
    expect(r.status, JSON.stringify(r.data).slice(0, 300)).toBe(200)
    const tau = irfCase.scipy.tau1
    const tauRef = refCase.scipy.tau1
    const k = 1 / (tau.value * 1e-9) - 1 / (tauRef.value * 1e-9)
    const u = Math.hypot((tau.stderr * 1e-9) / (tau.value * 1e-9) ** 2, (tauRef.stderr * 1e-9) / (tauRef.value * 1e-9) ** 2)
    expect(Math.abs(r.data.rate.value / k - 1)).toBeLessThan(0.01)
    expect(Math.abs(r.data.rate.uncertainty / u - 1)).toBeLessThan(0.1)
    expect(r.data.rate).toMatchObject({ kind: 'unimolecular', method: 'lifetimes' })
    expect(r.data.provenance).toMatchObject({
      derivation: 'k_ET = 1/τ − 1/τ_ref',
      trace: { sha256: sha(csv(irfCase)), timeUnit: 'ns', signal: 'emission', wavelengthNm: 650, points: irfCase.times.length },
      reference: { sha256: sha(csv(refCase)) },
      fit: { model: 'mono', irf: 'gaussian', weighting: 'poisson', component: 'tau1', status: 'converged' }
    })
    const rec = await api(s.url, `/api/v1/records/${recordId}`, { headers: { cookie: c.a } })
    expect(rec.data.data.provenance.fit.parameters.tau1.value).toBeCloseTo(r.data.provenance.fit.parameters.tau1.value, 12)
    expect(rec.data.provenance).toMatchObject({
      traceId: traceIds.main,
      referenceTraceId: traceIds.ref,
      check: { disagrees: false }
    })
  })
  it('a stated rate the fit does not give is flagged', async () => {
    const rec = (await api(s.url, `/api/v1/records/${recordId}`, { headers: { cookie: c.a } })).data.data
    const wrong = {
      ...rec,
      rate: { ...rec.rate, value: rec.rate.value * 3, lifetimeS: undefined, referenceLifetimeS: undefined, method: 'direct' }
    }
    delete wrong.rate.lifetimeS
    delete wrong.rate.referenceLifetimeS
    expect(
      (
        await api(s.url, `/api/v1/datasets/${id}/records/${recordId}`, {
          method: 'PUT',
          headers: { cookie: c.a },
          json: { record: wrong }
        })
      ).status
    ).toBe(200)
    const after = await api(s.url, `/api/v1/records/${recordId}`, { headers: { cookie: c.a } })
    expect(after.data.provenance.check.disagrees).toBe(true)
    expect(after.data.provenance.check.z).toBeGreaterThan(2)
  })
  it('a reference slower than the trace gives no rate; a stalled or missing component is refused by name', async () => {
    const swapped = await api(s.url, `/api/v1/datasets/${id}/records/${recordId}/rate-from-trace`, {
      method: 'POST',
      headers: { cookie: c.a },
      json: {
        traceId: traceIds.ref,
        fit: { model: 'mono' },
        reference: { traceId: traceIds.main, fit: { model: 'mono', irf: { kind: 'gaussian' } } }
      }
    })
    expect(swapped.status).toBe(422)
    expect(swapped.data.message).toMatch(/not shorter than τ_ref/)
    const noTau2 = await api(s.url, `/api/v1/datasets/${id}/records/${recordId}/rate-from-trace`, {
      method: 'POST',
      headers: { cookie: c.a },
      json: { traceId: traceIds.ref, fit: { model: 'mono' }, component: 'tau2' }
    })
    expect(noTau2.status).toBe(422)
    expect(noTau2.data.data.issues[0].path).toBe('/component')
  })
  it('submitted, the curator sees the traces; published, the bundle carries them under their checksums', async () => {
    // take the rate again: stated and fitted agree
    await api(s.url, `/api/v1/datasets/${id}/records/${recordId}/rate-from-trace`, {
      method: 'POST',
      headers: { cookie: c.a },
      json: {
        traceId: traceIds.main,
        fit: { model: 'mono', irf: { kind: 'gaussian' } },
        reference: { traceId: traceIds.ref, fit: { model: 'mono' } }
      }
    })
    expect((await api(s.url, `/api/v1/datasets/${id}/submit`, { method: 'POST', headers: { cookie: c.a } })).status).toBe(200)
    const view = (await api(s.url, `/api/v1/review/${id}`, { headers: { cookie: c.curatorB } })).data
    expect(view.traceChecks).toEqual([
      expect.objectContaining({
        recordId,
        traceId: traceIds.main,
        referenceTraceId: traceIds.ref,
        check: expect.objectContaining({ disagrees: false })
      })
    ])
    // the curator may read the submitted dataset's trace
    expect((await api(s.url, `/api/v1/traces/${traceIds.main}`, { headers: { cookie: c.curatorB } })).status).toBe(200)
    const ok = await api(s.url, `/api/v1/review/${id}/accept`, {
      method: 'POST',
      headers: { cookie: c.curatorB },
      json: { expectedUpdatedAt: view.version.updatedAt }
    })
    expect(ok.status).toBe(200)
    expect((await api(s.url, `/api/v1/traces/${traceIds.main}`)).status).toBe(200) // published: public
    const zip = new AdmZip(Buffer.from(await (await fetch(`${s.url}/api/v1/datasets/${id}/bundle`)).arrayBuffer()))
    const names = zip.getEntries().map(e => e.entryName)
    const manifest = zip
      .getEntries()
      .find(e => e.entryName.endsWith('/manifest-sha256.txt'))!
      .getData()
      .toString()
    for (const body of [csv(irfCase), csv(refCase)]) {
      const h = sha(body)
      const entry = zip.getEntries().find(e => e.entryName.endsWith(`data/traces/${h}.csv`))
      expect(entry, names.join(' ')).toBeDefined()
      expect(entry!.getData().toString()).toBe(body)
      expect(manifest).toContain(`${h}  data/traces/${h}.csv`)
    }
  })
})
