import { describe, expect, it } from 'vitest'
import { fitRates, semiclassicalLog10Rates, classicalLog10Rates, PhysicsInputError } from '../../../../shared/physics'

/** Deterministic normal deviates (mulberry32 + Box–Muller) so that the synthetic data are the same every run. */
function gaussians (seed: number) {
  let a = seed
  const u = () => { a = (a + 0x6D2B79F5) >>> 0; let t = a; t = Math.imul(t ^ (t >>> 15), t | 1); t ^= t + Math.imul(t ^ (t >>> 7), t | 61); return ((t ^ (t >>> 14)) >>> 0) / 4294967296 }
  return () => Math.sqrt(-2 * Math.log(u() + 1e-300)) * Math.cos(2 * Math.PI * u())
}

const truth = { lambdaSolvent: 0.7, lambdaInternal: 0.4, vibrationEnergy: 0.186, coupling: 0.004, temperatureK: 295 }
const dg = Array.from({ length: 28 }, (_, i) => -2.2 + 2.4 * i / 27)

describe('weighted Levenberg–Marquardt fits', () => {
  it.each([1, 2, 3, 4, 5])('recovers λ_s and V from noisy synthetic data within 3 standard errors (seed %i)', (seed) => {
    const g = gaussians(seed)
    const y = semiclassicalLog10Rates(dg, truth).log10Rate
    const points = dg.map((d, i) => ({ deltaG: d, log10Rate: y[i]! + 0.1 * g(), log10RateUncertainty: 0.1 }))
    const r = fitRates({ model: 'semiclassical', temperatureK: 295, points, fixed: { lambdaInternal: 0.4, vibrationEnergy: 0.186 } })
    const ls = r.parameters.lambdaSolvent!; const V = r.parameters.coupling!
    expect(Math.abs(ls.value - 0.7)).toBeLessThan(3 * ls.stderr!)
    expect(Math.abs(Math.log10(V.value) - Math.log10(0.004))).toBeLessThan(3 * V.log10Stderr!)
    expect(r.uncertaintyKind).toBe('absolute')
    expect(r.chiSquaredReduced!).toBeGreaterThan(0.3)
    expect(r.chiSquaredReduced!).toBeLessThan(2.5)
    expect(r.residuals).toHaveLength(28)
  })
  it('noise-free data give the exact parameters', () => {
    const y = classicalLog10Rates(dg, { lambdaTotal: 1.1, coupling: 0.002, temperatureK: 295 }).log10Rate
    const r = fitRates({ model: 'classical', temperatureK: 295, points: dg.map((d, i) => ({ deltaG: d, log10Rate: y[i]! })) })
    expect(r.parameters.lambdaTotal!.value).toBeCloseTo(1.1, 6)
    expect(r.parameters.coupling!.value).toBeCloseTo(0.002, 8)
    expect(r.uncertaintyKind).toBe('scaled')
  })
  it('accepts rates with uncertainties and propagates σ(log10 k) = σ_k/(k ln 10)', () => {
    const y = classicalLog10Rates(dg, { lambdaTotal: 0.9, coupling: 0.003, temperatureK: 295 }).log10Rate
    const g = gaussians(9)
    const r = fitRates({ model: 'classical', temperatureK: 295, points: dg.map((d, i) => { const k = 10 ** (y[i]! + 0.05 * g()); return { deltaG: d, rate: k, rateUncertainty: k * 0.05 * Math.LN10 } }) })
    expect(Math.abs(r.parameters.lambdaTotal!.value - 0.9)).toBeLessThan(3 * r.parameters.lambdaTotal!.stderr!)
  })
  it('refuses an under-determined fit with a message', () => {
    expect(() => fitRates({ model: 'semiclassical', temperatureK: 295, points: [{ deltaG: -1, log10Rate: 9 }, { deltaG: -0.5, log10Rate: 10 }] }))
      .toThrow('Under-determined fit: 2 point(s) for 4 free parameter(s); fix parameters or add points')
  })
  it('refuses unknown parameters, non-finite values and half-given uncertainties, naming each field', () => {
    try {
      fitRates({ model: 'classical', temperatureK: 295, points: [{ deltaG: Number.NaN, log10Rate: 9 }, { deltaG: -0.5 }], fixed: { lambdaSolvent: 0.5 } as never })
      expect.unreachable()
    } catch (e) {
      expect(e).toBeInstanceOf(PhysicsInputError)
      expect((e as PhysicsInputError).issues.map(i => i.path)).toEqual(['/fixed/lambdaSolvent'])
    }
    try {
      fitRates({ model: 'classical', temperatureK: 295, points: [{ deltaG: Number.NaN, log10Rate: 9 }, { deltaG: -0.5 }, { deltaG: -0.2, log10Rate: 8 }] })
      expect.unreachable()
    } catch (e) {
      expect((e as PhysicsInputError).issues).toEqual([
        { path: '/points/0/deltaG', message: 'Driving force must be a finite number' },
        { path: '/points/1', message: 'Each point needs log10Rate or rate' }
      ])
    }
    expect(() => fitRates({ model: 'classical', temperatureK: 295, points: [{ deltaG: -1, log10Rate: 9, log10RateUncertainty: 0.1 }, { deltaG: -0.5, log10Rate: 10 }, { deltaG: -0.2, log10Rate: 8 }] }))
      .toThrow(/uncertainty for every point or for none/)
  })
  it('warns when the data cannot constrain a parameter', () => {
    // Six points over 0.1 eV of the normal region: λ and V trade off against each other.
    const xs = [-0.3, -0.28, -0.26, -0.24, -0.22, -0.2]
    const y = classicalLog10Rates(xs, { lambdaTotal: 1.1, coupling: 0.004, temperatureK: 295 }).log10Rate
    const noise = [0.03, -0.02, 0.01, -0.04, 0.02, 0.0]
    const r = fitRates({ model: 'classical', temperatureK: 295, points: xs.map((d, i) => ({ deltaG: d, log10Rate: y[i]! + noise[i]! })) })
    expect(r.warnings).toContain('The coupling is poorly determined: its standard error spans more than a factor of two.')
  })
  it('refuses a fit that does not converge, with a message saying what to do', () => {
    // All four semi-classical parameters free on a short normal-region flank: no unique minimum.
    const xs = [-0.3, -0.25, -0.2, -0.15, -0.1, -0.05]
    const y = semiclassicalLog10Rates(xs, truth).log10Rate
    const g = gaussians(3)
    expect(() => fitRates({ model: 'semiclassical', temperatureK: 295, points: xs.map((d, i) => ({ deltaG: d, log10Rate: y[i]! + 0.05 * g() })) }))
      .toThrow(/The fit did not converge in \d+ iterations; fix a parameter, give better starting values or add points/)
  })
})
