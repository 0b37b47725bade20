import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import jStat from 'jstat'
import {
  activationFreeEnergy, classicalLog10Rates, classicalPeakRate, semiclassicalLog10Rates, semiclassicalTerms, PhysicsInputError,
  createSemiclassicalEvaluator, MAX_HUANG_RHYS, MAX_VIBRONIC_TERMS,
  type SemiclassicalParams
} from '../../../../shared/physics'
import { BOLTZMANN_EV_PER_K, HBAR_EV_S } from '../../../../shared/physics/constants'
import worked from '../../../fixtures/physics/worked-checks-mpmath.json'

/**
 * Slow reference: the semi-classical sum over a fixed, very generous number of terms with a
 * log-sum-exp, written independently of the production recurrences (direct lgamma via jStat).
 */
function bruteForceLog10 (dg: number, p: SemiclassicalParams, terms = 3000): number {
  const kT = BOLTZMANN_EV_PER_K * p.temperatureK
  const S = p.lambdaInternal / p.vibrationEnergy
  const logs: number[] = []
  for (let j = 0; j < terms; j++) {
    const lnW = -S + j * Math.log(S) - jStat.gammaln(j + 1)
    logs.push(lnW - (dg + p.lambdaSolvent + j * p.vibrationEnergy) ** 2 / (4 * p.lambdaSolvent * kT))
  }
  const m = Math.max(...logs)
  const lse = m + Math.log(logs.reduce((s, l) => s + Math.exp(l - m), 0))
  const lnPref = Math.log(2 * Math.PI / HBAR_EV_S) + 2 * Math.log(p.coupling) - 0.5 * Math.log(4 * Math.PI * p.lambdaSolvent * kT)
  return (lnPref + lse) / Math.LN10
}

const base: SemiclassicalParams = { lambdaSolvent: 0.6, lambdaInternal: 0.36, vibrationEnergy: 0.18, coupling: 0.005, temperatureK: 298.15 }
const grid = Array.from({ length: 41 }, (_, i) => -3.5 + i * 0.1)

describe('classical Marcus', () => {
  const p = { lambdaTotal: 0.8, coupling: 0.01, temperatureK: 298.15 }
  it('peaks at ΔG° = −λ with (2π/ħ)V²(4πλk_BT)^(−1/2) (Marcus 1956; mpmath value in worked-checks-mpmath.json)', () => {
    const kT = BOLTZMANN_EV_PER_K * 298.15
    const expected = 2 * Math.PI / HBAR_EV_S * 0.01 ** 2 / Math.sqrt(4 * Math.PI * 0.8 * kT)
    expect(classicalPeakRate(p) / expected).toBeCloseTo(1, 12)
    expect(classicalPeakRate(p) / worked.checks.classical_peak.rate_per_s).toBeCloseTo(1, 12)
    const r = classicalLog10Rates([-0.8, -0.79, -0.81], p).log10Rate
    expect(r[0]).toBeCloseTo(Math.log10(expected), 12)
    expect(r[0]!).toBeGreaterThan(r[1]!)
    expect(r[0]!).toBeGreaterThan(r[2]!)
  })
  it('is symmetric in ΔG° about −λ', () => {
    for (const d of [0.05, 0.3, 1.1]) {
      const r = classicalLog10Rates([-0.8 - d, -0.8 + d], p).log10Rate
      expect(r[0]).toBeCloseTo(r[1]!, 10)
    }
  })
  it('activation free energy (λ + ΔG°)²/4λ: zero at −λ, λ/4 at ΔG° = 0', () => {
    expect(activationFreeEnergy(-0.8, 0.8)).toBe(0)
    expect(activationFreeEnergy(0, 0.8)).toBeCloseTo(0.2, 15)
  })
})

describe('semi-classical (Marcus–Levich–Jortner)', () => {
  it('Poisson weights sum to 1 and equal jStat\'s Poisson PMF (general-purpose statistics library)', () => {
    for (const S of [0.3, 2, 8, 20]) {
      const terms = semiclassicalTerms([0], { ...base, lambdaInternal: S * 0.18 }, { minWeight: 0, maxTerms: 400 })
      for (const t of terms.slice(0, 60)) expect(t.weight).toBeCloseTo(jStat.poisson.pdf(t.j, S), 14)
      expect(terms.reduce((s, t) => s + t.weight, 0)).toBeCloseTo(1, 12)
    }
  })
  it('matches a brute-force 3000-term sum across normal and inverted regions (S = 2)', () => {
    const r = semiclassicalLog10Rates(grid, base).log10Rate
    grid.forEach((dg, i) => expect(r[i]).toBeCloseTo(bruteForceLog10(dg, base), 9))
  })
  it.each([8, 20])('large Huang–Rhys factor S = %i matches the brute-force sum and needs many terms', (S) => {
    const p = { ...base, lambdaInternal: S * 0.18 }
    const res = semiclassicalLog10Rates(grid, p)
    grid.forEach((dg, i) => expect(res.log10Rate[i]).toBeCloseTo(bruteForceLog10(dg, p), 9))
    expect(res.termsUsed).toBeGreaterThan(12)
  })
  it('77 K and the deep inverted region stay finite and accurate where k underflows', () => {
    const p = { ...base, temperatureK: 77, lambdaSolvent: 0.15, vibrationEnergy: 0.06, lambdaInternal: 0.05 }
    const r = semiclassicalLog10Rates([-3.5, -2.5, 0.8], p).log10Rate
    for (const [i, dg] of [-3.5, -2.5, 0.8].entries()) {
      expect(Number.isFinite(r[i])).toBe(true)
      expect(r[i]).toBeCloseTo(bruteForceLog10(dg, p), 8)
    }
    expect(r[2]!).toBeLessThan(-30) // uphill at 77 K: far below any measurable rate
  })
  it('λ_i → 0 gives classical Marcus with λ = λ_s', () => {
    // Pointwise limit: far in the inverted region even a weight of 1e-9 on j = 1 can win, so the
    // check runs where the j = 0 Gaussian is not itself astronomically small.
    const near = grid.filter(d => d >= -2 && d <= 0.5)
    const cl = classicalLog10Rates(near, { lambdaTotal: 0.6, coupling: 0.005, temperatureK: 298.15 }).log10Rate
    const tiny = semiclassicalLog10Rates(near, { ...base, lambdaInternal: 1e-12 }).log10Rate
    const zero = semiclassicalLog10Rates(near, { ...base, lambdaInternal: 0 }).log10Rate
    near.forEach((_, i) => {
      expect(tiny[i]).toBeCloseTo(cl[i]!, 6)
      expect(zero[i]).toBe(cl[i])
    })
  })
  it('rejects non-physical input with one message per field', () => {
    try {
      semiclassicalLog10Rates([0, Number.NaN], { lambdaSolvent: 0, lambdaInternal: -1, vibrationEnergy: 0, coupling: 0.01, temperatureK: -5 })
      expect.unreachable()
    }
    catch (e) {
      expect(e).toBeInstanceOf(PhysicsInputError)
      expect((e as PhysicsInputError).issues.map(i => i.path)).toEqual(['/lambdaSolvent', '/lambdaInternal', '/vibrationEnergy', '/temperatureK'])
    }
    expect(() => semiclassicalLog10Rates([0, Infinity], base)).toThrow('/drivingForces/1: Driving force ΔG° must be a finite number')
  })
  it('log10 k stays finite over the whole bounded input domain, with the term count under its budget (property test, fast-check)', () => {
    fc.assert(fc.property(
      fc.double({ min: -10, max: 10, noNaN: true }),
      fc.double({ min: 0.005, max: 5, noNaN: true }),
      fc.double({ min: 0, max: 5, noNaN: true }),
      fc.double({ min: 0.005, max: 1, noNaN: true }),
      fc.double({ min: 1e-9, max: 1, noNaN: true }),
      fc.double({ min: 1, max: 2000, noNaN: true }),
      (dg, ls, li, hw, V, T) => {
        fc.pre(li / hw <= MAX_HUANG_RHYS)
        const r = semiclassicalLog10Rates([dg, -dg], { lambdaSolvent: ls, lambdaInternal: li, vibrationEnergy: hw, coupling: V, temperatureK: T })
        return Number.isFinite(r.log10Rate[0]) && Number.isFinite(r.log10Rate[1]) && r.termsUsed >= 1 && r.termsUsed <= MAX_VIBRONIC_TERMS
      }
    ), { numRuns: 400 })
  })
  it('the worst corners of the bounds stay far inside the term budget', () => {
    // S = 200 with the softest mode, at both ends of ΔG°, coldest and hottest
    for (const T of [1, 2000]) {
      for (const [li, hw] of [[1, 0.005], [5, 0.025]] as const) {
        const r = semiclassicalLog10Rates([-10, -5, 0, 10], { lambdaSolvent: 0.005, lambdaInternal: li, vibrationEnergy: hw, coupling: 1, temperatureK: T })
        expect(r.termsUsed).toBeLessThan(MAX_VIBRONIC_TERMS / 4)
        r.log10Rate.forEach(v => expect(Number.isFinite(v)).toBe(true))
      }
    }
  })
  it.each([
    ['ΔG° = 1e300', [1e300, -1e300], {}, ['/drivingForces/0', '/drivingForces/1']],
    ['ΔG° = −1e7', [-1e7], {}, ['/drivingForces/0']],
    ['ħω = 1e-9 eV', [0], { vibrationEnergy: 1e-9 }, ['/vibrationEnergy']],
    ['T = 1e-300 K', [0], { temperatureK: 1e-300 }, ['/temperatureK']],
    ['V = 1e200 eV', [0], { coupling: 1e200 }, ['/coupling']],
    ['S = λ_i/ħω above 200', [0], { lambdaInternal: 4, vibrationEnergy: 0.01 }, ['/lambdaInternal']]
  ] as const)('refuses %s with the field named (they used to hang or answer nonsense)', (_n, dg, over, paths) => {
    try {
      semiclassicalLog10Rates(dg as unknown as number[], { ...base, ...over })
      expect.unreachable()
    }
    catch (e) {
      expect(e).toBeInstanceOf(PhysicsInputError)
      expect((e as PhysicsInputError).issues.map(i => i.path)).toEqual(paths)
    }
  })
  it('an unchecked caller cannot make the sum run away: the term budget stops it', () => {
    const ev = createSemiclassicalEvaluator({ ...base, lambdaSolvent: 0.005, vibrationEnergy: 0.005, lambdaInternal: 0.9 })
    expect(() => ev.log10Rate(-1e300)).toThrow(/vibronic sum would need/)
    expect(() => createSemiclassicalEvaluator({ ...base, vibrationEnergy: 1e-9 })).toThrow(/Huang–Rhys factor/)
  })
})
