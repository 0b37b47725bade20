/**
 * The science core against tables computed outside the project by scripts/reference/physics_references.py:
 * rates with mpmath at 40 digits (source: mpmath), fit minima by bounded least squares from 60 starts
 * (source: scipy.optimize.least_squares). The tables are committed; this test needs no Python.
 */
import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { classicalLog10Rates, fitRates, semiclassicalLog10Rates, type FitRequest } from '../../../../shared/physics'

const load = (name: string) => JSON.parse(readFileSync(new URL(`../../../fixtures/physics/${name}`, import.meta.url), 'utf8'))
const rates = load('rates-mpmath.json') as { cases: { name: string, model: string, params: Record<string, number>, points: { deltaG: number, log10Rate: string }[] }[] }
const fits = load('fits-scipy.json') as { cases: (FitRequest & { name: string, reference: { chiSquared: number } })[] }

describe('rates against mpmath at 40 digits', () => {
  it.each(rates.cases.map(c => [c.name, c] as const))('%s', (_n, c) => {
    const dg = c.points.map(p => p.deltaG)
    const r = c.model === 'classical'
      ? classicalLog10Rates(dg, c.params as never)
      : semiclassicalLog10Rates(dg, c.params as never)
    c.points.forEach((p, i) => {
      const ref = Number(p.log10Rate)
      // relative agreement in log10 k to 1e-11 (absolute 1e-11 near zero): double precision minus the
      // rounding of (ΔG° + λ + jħω)²/(4λk_BT) when that exponent is ~1e7 at 1 K
      expect(Math.abs(r.log10Rate[i]! - ref)).toBeLessThan(1e-11 * Math.max(1, Math.abs(ref)))
    })
  })
})

describe('hard fits against bounded least squares (scipy) minima', () => {
  it('covers at least 20 cases', () => expect(fits.cases.length).toBeGreaterThanOrEqual(20))
  it.each(fits.cases.map(c => [c.name, c] as const))('%s: within 1 % of the reference χ², or says it did not converge', (_n, c) => {
    const r = fitRates({ model: c.model, temperatureK: c.temperatureK, points: c.points, fixed: c.fixed, initial: c.initial })
    const ref = c.reference.chiSquared
    const tol = 0.01 * ref + 1e-8
    if (r.status === 'stalled') expect(r.converged).toBe(false)
    else expect(r.chiSquared).toBeLessThanOrEqual(ref + tol)
    // never a claimed minimum that the reference improves by more than 1 %
    if (r.converged) expect(r.chiSquared - ref).toBeLessThanOrEqual(tol)
    expect(['converged', 'stalled', 'at-bound']).toContain(r.status)
    for (const p of Object.values(r.parameters)) expect(Number.isFinite(p!.value)).toBe(true)
  })
})
