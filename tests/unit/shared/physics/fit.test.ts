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
      .toThrow('Under-determined fit: 2 points for 4 free parameters; fix parameters or add points')
  })
  it('refuses unknown parameters, non-finite values and half-given uncertainties, naming each field', () => {
    try {
      fitRates({ model: 'classical', temperatureK: 295, points: [{ deltaG: Number.NaN, log10Rate: 9 }, { deltaG: -0.5 }], fixed: { lambdaSolvent: 0.5 } as never })
      expect.unreachable()
    }
    catch (e) {
      expect(e).toBeInstanceOf(PhysicsInputError)
      expect((e as PhysicsInputError).issues.map(i => i.path)).toEqual(['/fixed/lambdaSolvent'])
    }
    try {
      fitRates({ model: 'classical', temperatureK: 295, points: [{ deltaG: Number.NaN, log10Rate: 9 }, { deltaG: -0.5 }, { deltaG: -0.2, log10Rate: 8 }] })
      expect.unreachable()
    }
    catch (e) {
      expect((e as PhysicsInputError).issues).toEqual([
        { path: '/points/0/deltaG', message: 'Driving force ΔG° must be a finite number' },
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
  it('all four semi-classical parameters on a short normal-region flank: an honest status, never a false "converged"', () => {
    // No unique minimum: the answer names what ended at a bound (or says it stalled), and gives no standard error for it.
    const xs = [-0.3, -0.25, -0.2, -0.15, -0.1, -0.05]
    const y = semiclassicalLog10Rates(xs, truth).log10Rate
    const g = gaussians(3)
    const r = fitRates({ model: 'semiclassical', temperatureK: 295, points: xs.map((d, i) => ({ deltaG: d, log10Rate: y[i]! + 0.05 * g() })) })
    expect(['at-bound', 'stalled']).toContain(r.status)
    if (r.status === 'at-bound') {
      expect(r.atBound.length).toBeGreaterThan(0)
      for (const name of r.atBound) {
        expect(r.parameters[name]!.stderr).toBeNull()
        expect(r.warnings.join(' ')).toMatch(/ended at the (lower|upper) bound/)
      }
    }
    else expect(r.converged).toBe(false)
  })
  it('λ_i free on classical data: ends at its bound of 0 without ever evaluating λ_i < 0, λ_s and V keep their errors', () => {
    // A classical parabola narrower than any at 298.15 K (made at 230 K): the vibronic sum can only widen it,
    // so the best λ_i is the bound 0 (the old fitter stepped to λ_i = −1e-7 there and never returned).
    const xs = Array.from({ length: 14 }, (_, i) => -1.6 + 1.5 * i / 13)
    const y = classicalLog10Rates(xs, { lambdaTotal: 0.9, coupling: 0.003, temperatureK: 230 }).log10Rate
    const r = fitRates({ model: 'semiclassical', temperatureK: 298.15, points: xs.map((d, i) => ({ deltaG: d, log10Rate: y[i]! })), fixed: { vibrationEnergy: 0.18 } })
    expect(r.status).toBe('at-bound')
    expect(r.atBound).toEqual(['lambdaInternal'])
    expect(r.parameters.lambdaInternal!.value).toBe(0)
    expect(r.parameters.lambdaInternal!.atBound).toBe('lower')
    expect(r.parameters.lambdaSolvent!.stderr).toBeGreaterThan(0)
    expect(r.parameters.coupling!.log10Stderr).toBeGreaterThan(0)
  })
  it('λ_i fixed at 0 with ħω free: ħω is named as without effect, λ_s and V are not called unconstrained', () => {
    const xs = Array.from({ length: 14 }, (_, i) => -1.6 + 1.5 * i / 13)
    const y = classicalLog10Rates(xs, { lambdaTotal: 0.9, coupling: 0.003, temperatureK: 298.15 }).log10Rate
    const r = fitRates({ model: 'semiclassical', temperatureK: 298.15, points: xs.map((d, i) => ({ deltaG: d, log10Rate: y[i]! + 0.02 * Math.sin(7 * i) })), fixed: { lambdaInternal: 0 } })
    expect(r.parameters.vibrationEnergy!.stderr).toBeNull()
    expect(r.warnings).toContain('The mode energy ħω has no effect while λ_i = 0 (the classical limit): it is not determined; fix it.')
    expect(r.warnings.join(' ')).not.toMatch(/constrain the solvent|constrain the coupling/)
    expect(r.parameters.lambdaSolvent!.value).toBeCloseTo(0.9, 1)
    expect(r.parameters.lambdaSolvent!.stderr).toBeGreaterThan(0)
    expect(r.parameters.coupling!.stderr).toBeGreaterThan(0)
  })
  it('fits a temperature series at each point\'s own temperature (and recovers λ that one shared T would bias)', () => {
    const Ts = [255, 265, 275, 285, 295, 305, 315]
    const xs = [-1.4, -1.1, -0.9, -0.7, -0.5, -0.3, -0.15]
    const points = xs.flatMap((d, i) => Ts.map(T => ({ deltaG: d, temperatureK: T, log10Rate: classicalLog10Rates([d], { lambdaTotal: 1.2, coupling: 0.002, temperatureK: T }).log10Rate[0]! + 0.01 * Math.sin(i * T) })))
    const own = fitRates({ model: 'classical', points })
    expect(own.temperatureK).toBeNull()
    expect(own.temperatureRangeK).toEqual([255, 315])
    expect(own.parameters.lambdaTotal!.value).toBeCloseTo(1.2, 2)
    // the same points forced to 298.15 K fit worse
    const shared = fitRates({ model: 'classical', temperatureK: 298.15, points: points.map(({ temperatureK: _t, ...p }) => p) })
    expect(shared.chiSquared).toBeGreaterThan(5 * own.chiSquared)
    expect(() => fitRates({ model: 'classical', points: [{ deltaG: -1, log10Rate: 9 }, { deltaG: -0.5, log10Rate: 9.5, temperatureK: 300 }, { deltaG: -0.2, log10Rate: 9 }] }))
      .toThrow('/points/0/temperatureK: Give a temperature for this point or a temperatureK for the whole fit')
  })
  it('refuses fixed and initial values outside the physical bounds, and a Huang–Rhys factor above 200, naming the field', () => {
    const pts = [{ deltaG: -1, log10Rate: 9 }, { deltaG: -0.5, log10Rate: 9.5 }, { deltaG: -0.2, log10Rate: 9 }]
    const paths = (fn: () => unknown) => {
      try { fn(); return [] }
      catch (e) { return (e as PhysicsInputError).issues.map(i => i.path) }
    }
    expect(paths(() => fitRates({ model: 'semiclassical', temperatureK: 295, points: pts, fixed: { lambdaInternal: -1e-7, coupling: 2 } }))).toEqual(['/fixed/lambdaInternal', '/fixed/coupling'])
    expect(paths(() => fitRates({ model: 'semiclassical', temperatureK: 295, points: pts, fixed: { lambdaInternal: 2, vibrationEnergy: 0.005 } }))).toEqual(['/fixed/lambdaInternal'])
    expect(paths(() => fitRates({ model: 'classical', temperatureK: 1e-300, points: pts }))).toEqual(['/temperatureK'])
    expect(paths(() => fitRates({ model: 'classical', temperatureK: 295, points: [...pts, { deltaG: 1e300, log10Rate: 1 }] }))).toEqual(['/points/3/deltaG'])
    expect(paths(() => fitRates({ model: 'classical', temperatureK: 295, points: [...pts, { deltaG: -1, log10Rate: 1e6 }] }))).toEqual(['/points/3/log10Rate'])
    expect(paths(() => fitRates({ model: 'classical', temperatureK: 295, points: pts, initial: { lambdaTotal: 0 } }))).toEqual(['/initial/lambdaTotal'])
  })
})
