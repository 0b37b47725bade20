/**
 * The DerSimonian–Laird consensus against statsmodels (combine_effects with method_re="dl", Debian's statsmodels
 * 0.13.5; table made by scripts/reference/consensus_statsmodels.py), to 1e-9.
 */
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { DISCREPANCY_Z, dersimonianLaird, leaveGroupOutZ, leaveOneOutZ } from '../../../../shared/stats/consensus'

interface Case { name: string, y: number[], sigma: number[], mean: number, stderr: number, tau2: number, q: number, i2: number, looZ: number[] }
const table = JSON.parse(readFileSync(join(__dirname, '../../../fixtures/stats/dl-statsmodels.json'), 'utf8')) as { source: string, cases: Case[] }
const close = (a: number, b: number, what: string) => expect(Math.abs(a - b), `${what}: ${a} vs ${b}`).toBeLessThan(1e-9)

describe('DerSimonian–Laird consensus (reference: statsmodels)', () => {
  it.each(table.cases.map(c => [c.name, c] as const))('%s', (_n, c) => {
    const ms = c.y.map((y, i) => ({ y, sigma: c.sigma[i]! }))
    const r = dersimonianLaird(ms)
    close(r.mean, c.mean, 'mean')
    close(r.stderr, c.stderr, 'stderr')
    close(r.tau2, c.tau2, 'tau2')
    close(r.tau, Math.sqrt(c.tau2), 'tau')
    close(r.q, c.q, 'Q')
    close(r.i2, c.i2, 'I2')
    leaveOneOutZ(ms).forEach((z, i) => close(z, c.looZ[i]!, `z[${i}]`))
  })
  it('flags the lab that is 40× off, and only that one', () => {
    const c = table.cases.find(x => x.name === 'five labs, one 40x off')!
    const z = leaveOneOutZ(c.y.map((y, i) => ({ y, sigma: c.sigma[i]! })))
    expect(z.map(v => Math.abs(v) > DISCREPANCY_Z)).toEqual([false, false, false, false, true])
  })
  it('leaving a lab out: its replicates do not vouch for each other (z against the other labs\' consensus)', () => {
    // two replicates of an outlying lab hide each other from a per-record leave-one-out, not from a per-lab one
    const ms = [{ y: 9.0, sigma: 0.06 }, { y: 9.05, sigma: 0.06 }, { y: 9.02, sigma: 0.06 }, { y: 8.98, sigma: 0.06 }, { y: 10.6, sigma: 0.06 }, { y: 10.62, sigma: 0.06 }]
    const labs = [1, 1, 2, 2, 3, 3]
    const z = leaveGroupOutZ(ms, labs)
    expect(z.map(v => Math.abs(v) > DISCREPANCY_Z)).toEqual([false, false, false, false, true, true])
    const rest = dersimonianLaird(ms.slice(0, 4))
    expect(z[4]).toBeCloseTo((10.6 - rest.mean) / Math.sqrt(0.06 ** 2 + rest.tau2 + rest.stderr ** 2), 12)
    expect(leaveOneOutZ(ms)[4]! < DISCREPANCY_Z).toBe(true) // what the per-record rule would have missed
  })
  it('refuses a measurement without a positive σ, and gives no z for a single one', () => {
    expect(() => dersimonianLaird([{ y: 9, sigma: 0 }])).toThrow(RangeError)
    expect(leaveOneOutZ([{ y: 9, sigma: 0.1 }])[0]).toBeNaN()
  })
})
