/**
 * A 5 000-point bi-exponential decay convolved with a Gaussian instrument response of fitted width (the SciPy
 * reference trace "bi, Gaussian IRF, 5000 points, no weights"): median and slowest of 15 fits after 3 to warm up.
 * And the same size with a measured response of 400 samples (numerical convolution).
 */
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { fitDecay } from '../shared/physics/decay-fit'
import { report } from './report'

const ref = JSON.parse(readFileSync(join(import.meta.dirname, '../tests/fixtures/kinetics/decay-scipy.json'), 'utf8'))
const c = ref.cases.find((x: { name: string }) => x.name === 'bi, Gaussian IRF, 5000 points, no weights')
function time (f: () => unknown, runs = 15): { median: number, max: number } {
  for (let i = 0; i < 3; i++) f()
  const ms: number[] = []
  for (let i = 0; i < runs; i++) {
    const t = performance.now()
    f()
    ms.push(performance.now() - t)
  }
  ms.sort((a, b) => a - b)
  return { median: ms[Math.floor(runs / 2)]!, max: ms[runs - 1]! }
}
const gaussian = time(() => {
  const r = fitDecay({ model: 'bi', times: c.times, signal: c.signal, timeUnit: 'ps', weighting: 'none', irf: { kind: 'gaussian' } })
  if (r.status !== 'converged') throw new Error(`the benchmark fit ended ${r.status}`)
})
report('decay.fit5000_gaussian.median_ms', gaussian.median, 'ms', 200)
report('decay.fit5000_gaussian.max_ms', gaussian.max, 'ms', 0)
const s = Array.from({ length: 400 }, (_, i) => -1 + i * 0.005)
const irf = { kind: 'measured' as const, times: s, signal: s.map(x => Math.exp(-0.5 * (x / 0.35) ** 2)) }
const measured = time(() => fitDecay({ model: 'bi', times: c.times, signal: c.signal, timeUnit: 'ps', weighting: 'none', irf }), 5)
report('decay.fit5000_measured400.median_ms', measured.median, 'ms', 0)
