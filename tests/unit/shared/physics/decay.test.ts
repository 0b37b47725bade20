/**
 * Decay fits against an independent library: SciPy's curve_fit on the same synthetic traces
 * (scripts/reference/decay_scipy.py → tests/fixtures/kinetics/decay-scipy.json: mono and bi, with and without a
 * Gaussian response, a lifetime near and below the response width, a measured response, Poisson, given and no
 * weights). Lifetimes must agree within 1 % and standard errors within 10 %; the closed-form Gaussian
 * convolution must agree with NumPy's numerical convolution; hostile traces are refused by name.
 */
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { fitDecay, type DecayFitRequest } from '../../../../shared/physics/decay-fit'
import { boxExp, decayCurve, FWHM_PER_SIGMA, gaussianExp, irfHistogram } from '../../../../shared/physics/decay'
import { PhysicsInputError } from '../../../../shared/physics/errors'

const ref = JSON.parse(readFileSync(join(__dirname, '../../../fixtures/kinetics/decay-scipy.json'), 'utf8'))
interface Case {
  name: string
  model: 'mono' | 'bi'
  irf: 'none' | 'gaussian' | 'measured'
  weighting: 'poisson' | 'given' | 'none'
  times: number[]
  signal: number[]
  sigma?: number[]
  irfFwhm?: number
  irfTrace?: { times: number[], signal: number[] }
  scipy: Record<string, { value: number, stderr: number }>
}
const requestOf = (c: Case): DecayFitRequest => ({
  model: c.model,
  times: c.times,
  signal: c.signal,
  sigma: c.sigma,
  timeUnit: 'ns',
  weighting: c.weighting,
  irf:
    c.irf === 'gaussian'
      ? { kind: 'gaussian', fwhm: c.irfFwhm }
      : c.irf === 'measured'
        ? { kind: 'measured', ...c.irfTrace! }
        : { kind: 'none' }
})

describe(`decay fits agree with ${ref.source}`, () => {
  it.each(ref.cases as Case[])('$name', (c) => {
    const r = fitDecay(requestOf(c))
    expect(r.status).toBe('converged')
    for (const [k, s] of Object.entries(c.scipy)) {
      const mine = r.parameters[k as keyof typeof r.parameters]!
      if (k.startsWith('tau')) expect(Math.abs(mine.value / s.value - 1), `${k}`).toBeLessThan(0.01)
      // every other parameter within a tenth of SciPy's standard error
      else expect(Math.abs(mine.value - s.value), `${k}`).toBeLessThan(0.1 * s.stderr)
      expect(mine.stderr, `${k} stderr`).not.toBeNull()
      expect(Math.abs(mine.stderr! / s.stderr - 1), `${k} stderr`).toBeLessThan(0.1)
    }
    expect(r.uncertaintyKind).toBe(c.weighting === 'none' ? 'scaled' : 'absolute')
    // the rate of each lifetime: 1/τ in s⁻¹, error σ_τ/τ² (first-order propagation)
    const l = r.lifetimes[0]!
    expect(l.rate.value).toBeCloseTo(1 / (l.value * 1e-9), -3)
    expect(l.rate.stderr! / l.rate.value).toBeCloseTo(l.stderr! / l.value, 10)
  })
})

describe('Gaussian response in closed form', () => {
  it.each(ref.convolution as { tau: number, fwhm: number, times: number[], numerical: number[], closedForm: number[] }[])(
    'τ = $tau, FWHM = $fwhm: the erfc/erfcx form matches numerical convolution (NumPy) and SciPy\'s erfcx',
    ({ tau, fwhm, times, numerical, closedForm }) => {
      const sigma = fwhm / FWHM_PER_SIGMA
      const peak = Math.max(...numerical)
      times.forEach((u, i) => {
        const mine = gaussianExp(u, tau, sigma)
        expect(Math.abs(mine - numerical[i]!)).toBeLessThan(2e-3 * peak)
        expect(Math.abs(mine - closedForm[i]!)).toBeLessThan(1e-12 + 1e-9 * Math.abs(closedForm[i]!))
      })
    }
  )
  it('far before time zero the form neither overflows nor loses the tail (erfcx branch)', () => {
    const v = gaussianExp(-50, 0.001, 0.1)
    expect(Number.isFinite(v)).toBe(true)
    expect(v).toBeGreaterThanOrEqual(0)
    expect(gaussianExp(1e4, 1, 0.1)).toBe(0)
  })
})

describe('measured response in one pass', () => {
  it('equals the direct sum of every box (boxExp) on an uneven grid, at every time', () => {
    const s = [-0.5, -0.3, -0.2, -0.05, 0, 0.1, 0.25, 0.6, 0.7, 1.2]
    const sig = [0, 2, 5, 9, 10, 7, 4, 2, 1, 0.5]
    const H = irfHistogram(s, sig)
    const t = Array.from({ length: 300 }, (_, i) => -1 + i * 0.03)
    const p = { a1: 3, tau1: 0.4, a2: 1, tau2: 2.5, offset: 0.1, t0: 0.2, irfFwhm: 0 }
    const out = new Float64Array(t.length)
    decayCurve('bi', 'measured', p, t, out, H)
    t.forEach((ti, i) => {
      let direct = p.offset
      for (const [a, tau] of [
        [p.a1, p.tau1],
        [p.a2, p.tau2]
      ] as const) {
        for (let j = 0; j < H.w.length; j++) direct += a * H.w[j]! * boxExp(ti - p.t0, tau, (H.b[j]! + H.e[j]!) / 2, H.h[j]!)
      }
      expect(out[i]).toBeCloseTo(direct, 12)
    })
  })
})

describe('hostile traces get named problems', () => {
  const t = Array.from({ length: 50 }, (_, i) => i * 0.1)
  const y = t.map(v => 1000 * Math.exp(-v) + 5)
  const issues = (req: Partial<DecayFitRequest>) => {
    try {
      fitDecay({ model: 'mono', times: t, signal: y, timeUnit: 'ns', ...req } as DecayFitRequest)
    }
    catch (e) {
      expect(e).toBeInstanceOf(PhysicsInputError)
      return (e as PhysicsInputError).issues
    }
    throw new Error('no problem reported')
  }
  it('unsorted time names the point', () => {
    const u = t.slice()
    ;[u[10], u[11]] = [u[11]!, u[10]!]
    expect(issues({ times: u })).toEqual([
      { path: '/times/11', message: expect.stringMatching(/point 12 .* is not after point 11.*sort/) }
    ])
  })
  it('NaN in the signal names the point', () => {
    const s = y.slice()
    s[7] = NaN
    expect(issues({ signal: s })[0]).toMatchObject({ path: '/signal/7', message: expect.stringContaining('point 8') })
  })
  it('ten million points are refused before any work', () => {
    const big = new Array<number>(10_000_000).fill(0)
    expect(issues({ times: big, signal: big })[0]!.message).toMatch(/at most 100,000 points; it has 10,000,000/)
  })
  it('a constant signal has nothing to fit', () => {
    expect(issues({ signal: t.map(() => 3) })[0]!.message).toMatch(/constant/)
  })
  it('Poisson weights refuse negative counts; a measured response of more than 2000 samples is refused', () => {
    const s = y.slice()
    s[3] = -2
    expect(issues({ signal: s, weighting: 'poisson' })[0]!.path).toBe('/signal/3')
    const irf = {
      kind: 'measured' as const,
      times: Array.from({ length: 2001 }, (_, i) => i * 0.01),
      signal: new Array(2001).fill(1)
    }
    expect(issues({ irf })[0]).toMatchObject({
      path: '/irf/times',
      message: expect.stringMatching(/5 to 2000 samples; it has 2001/)
    })
  })
  it('a mismatched σ column and unknown parameters are named', () => {
    const found = issues({ weighting: 'given', sigma: [1, 2], fixed: { tau3: 1 } as never })
    expect(found.map(i => i.path)).toEqual(['/sigma', '/fixed/tau3'])
  })
})
