import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { api, startServer, type TestServer } from '../helpers/server'
import { semiclassicalLog10Rates, classicalLog10Rates } from '../../shared/physics'

let s: TestServer
beforeAll(async () => { s = await startServer() })
afterAll(async () => { await s?.stop() })

const sc = { model: 'semiclassical', temperatureK: 298.15, lambdaSolvent: 0.6, lambdaInternal: 0.3, vibrationEnergy: 0.18, coupling: 0.005 }

describe('POST /api/v1/model/curve', () => {
  it('returns the names the public API binds (README, /_openapi.json) and the same numbers as the science core', async () => {
    const dg = [-1.2, -0.5, 0.1]
    const r = await api(s.url, '/api/v1/model/curve', { method: 'POST', json: { ...sc, drivingForces: dg } })
    expect(r.status).toBe(200)
    const ref = semiclassicalLog10Rates(dg, { lambdaSolvent: 0.6, lambdaInternal: 0.3, vibrationEnergy: 0.18, coupling: 0.005, temperatureK: 298.15 })
    expect(r.data.termsUsed).toBe(ref.termsUsed)
    r.data.points.forEach((p: { deltaG: number, rate: number, log10Rate: number }, i: number) => {
      expect(p.deltaG).toBe(dg[i])
      expect(p.log10Rate).toBe(ref.log10Rate[i])
      expect(Math.log10(p.rate)).toBeCloseTo(p.log10Rate, 10)
    })
  })
  it('classical takes lambdaTotal, or lambdaSolvent + lambdaInternal added', async () => {
    const a = await api(s.url, '/api/v1/model/curve', { method: 'POST', json: { model: 'classical', temperatureK: 298.15, lambdaTotal: 0.9, coupling: 0.005, drivingForces: [-0.9, 0] } })
    const b = await api(s.url, '/api/v1/model/curve', { method: 'POST', json: { model: 'classical', temperatureK: 298.15, lambdaSolvent: 0.6, lambdaInternal: 0.3, coupling: 0.005, drivingForces: [-0.9, 0] } })
    expect(a.status).toBe(200)
    // 0.6 + 0.3 is 0.8999999999999999 in binary floating point, so compare to 12 digits
    b.data.points.forEach((p: { log10Rate: number }, i: number) => expect(p.log10Rate).toBeCloseTo(a.data.points[i].log10Rate, 12))
    expect(a.data.points[0].log10Rate).toBe(classicalLog10Rates([-0.9], { lambdaTotal: 0.9, coupling: 0.005, temperatureK: 298.15 }).log10Rate[0])
  })
  it('deep inverted region at 77 K: rate underflows to 0 but log10Rate stays finite', async () => {
    // classical, λ 0.1 eV, 77 K, ΔG° −3.5 eV: exponent −(3.4)²/(4·0.1·k_B·77) ≈ −4353 (ln) → log10 k ≈ −1880
    const r = await api(s.url, '/api/v1/model/curve', { method: 'POST', json: { model: 'classical', temperatureK: 77, lambdaTotal: 0.1, coupling: 0.005, drivingForces: [-3.5] } })
    expect(r.status).toBe(200)
    expect(Number.isFinite(r.data.points[0].log10Rate)).toBe(true)
    expect(r.data.points[0].log10Rate).toBeLessThan(-1800)
    expect(r.data.points[0].rate).toBe(0)
  })
  it.each([
    ['λ ≤ 0 and T ≤ 0, every field named', { ...sc, lambdaSolvent: 0, temperatureK: -1, drivingForces: [0] }, ['/temperatureK', '/lambdaSolvent']],
    ['a non-finite number (1e999 parses to Infinity)', '{"model":"semiclassical","temperatureK":298.15,"lambdaSolvent":0.6,"lambdaInternal":0.3,"vibrationEnergy":0.18,"coupling":0.005,"drivingForces":[0,1e999]}', ['/drivingForces/1']],
    ['a string where a number belongs', { ...sc, drivingForces: [0, 'x'] }, ['/drivingForces/1']],
    ['too many points', { ...sc, drivingForces: new Array(100_001).fill(0) }, ['/drivingForces']],
    ['a missing parameter of the chosen model', { model: 'semiclassical', temperatureK: 300, coupling: 0.01, lambdaSolvent: 0.5, drivingForces: [0] }, ['/lambdaInternal', '/vibrationEnergy']],
    ['an unknown model and an unknown field', { ...sc, model: 'quantum', colour: 'red', drivingForces: [0] }, ['/model', '/colour']]
  ])('422 with a JSON pointer for %s', async (_name, body, paths) => {
    const r = typeof body === 'string'
      ? await api(s.url, '/api/v1/model/curve', { method: 'POST', body, headers: { 'content-type': 'application/json' } })
      : await api(s.url, '/api/v1/model/curve', { method: 'POST', json: body })
    expect(r.status).toBe(422)
    const got = r.data.data.issues.map((i: { path: string }) => i.path)
    for (const p of paths) expect(got).toContain(p)
    for (const i of r.data.data.issues) expect(i.message.length).toBeGreaterThan(3)
  })
  it('400 for a body that is not JSON', async () => {
    const r = await api(s.url, '/api/v1/model/curve', { method: 'POST', body: '{"model":', headers: { 'content-type': 'application/json' } })
    expect(r.status).toBe(400)
  })
})

describe('POST /api/v1/model/fit', () => {
  it('fits λ_s and V with the others fixed, with the response names the public API binds', async () => {
    const truth = { lambdaSolvent: 0.745, lambdaInternal: 0.4, vibrationEnergy: 0.186, coupling: 0.00419, temperatureK: 295 }
    const dg = Array.from({ length: 20 }, (_, i) => -2 + 0.1 * i)
    const y = semiclassicalLog10Rates(dg, truth).log10Rate
    const wiggle = (i: number) => 0.05 * Math.sin(i * 2.7)
    const body = { model: 'semiclassical', temperatureK: 295, points: dg.map((d, i) => ({ deltaG: d, log10Rate: y[i]! + wiggle(i), log10RateUncertainty: 0.1 })), fixed: { lambdaInternal: 0.4, vibrationEnergy: 0.186 }, initial: { lambdaSolvent: 0.5, coupling: 0.01 } }
    const r = await api(s.url, '/api/v1/model/fit', { method: 'POST', json: body })
    expect(r.status).toBe(200)
    expect(r.data.converged).toBe(true)
    expect(r.data.parameters.lambdaSolvent.value).toBeCloseTo(0.745, 1)
    expect(Math.abs(r.data.parameters.lambdaSolvent.value - 0.745)).toBeLessThan(3 * r.data.parameters.lambdaSolvent.stderr)
    expect(r.data.parameters.coupling.log10Stderr).toBeGreaterThan(0)
    expect(r.data.residuals).toHaveLength(20)
    expect(typeof r.data.chiSquaredReduced).toBe('number')
  })
  it('takes temperatureK per point (the fit request schema) and answers status and atBound', async () => {
    const Ts = [250, 275, 300, 325]
    const points = [-1.3, -0.9, -0.6, -0.3].flatMap(d => Ts.map(T => ({ deltaG: d, temperatureK: T, log10Rate: classicalLog10Rates([d], { lambdaTotal: 1.1, coupling: 0.002, temperatureK: T }).log10Rate[0]! })))
    const r = await api(s.url, '/api/v1/model/fit', { method: 'POST', json: { model: 'classical', temperatureK: 298.15, points } })
    expect(r.status).toBe(200)
    expect(r.data.status).toBe('converged')
    expect(r.data.atBound).toEqual([])
    expect(r.data.temperatureRangeK).toEqual([250, 325])
    expect(r.data.parameters.lambdaTotal.value).toBeCloseTo(1.1, 5)
  })
  it('422 for an under-determined fit, with the reason', async () => {
    const r = await api(s.url, '/api/v1/model/fit', { method: 'POST', json: { model: 'classical', temperatureK: 295, points: [{ deltaG: -1, log10Rate: 9 }] } })
    expect(r.status).toBe(422)
    expect(r.data.message).toBe('Under-determined fit: 1 point for 2 free parameters; fix parameters or add points')
    expect(r.data.data.issues[0].path).toBe('/points')
  })
  it('422 naming each bad point field', async () => {
    const r = await api(s.url, '/api/v1/model/fit', { method: 'POST', json: { model: 'classical', temperatureK: 0, points: [{ deltaG: 'a', log10Rate: 9 }, { log10Rate: 9 }], fixed: { lambdaFoo: 1 } } })
    expect(r.status).toBe(422)
    const paths = r.data.data.issues.map((i: { path: string }) => i.path)
    expect(paths).toEqual(expect.arrayContaining(['/temperatureK', '/points/0/deltaG', '/points/1/deltaG', '/fixed/lambdaFoo']))
  })
})
